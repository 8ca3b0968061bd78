#include "forecast/model_file.h"

#include <fmt/format.h>
#include <cctype>
#include <cmath>
#include <cstdint>
#include <fstream>
#include <limits>
#include <optional>
#include <sstream>

#include "core/error.h"
#include "core/names.h"
#include "forecast/model_checks.h"
#include "io/atomic_file.h"
#include "model/spec_from_config.h"
#include "outliers/json.h"

namespace lagsieve {

using nlohmann::json;

namespace {

json number_or_null(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

// Reads a field, refusing absent fields, wrong JSON types, non-finite numbers and integers out of
// the int range with a message naming both the file and the field path.
class Reader {
 public:
  explicit Reader(std::string source) : source_(std::move(source)) {}

  [[noreturn]] void fail(const std::string& field, const std::string& what) const {
    throw InputError(fmt::format("{}: model file field '{}' {}", source_, field, what));
  }
  const json& at(const json& j, const std::string& key, const std::string& path) const {
    if (!j.is_object())
      fail(path.empty() ? std::string("(top level)") : path.substr(0, path.size() - 1),
           fmt::format("must be an object, not {}", describe(j)));
    if (!j.contains(key))
      fail(path + key, "is missing; the file is incomplete or not a lagsieve model file");
    return j.at(key);
  }
  const json& object(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_object()) fail(path + key, fmt::format("must be an object, not {}", describe(v)));
    return v;
  }
  const json& list(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_array()) fail(path + key, fmt::format("must be a list, not {}", describe(v)));
    return v;
  }
  double number(const json& j, const std::string& key, const std::string& path) const {
    return finite(at(j, key, path), path + key);
  }
  double finite(const json& v, const std::string& field) const {
    if (!v.is_number() || !std::isfinite(v.get<double>()))
      fail(field, fmt::format("must be a finite number, not {}", describe(v)));
    return v.get<double>();
  }
  int integer(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    constexpr auto lo = std::numeric_limits<int>::min(), hi = std::numeric_limits<int>::max();
    if (v.is_number_unsigned() && v.get<std::uint64_t>() <= static_cast<std::uint64_t>(hi))
      return static_cast<int>(v.get<std::uint64_t>());
    if (v.is_number_integer() && !v.is_number_unsigned() && v.get<std::int64_t>() >= lo &&
        v.get<std::int64_t>() <= hi)
      return static_cast<int>(v.get<std::int64_t>());
    fail(path + key,
         fmt::format("must be a whole number between {} and {}, not {}", lo, hi, describe(v)));
  }
  bool boolean(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_boolean())
      fail(path + key, fmt::format("must be true or false, not {}", describe(v)));
    return v.get<bool>();
  }
  std::string text(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_string()) fail(path + key, fmt::format("must be a string, not {}", describe(v)));
    return v.get<std::string>();
  }
  std::vector<std::string> texts(const json& j, const std::string& key,
                                 const std::string& path) const {
    const json& v = list(j, key, path);
    std::vector<std::string> out;
    for (size_t i = 0; i < v.size(); ++i) {
      if (!v[i].is_string())
        fail(fmt::format("{}{}[{}]", path, key, i),
             fmt::format("must be a string, not {}", describe(v[i])));
      out.push_back(v[i].get<std::string>());
    }
    return out;
  }
  std::vector<double> numbers(const json& j, const std::string& key,
                              const std::string& path) const {
    const json& v = list(j, key, path);
    std::vector<double> out;
    for (size_t i = 0; i < v.size(); ++i)
      out.push_back(finite(v[i], fmt::format("{}{}[{}]", path, key, i)));
    return out;
  }
  template <typename Enum>
  Enum choice(const json& j, const std::string& key, const std::string& path) const {
    const auto s = text(j, key, path);
    const auto v = parse_enum<Enum>(s);
    if (!v) fail(path + key, fmt::format("has the unknown value '{}'", s));
    return *v;
  }

 private:
  // The JSON type and, for short values, the value itself: "a string (\"yes\")", "a number (3)".
  static std::string describe(const json& v) {
    std::string shown = v.dump();
    if (shown.size() > 40) shown = shown.substr(0, 37) + "...";
    switch (v.type()) {
      case json::value_t::null:
        return "null";
      case json::value_t::boolean:
        return fmt::format("a boolean ({})", shown);
      case json::value_t::string:
        return fmt::format("a string ({})", shown);
      case json::value_t::array:
        return "a list";
      case json::value_t::object:
        return "an object";
      default:
        return fmt::format("the number {}", shown);
    }
  }

  std::string source_;
};

}  // namespace

