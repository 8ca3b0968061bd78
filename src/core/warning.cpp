#include "core/warning.h"

#include <cmath>
#include <limits>

namespace lagsieve {

double Warning::number(std::string_view key) const {
  for (const auto& [k, v] : numbers)
    if (k == key) return v;
  return std::numeric_limits<double>::quiet_NaN();
}

std::vector<std::string> warning_texts(const std::vector<Warning>& warnings) {
  std::vector<std::string> out;
  out.reserve(warnings.size());
  for (const auto& w : warnings) out.push_back(w.message);
  return out;
}

nlohmann::json warnings_json(const std::vector<Warning>& warnings) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& w : warnings) {
    nlohmann::json values = nlohmann::json::object();
    for (const auto& [k, v] : w.numbers) {
      if (!std::isfinite(v))
        values[k] = nullptr;
      else if (v == std::trunc(v) && std::fabs(v) < 9.0e15)  // counts, lags, rows: integers
        values[k] = static_cast<long long>(v);
      else
        values[k] = v;
    }
    for (const auto& [k, v] : w.names) values[k] = v;
    out.push_back({{"code", w.code}, {"message", w.message}, {"values", values}});
  }
  return out;
}

std::vector<Warning> warnings_from_json(const nlohmann::json& structured,
                                        const nlohmann::json& texts) {
  std::vector<Warning> out;
  if (structured.is_array()) {
    for (const auto& j : structured) {
      Warning w;
      w.code = j.value("code", "unspecified");
      w.message = j.value("message", "");
      if (j.contains("values") && j["values"].is_object())
        for (const auto& [k, v] : j["values"].items()) {
          if (v.is_number())
            w.numbers.emplace_back(k, v.get<double>());
          else if (v.is_null())
            w.numbers.emplace_back(k, std::numeric_limits<double>::quiet_NaN());
          else if (v.is_string())
            w.names.emplace_back(k, v.get<std::string>());
        }
      out.push_back(std::move(w));
    }
    return out;
  }
  if (texts.is_array())
    for (const auto& t : texts)
      if (t.is_string()) out.push_back({"unspecified", t.get<std::string>(), {}, {}});
  return out;
}

}  // namespace lagsieve
