#include "outliers/json.h"

#include <fmt/format.h>

#include <cmath>

#include "core/error.h"
#include "core/names.h"

namespace lagsieve {

using nlohmann::json;

namespace {

json number_or_null(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

const json& field(const json& j, const char* key, const std::string& where) {
  if (!j.is_object() || !j.contains(key))
    throw InputError(fmt::format("{}: field '{}' of a detected effect is missing", where, key));
  return j.at(key);
}

std::vector<double> numbers(const json& j, const char* key, const std::string& where) {
  const json& v = field(j, key, where);
  std::vector<double> out;
  if (!v.is_array())
    throw InputError(fmt::format("{}: field '{}' of a detected effect must be a list", where, key));
  for (const auto& x : v) {
    if (!x.is_number() || !std::isfinite(x.get<double>()))
      throw InputError(
          fmt::format("{}: field '{}' of a detected effect must hold finite numbers", where, key));
    out.push_back(x.get<double>());
  }
  return out;
}

}  // namespace

json effect_to_json(const OutlierEffect& e) {
  json j = {{"name", e.name},
            {"type", to_string(e.type)},
            {"row", e.row},
            {"time", e.time},
            {"size", number_or_null(e.size)},
            {"std_error", number_or_null(e.std_error)},
            {"statistic", number_or_null(e.statistic)},
            {"ambiguous_with", json::array()}};
  for (auto t : e.ambiguous_with) j["ambiguous_with"].push_back(to_string(t));
  if (e.type == OutlierType::temporary) j["decay"] = e.decay;
  if (e.type == OutlierType::innovational) {
    j["ar"] = e.ar;
    j["ma"] = e.ma;
    j["differencing"] = {{"regular", e.differencing.regular},
                         {"seasonal", e.differencing.seasonal},
                         {"period", e.differencing.period}};
  }
  return j;
}

OutlierEffect effect_from_json(const json& j, const std::string& where) {
  OutlierEffect e;
  const json& name = field(j, "name", where);
  const json& type = field(j, "type", where);
  const json& row = field(j, "row", where);
  if (!name.is_string() || !type.is_string() || !row.is_number_integer())
    throw InputError(
        fmt::format("{}: a detected effect needs a text name and type and an "
                    "integer row",
                    where));
  e.name = name.get<std::string>();
  const auto parsed = parse_enum<OutlierType>(type.get<std::string>());
  if (!parsed)
    throw InputError(fmt::format("{}: detected effect '{}' has the unknown type '{}'", where,
                                 e.name, type.get<std::string>()));
  e.type = *parsed;
  e.row = row.get<int>();
  if (j.contains("time") && j["time"].is_string()) e.time = j["time"].get<std::string>();
  auto number = [&](const char* key) {
    return j.contains(key) && j[key].is_number() ? j[key].get<double>() : std::nan("");
  };
  e.size = number("size");
  e.std_error = number("std_error");
  e.statistic = number("statistic");
  if (j.contains("ambiguous_with") && j["ambiguous_with"].is_array())
    for (const auto& t : j["ambiguous_with"])
      if (t.is_string())
        if (auto v = parse_enum<OutlierType>(t.get<std::string>())) e.ambiguous_with.push_back(*v);
  if (e.type == OutlierType::temporary) {
    const json& d = field(j, "decay", where);
    if (!d.is_number() || !(d.get<double>() > 0.0 && d.get<double>() < 1.0))
      throw InputError(
          fmt::format("{}: detected effect '{}' needs a decay in (0, 1)", where, e.name));
    e.decay = d.get<double>();
  }
  if (e.type == OutlierType::innovational) {
    e.ar = numbers(j, "ar", where);
    e.ma = numbers(j, "ma", where);
    const json& d = field(j, "differencing", where);
    auto integer = [&](const char* key) {
      if (!d.contains(key) || !d[key].is_number_integer())
        throw InputError(
            fmt::format("{}: detected effect '{}' needs differencing.{}", where, e.name, key));
      return d[key].get<int>();
    };
    e.differencing = {integer("regular"), integer("seasonal"), integer("period")};
  }
  return e;
}

json outliers_to_json(const OutlierFit& r) {
  json j = {{"critical", r.critical},   {"critical_rule", kCriticalRule},
            {"rounds", r.rounds},       {"ambiguity_rule", kAmbiguityRule},
            {"effects", json::array()}, {"dropped", json::array()}};
  for (const auto& e : r.effects) j["effects"].push_back(effect_to_json(e));
  for (const auto& e : r.dropped) j["dropped"].push_back(effect_to_json(e));
  return j;
}

}  // namespace lagsieve