namespace {

// training.data: {"time": [...], "columns": [{"name", "values" (null = missing), "filled_rows"
// (1-based, rows filled by interpolation)}]}; values keep full precision (shortest round trip).
json training_rows_json(const TrainingRows& d) {
  json j = {{"time", d.time}, {"columns", json::array()}};
  for (size_t c = 0; c < d.columns.size(); ++c) {
    json values = json::array();
    for (double v : d.values[c]) values.push_back(number_or_null(v));
    json filled = json::array();
    for (int t = 0; t < d.rows(); ++t)
      if (d.was_filled(c, t)) filled.push_back(t + 1);
    j["columns"].push_back({{"name", d.columns[c]}, {"values", values}, {"filled_rows", filled}});
  }
  return j;
}

TrainingRows training_rows_from_json(const Reader& r, const json& j, int rows) {
  const std::string path = "training.data.";
  if (!j.is_object()) r.fail("training.data", "must be an object (or absent)");
  TrainingRows d;
  d.time = r.texts(j, "time", path);
  if (static_cast<int>(d.time.size()) != rows)
    r.fail(path + "time",
           fmt::format("has {} stamps for the {} training rows", d.time.size(), rows));
  const json& cols = r.list(j, "columns", path);
  if (cols.empty()) r.fail(path + "columns", "is empty; it holds at least the target");
  for (size_t c = 0; c < cols.size(); ++c) {
    const std::string cp = fmt::format("{}columns[{}].", path, c);
    d.columns.push_back(r.text(cols[c], "name", cp));
    const json& vj = r.list(cols[c], "values", cp);
    if (static_cast<int>(vj.size()) != rows)
      r.fail(cp + "values", fmt::format("has {} values for the {} training rows", vj.size(), rows));
    std::vector<double> values;
    for (size_t t = 0; t < vj.size(); ++t)
      values.push_back(vj[t].is_null() ? std::nan("")
                                       : r.finite(vj[t], fmt::format("{}values[{}]", cp, t)));
    d.values.push_back(std::move(values));
    std::vector<unsigned char> filled;
    if (cols[c].contains("filled_rows")) {
      const json& fj = r.list(cols[c], "filled_rows", cp);
      if (!fj.empty()) filled.assign(static_cast<size_t>(rows), 0);
      for (size_t k = 0; k < fj.size(); ++k) {
        const std::string fp = fmt::format("{}filled_rows[{}]", cp, k);
        if (!fj[k].is_number_integer() || fj[k].get<long long>() < 1 ||
            fj[k].get<long long>() > rows)
          r.fail(fp, fmt::format("must be a row number from 1 to {}", rows));
        filled[static_cast<size_t>(fj[k].get<long long>() - 1)] = 1;
      }
    }
    d.filled.push_back(std::move(filled));
  }
  return d;
}

}  // namespace

json to_json(const FittedModel& m) {
  json doc;
  doc["format"] = kModelFormat;
  doc["version"] = kModelFormatVersion;
  doc["label"] = model_label(m.spec);
  const auto& s = m.spec;
  json spec;
  spec["transform"] = {{"kind", to_string(s.transform.kind)}, {"lambda", s.transform.lambda}};
  spec["differencing"] = {{"regular", s.differencing.regular},
                          {"seasonal", s.differencing.seasonal},
                          {"period", s.differencing.period}};
  spec["noise"] = {{"p", s.noise.p},
                   {"q", s.noise.q},
                   {"seasonal_p", s.noise.seasonal_p},
                   {"seasonal_q", s.noise.seasonal_q},
                   {"period", s.noise.period}};
  spec["constant"] = s.constant;
  spec["filter_start"] = to_string(s.filter_start);
  spec["estimation"] = to_string(s.estimation);
  spec["inputs"] = json::array();
  for (size_t i = 0; i < s.inputs.size(); ++i) {
    const auto& t = s.inputs[i];
    const auto& u = m.inputs[i];
    json in = {{"name", t.name},
               {"delay", t.order.delay},
               {"numerator", t.order.numerator},
               {"denominator", t.order.denominator},
               {"event", u.is_event},
               {"future", to_string(u.future)},
               {"known_steps", u.known_steps}};
    if (u.is_event) {
      in["shape"] = to_string(u.shape);
      in["at"] = u.at;
    }
    if (u.effect) in["detected"] = effect_to_json(*u.effect);
    spec["inputs"].push_back(in);
  }
  doc["spec"] = spec;
  const auto& p = m.params;
  json params;
  params["constant"] = p.constant;
  params["sigma2"] = p.sigma2;
  params["phi"] = p.phi;
  params["theta"] = p.theta;
  params["seasonal_phi"] = p.seasonal_phi;
  params["seasonal_theta"] = p.seasonal_theta;
  params["inputs"] = json::array();
  for (const auto& ip : p.inputs)
    params["inputs"].push_back({{"omega", ip.omega}, {"delta", ip.delta}, {"state", ip.state}});
  doc["params"] = params;
  json cov = json::array();
  for (Eigen::Index i = 0; i < m.covariance.rows(); ++i) {
    json row = json::array();
    for (Eigen::Index j = 0; j < m.covariance.cols(); ++j)
      row.push_back(number_or_null(m.covariance(i, j)));
    cov.push_back(row);
  }
  doc["covariance"] = {{"names", m.param_names}, {"matrix", cov}};
  doc["input_models"] = json::array();
  for (const auto& im : m.input_models) {
    json icov = json::array();  // phi, theta, mean; [] when not available
    for (Eigen::Index i = 0; i < im.covariance.rows(); ++i) {
      json row = json::array();
      for (Eigen::Index j = 0; j < im.covariance.cols(); ++j)
        row.push_back(number_or_null(im.covariance(i, j)));
      icov.push_back(row);
    }
    doc["input_models"].push_back({{"input", im.input},
                                   {"p", im.p},
                                   {"q", im.q},
                                   {"mean", im.mean},
                                   {"phi", im.phi},
                                   {"theta", im.theta},
                                   {"sigma2", im.sigma2},
                                   {"aic", im.aic},
                                   {"chosen_by_aic", im.chosen_by_aic},
                                   {"covariance", icov}});
  }
  doc["fit"] = {{"loglik", m.loglik}, {"aic", m.aic},          {"aicc", number_or_null(m.aicc)},
                {"bic", m.bic},       {"n_obs", m.n_obs},      {"n_params", m.n_params},
                {"start", m.start},   {"status", m.fit_status}};
  const auto& tr = m.training;
  doc["training"] = {{"source_file", tr.source_file},
                     {"target_column", tr.target_column},
                     {"rows", tr.rows},
                     {"first_time", tr.first_time},
                     {"last_time", tr.last_time},
                     {"frequency", tr.frequency},
                     {"time_format", tr.time_format},
                     {"missing_target", tr.missing_target},
                     {"fingerprint", tr.fingerprint},
                     {"config_file", tr.config_file},
                     {"config_text", tr.config_text}};
  if (!tr.data.empty()) doc["training"]["data"] = training_rows_json(tr.data);
  doc["backtest"] = m.backtest;
  return doc;
}

FittedModel fitted_model_from_json(const json& doc, const std::string& source) {
  const Reader r(source);
  if (!doc.is_object() || !doc.contains("format") || doc["format"] != kModelFormat)
    throw InputError(
        fmt::format("{}: not a lagsieve model file (no \"format\": \"{}\")", source, kModelFormat));
  const int version = r.integer(doc, "version", "");
  if (version != kModelFormatVersion)
    throw InputError(
        fmt::format("{}: model file version {} is not supported (this lagsieve reads "
                    "version {}); re-fit the model with this version",
                    source, version, kModelFormatVersion));
  FittedModel m;
  const json& spec = r.object(doc, "spec", "");
  const json& tj = r.object(spec, "transform", "spec.");
  m.spec.transform.kind = r.choice<TransformKind>(tj, "kind", "spec.transform.");
  m.spec.transform.lambda = r.number(tj, "lambda", "spec.transform.");
  const json& dj = r.object(spec, "differencing", "spec.");
  m.spec.differencing = {r.integer(dj, "regular", "spec.differencing."),
                         r.integer(dj, "seasonal", "spec.differencing."),
                         r.integer(dj, "period", "spec.differencing.")};
  const json& nj = r.object(spec, "noise", "spec.");
  m.spec.noise = {r.integer(nj, "p", "spec.noise."), r.integer(nj, "q", "spec.noise."),
                  r.integer(nj, "seasonal_p", "spec.noise."),
                  r.integer(nj, "seasonal_q", "spec.noise."),
                  r.integer(nj, "period", "spec.noise.")};
  m.spec.constant = r.boolean(spec, "constant", "spec.");
  // Files written before the filter start was estimated were fitted from a zero start.
  m.spec.filter_start = spec.contains("filter_start")
                            ? r.choice<FilterStart>(spec, "filter_start", "spec.")
                            : FilterStart::zero;
  // Files written before the restricted objective existed were fitted by ML.
  m.spec.estimation = spec.contains("estimation")
                          ? r.choice<Estimation>(spec, "estimation", "spec.")
                          : Estimation::ml;
  const json& ij = r.list(spec, "inputs", "spec.");
  for (size_t i = 0; i < ij.size(); ++i) {
    const std::string path = fmt::format("spec.inputs[{}].", i);
    const json& e = ij[i];
    InputTerm term{r.text(e, "name", path),
                   {r.integer(e, "delay", path), r.integer(e, "numerator", path),
                    r.integer(e, "denominator", path)}};
    InputUse use;
    use.name = term.name;
    use.is_event = r.boolean(e, "event", path);
    use.future = r.choice<FutureMode>(e, "future", path);
    use.known_steps = r.integer(e, "known_steps", path);
    if (use.is_event) {
      use.shape = r.choice<EventShape>(e, "shape", path);
      use.at = r.text(e, "at", path);
    }
    // Detected effects (files without the field, older ones included, have none).
    if (e.contains("detected"))
      use.effect =
          effect_from_json(e["detected"], fmt::format("{}: model file '{}detected'", source, path));
    m.spec.inputs.push_back(term);
    m.inputs.push_back(use);
  }
  // Orders are checked before they size anything (a negative order would size a vector).
  check_model_spec(m, source);
  const json& pj = r.object(doc, "params", "");
  m.params = zero_params(m.spec);
  m.params.constant = r.number(pj, "constant", "params.");
  m.params.sigma2 = r.number(pj, "sigma2", "params.");
  m.params.phi = r.numbers(pj, "phi", "params.");
  m.params.theta = r.numbers(pj, "theta", "params.");
  m.params.seasonal_phi = r.numbers(pj, "seasonal_phi", "params.");
  m.params.seasonal_theta = r.numbers(pj, "seasonal_theta", "params.");
  const json& pin = r.list(pj, "inputs", "params.");
  if (pin.size() != m.spec.inputs.size())
    r.fail("params.inputs", fmt::format("has {} entries for the {} inputs of spec.inputs",
                                        pin.size(), m.spec.inputs.size()));
  for (size_t i = 0; i < pin.size(); ++i) {
    const std::string path = fmt::format("params.inputs[{}].", i);
    m.params.inputs[i].omega = r.numbers(pin[i], "omega", path);
    m.params.inputs[i].delta = r.numbers(pin[i], "delta", path);
    if (pin[i].contains("state")) m.params.inputs[i].state = r.numbers(pin[i], "state", path);
  }
  const json& cov = r.object(doc, "covariance", "");
  m.param_names = r.texts(cov, "names", "covariance.");
  for (auto& name : m.param_names) name = current_parameter_name(name);  // ar1 -> phi1, ...
  const json& mat = r.list(cov, "matrix", "covariance.");
  const size_t n = m.param_names.size();
  if (mat.size() != n)
    r.fail("covariance.matrix",
           fmt::format("has {} rows for the {} names of covariance.names", mat.size(), n));
  m.covariance.resize(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(n));
  for (size_t i = 0; i < n; ++i) {
    const std::string row = fmt::format("covariance.matrix[{}]", i);
    if (!mat[i].is_array() || mat[i].size() != n)
      r.fail(row, fmt::format("must be a list of {} numbers (null where not estimated)", n));
    for (size_t j = 0; j < n; ++j)
      m.covariance(i, j) =
          mat[i][j].is_null() ? std::nan("") : r.finite(mat[i][j], fmt::format("{}[{}]", row, j));
  }
  const json& imj = r.list(doc, "input_models", "");
  for (size_t k = 0; k < imj.size(); ++k) {
    const std::string path = fmt::format("input_models[{}].", k);
    const json& e = imj[k];
    InputModel im;
    im.input = r.text(e, "input", path);
    im.p = r.integer(e, "p", path);
    im.q = r.integer(e, "q", path);
    im.mean = r.number(e, "mean", path);
    im.phi = r.numbers(e, "phi", path);
    im.theta = r.numbers(e, "theta", path);
    im.sigma2 = r.number(e, "sigma2", path);
    im.aic = r.number(e, "aic", path);
    im.chosen_by_aic = r.boolean(e, "chosen_by_aic", path);
    // Optional (files written before it existed, or an input model fitted without standard
    // errors: an empty list): a square matrix over phi, theta and the mean.
    const bool has_covariance = e.contains("covariance") && !e["covariance"].is_null() &&
                                !(e["covariance"].is_array() && e["covariance"].empty());
    if (has_covariance) {
      const json& ic = r.list(e, "covariance", path);
      // Square; that it is (p + q + 1) wide is checked with the orders (model_checks).
      const size_t size = ic.size();
      im.covariance.resize(static_cast<Eigen::Index>(size), static_cast<Eigen::Index>(size));
      for (size_t i = 0; i < size; ++i) {
        const std::string row = fmt::format("{}covariance[{}]", path, i);
        if (!ic[i].is_array() || ic[i].size() != size)
          r.fail(row, fmt::format("must be a list of {} numbers (null where not estimated)", size));
        for (size_t j = 0; j < size; ++j)
          im.covariance(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) =
              ic[i][j].is_null() ? std::nan("") : r.finite(ic[i][j], fmt::format("{}[{}]", row, j));
      }
    }
    m.input_models.push_back(im);
  }
  const json& fj = r.object(doc, "fit", "");
  m.loglik = r.number(fj, "loglik", "fit.");
  m.aic = r.number(fj, "aic", "fit.");
  m.aicc =
      fj.contains("aicc") && !fj["aicc"].is_null() ? r.number(fj, "aicc", "fit.") : std::nan("");
  m.bic = r.number(fj, "bic", "fit.");
  m.n_obs = r.integer(fj, "n_obs", "fit.");
  m.n_params = r.integer(fj, "n_params", "fit.");
  m.start = r.integer(fj, "start", "fit.");
  m.fit_status = r.text(fj, "status", "fit.");
  const json& tj2 = r.object(doc, "training", "");
  auto& tr = m.training;
  tr.source_file = r.text(tj2, "source_file", "training.");
  tr.target_column = r.text(tj2, "target_column", "training.");
  tr.rows = r.integer(tj2, "rows", "training.");
  tr.first_time = r.text(tj2, "first_time", "training.");
  tr.last_time = r.text(tj2, "last_time", "training.");
  tr.frequency = r.text(tj2, "frequency", "training.");
  tr.time_format = tj2.value("time_format", std::string());  // absent in older model files
  tr.missing_target = tj2.value("missing_target", 0);
  tr.fingerprint = r.text(tj2, "fingerprint", "training.");
  tr.config_file = r.text(tj2, "config_file", "training.");
  tr.config_text = r.text(tj2, "config_text", "training.");
  if (tj2.contains("data") && !tj2["data"].is_null())
    tr.data = training_rows_from_json(r, tj2["data"], tr.rows);  // absent in older model files
  m.backtest = doc.contains("backtest") ? doc["backtest"] : json(nullptr);
  check_fitted_model(m, source);
  return m;
}

void save_model(const std::filesystem::path& path, const FittedModel& model) {
  write_file_atomic(path, to_json(model).dump(2) + "\n");
}

namespace {

// The path ("params.sigma2", "input_models[0].phi[1]") of the first string equal to `mark`.
std::optional<std::string> path_of(const json& j, const std::string& mark, const std::string& at) {
  if (j.is_string() && j.get<std::string>() == mark) return at;
  if (j.is_object()) {
    for (const auto& [key, value] : j.items())
      if (auto p = path_of(value, mark, at.empty() ? key : at + "." + key)) return p;
  } else if (j.is_array()) {
    for (size_t i = 0; i < j.size(); ++i)
      if (auto p = path_of(j[i], mark, fmt::format("{}[{}]", at, i))) return p;
  }
  return std::nullopt;
}

// nlohmann/json refuses a number beyond double (1e400) without saying where it is: put a marker
// string in the first place the number is written, parse again and report the marker's path.
[[noreturn]] void refuse_overflow(std::string text, const std::string& token,
                                  const std::string& source) {
  const auto is_number_char = [](char c) {
    return std::isdigit(static_cast<unsigned char>(c)) || c == '.' || c == 'e' || c == 'E' ||
           c == '+' || c == '-';
  };
  const std::string mark = "\x01lagsieve-overflow";
  for (size_t at = text.find(token); !token.empty() && at != std::string::npos;
       at = text.find(token, at + 1)) {
    const bool starts = at == 0 || !is_number_char(text[at - 1]);
    const size_t after = at + token.size();
    if (!starts || (after < text.size() && is_number_char(text[after]))) continue;
    text.replace(at, token.size(), "\"\\u0001lagsieve-overflow\"");
    const json doc = json::parse(text, nullptr, false);
    if (const auto path = doc.is_discarded() ? std::nullopt : path_of(doc, mark, ""))
      throw InputError(
          fmt::format("{}: model file field '{}' is {}, beyond the range of a "
                      "double; the model file is damaged",
                      source, *path, token));
    break;
  }
  throw InputError(
      fmt::format("{}: not valid JSON (the number {} is beyond the range of a "
                  "double); the model file is damaged",
                  source, token));
}

}  // namespace

FittedModel parse_model_text(const std::string& text, const std::string& source) {
  json doc;
  try {
    doc = json::parse(text);
  } catch (const json::out_of_range& e) {  // a number beyond double: 1e400
    const std::string what = e.what();
    const auto open = what.find('\''), close = what.rfind('\'');
    if (e.id == 406 && open != std::string::npos && close > open)
      refuse_overflow(text, what.substr(open + 1, close - open - 1), source);
    throw InputError(
        fmt::format("{}: not valid JSON ({}); the model file is damaged", source, what));
  } catch (const json::exception& e) {
    throw InputError(
        fmt::format("{}: not valid JSON ({}); the model file is damaged", source, e.what()));
  }
  return fitted_model_from_json(doc, source);
}

FittedModel load_model(const std::filesystem::path& path) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec))
    throw InputError(
        fmt::format("{}: is a folder, not a model file; give the model.json inside "
                    "a run folder",
                    path.string()));
  std::ifstream in(path, std::ios::binary);
  if (!in)
    throw InputError(fmt::format("{}: cannot open the model file; check the path", path.string()));
  std::ostringstream text;
  text << in.rdbuf();
  if (in.bad()) throw InputError(fmt::format("{}: cannot read the model file", path.string()));
  return parse_model_text(text.str(), path.string());
}

json fit_to_json(const FitResult& fit) {
  json j;
  j["label"] = model_label(fit.spec);
  j["status"] = to_string(fit.status);
  j["message"] = fit.message;
  j["converged"] = fit.status == FitStatus::ok || fit.status == FitStatus::boundary;
  j["loglik"] = number_or_null(fit.loglik);
  j["sigma2"] = number_or_null(fit.sigma2);
  j["aic"] = number_or_null(fit.aic);
  j["aicc"] = number_or_null(fit.aicc);
  j["bic"] = number_or_null(fit.bic);
  j["n_obs"] = fit.n_obs;
  j["n_params"] = fit.n_params;
  j["n_params_note"] = "counts every estimated parameter, sigma^2 included";
  j["filter_start"] = to_string(fit.spec.filter_start);
  if (const auto note = filter_start_note(fit.spec); !note.empty()) j["filter_start_note"] = note;
  j["evaluations"] = fit.evaluations;
  j["seconds"] = fit.seconds;
  j["params"] = json::array();
  for (const auto& e : fit.estimates)
    j["params"].push_back(
        {{"name", e.name}, {"value", e.value}, {"std_error", number_or_null(e.std_error)}});
  json d;
  d["ljung_box"] = json::array();
  for (const auto& lb : fit.diagnostics.ljung_box)
    d["ljung_box"].push_back(
        {{"lag", lb.lag}, {"df", lb.df}, {"statistic", lb.statistic}, {"p_value", lb.p_value}});
  d["gains"] = json::array();
  for (const auto& g : fit.diagnostics.gains)
    d["gains"].push_back({{"input", g.input},
                          {"gain", number_or_null(g.gain)},
                          {"std_error", number_or_null(g.std_error)}});
  d["roots"] = json::array();
  for (const auto& r : fit.diagnostics.roots) {
    json roots = json::array();
    for (const auto& z : r.roots) roots.push_back({z.real(), z.imag()});
    d["roots"].push_back(
        {{"polynomial", r.polynomial}, {"min_modulus", r.min_modulus}, {"roots", roots}});
  }
  d["warnings"] = warning_texts(fit.diagnostics.warnings);
  d["warning_codes"] = warnings_json(fit.diagnostics.warnings);
  if (!fit.diagnostics.residual_acf.empty()) {
    // Residual autocorrelation at lags 1..L with the approximate 2/sqrt(n) band.
    const auto& r = fit.diagnostics.residual_acf;
    d["residual_acf"] = {
        {"lags", json::array()}, {"values", r}, {"band", fit.diagnostics.residual_acf_band}};
    for (size_t k = 1; k <= r.size(); ++k) d["residual_acf"]["lags"].push_back(k);
  }
  // Residuals against each input (prewhitened unless an event or an indicator column): lags
  // -L..L (input at t-k against residual at t), the portmanteau over lags 0..L. A reader of an
  // older file without "prewhitened" takes every input as prewhitened (it was, then).
  d["residual_input_ccf"] = json::array();
  for (const auto& c : fit.diagnostics.residual_input) {
    json e = {{"input", c.input},
              {"input_kind", c.kind.is_event                               ? "event"
                             : c.kind.indicator != IndicatorShape::none ? "indicator"
                                                                         : "column"},
              {"prewhitened", c.prewhitened},
              {"lags", c.lags},
              {"values", c.values},
              {"band", c.band},
              {"statistic", c.statistic},
              {"df", c.df},
              {"p_value", c.p_value},
              {"ar_order", c.ar_order},
              {"extra_differences", c.extra_differences},
              {"n", c.n},
              {"largest_lag", c.largest_lag}};
    if (c.kind.indicator != IndicatorShape::none)
      e["indicator_shape"] = std::string(to_string(c.kind.indicator));
    d["residual_input_ccf"].push_back(std::move(e));
  }
  j["diagnostics"] = d;
  return j;
}

}  // namespace lagsieve
