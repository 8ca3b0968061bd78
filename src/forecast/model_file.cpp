#include "forecast/model_file.h"

#include <cmath>
#include <fmt/format.h>
#include <fstream>

#include "core/error.h"
#include "core/names.h"
#include "io/atomic_file.h"
#include "model/spec_from_config.h"
#include "outliers/json.h"

namespace lagsieve {

using nlohmann::json;

namespace {

json number_or_null(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

// Reads a field, refusing absent fields and non-finite numbers with a message naming both.
class Reader {
 public:
  explicit Reader(std::string source) : source_(std::move(source)) {}

  const json& at(const json& j, const std::string& key, const std::string& path) const {
    if (!j.is_object() || !j.contains(key))
      throw InputError(fmt::format("{}: model file field '{}{}' is missing; the file is "
                                   "incomplete or not a lagsieve model file",
                                   source_, path, key));
    return j.at(key);
  }
  double number(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_number() || !std::isfinite(v.get<double>()))
      throw InputError(fmt::format("{}: model file field '{}{}' must be a finite number", source_,
                                   path, key));
    return v.get<double>();
  }
  int integer(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_number_integer())
      throw InputError(fmt::format("{}: model file field '{}{}' must be an integer", source_, path, key));
    return v.get<int>();
  }
  std::string text(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_string())
      throw InputError(fmt::format("{}: model file field '{}{}' must be a string", source_, path, key));
    return v.get<std::string>();
  }
  std::vector<double> numbers(const json& j, const std::string& key, const std::string& path) const {
    const json& v = at(j, key, path);
    if (!v.is_array())
      throw InputError(fmt::format("{}: model file field '{}{}' must be a list", source_, path, key));
    std::vector<double> out;
    for (size_t i = 0; i < v.size(); ++i) {
      if (!v[i].is_number() || !std::isfinite(v[i].get<double>()))
        throw InputError(fmt::format("{}: model file field '{}{}[{}]' must be a finite number",
                                     source_, path, key, i));
      out.push_back(v[i].get<double>());
    }
    return out;
  }
  template <typename Enum>
  Enum choice(const json& j, const std::string& key, const std::string& path) const {
    const auto s = text(j, key, path);
    const auto v = parse_enum<Enum>(s);
    if (!v)
      throw InputError(fmt::format("{}: model file field '{}{}' has the unknown value '{}'",
                                   source_, path, key, s));
    return *v;
  }

 private:
  std::string source_;
};

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
  for (const auto& ip : p.inputs) params["inputs"].push_back({{"omega", ip.omega}, {"delta", ip.delta}});
  doc["params"] = params;
  json cov = json::array();
  for (Eigen::Index i = 0; i < m.covariance.rows(); ++i) {
    json row = json::array();
    for (Eigen::Index j = 0; j < m.covariance.cols(); ++j) row.push_back(number_or_null(m.covariance(i, j)));
    cov.push_back(row);
  }
  doc["covariance"] = {{"names", m.param_names}, {"matrix", cov}};
  doc["input_models"] = json::array();
  for (const auto& im : m.input_models)
    doc["input_models"].push_back({{"input", im.input},
                                   {"p", im.p},
                                   {"q", im.q},
                                   {"mean", im.mean},
                                   {"phi", im.phi},
                                   {"theta", im.theta},
                                   {"sigma2", im.sigma2},
                                   {"aic", im.aic},
                                   {"chosen_by_aic", im.chosen_by_aic}});
  doc["fit"] = {{"loglik", m.loglik}, {"aic", m.aic},           {"aicc", number_or_null(m.aicc)},
                {"bic", m.bic},       {"n_obs", m.n_obs},       {"n_params", m.n_params},
                {"start", m.start},   {"status", m.fit_status}};
  const auto& tr = m.training;
  doc["training"] = {{"source_file", tr.source_file}, {"target_column", tr.target_column},
                     {"rows", tr.rows},               {"first_time", tr.first_time},
                     {"last_time", tr.last_time},     {"frequency", tr.frequency},
                     {"fingerprint", tr.fingerprint}, {"config_file", tr.config_file},
                     {"config_text", tr.config_text}};
  doc["backtest"] = m.backtest;
  return doc;
}

FittedModel fitted_model_from_json(const json& doc, const std::string& source) {
  const Reader r(source);
  if (!doc.is_object() || !doc.contains("format") || doc["format"] != kModelFormat)
    throw InputError(fmt::format("{}: not a lagsieve model file (no \"format\": \"{}\")", source,
                                 kModelFormat));
  const int version = r.integer(doc, "version", "");
  if (version != kModelFormatVersion)
    throw InputError(fmt::format("{}: model file version {} is not supported (this lagsieve reads "
                                 "version {}); re-fit the model with this version",
                                 source, version, kModelFormatVersion));
  FittedModel m;
  const json& spec = r.at(doc, "spec", "");
  const json& tj = r.at(spec, "transform", "spec.");
  m.spec.transform.kind = r.choice<TransformKind>(tj, "kind", "spec.transform.");
  m.spec.transform.lambda = r.number(tj, "lambda", "spec.transform.");
  const json& dj = r.at(spec, "differencing", "spec.");
  m.spec.differencing = {r.integer(dj, "regular", "spec.differencing."),
                         r.integer(dj, "seasonal", "spec.differencing."),
                         r.integer(dj, "period", "spec.differencing.")};
  const json& nj = r.at(spec, "noise", "spec.");
  m.spec.noise = {r.integer(nj, "p", "spec.noise."), r.integer(nj, "q", "spec.noise."),
                  r.integer(nj, "seasonal_p", "spec.noise."), r.integer(nj, "seasonal_q", "spec.noise."),
                  r.integer(nj, "period", "spec.noise.")};
  const json& cj = r.at(spec, "constant", "spec.");
  if (!cj.is_boolean()) throw InputError(fmt::format("{}: model file field 'spec.constant' must be true or false", source));
  m.spec.constant = cj.get<bool>();
  const json& ij = r.at(spec, "inputs", "spec.");
  for (size_t i = 0; i < ij.size(); ++i) {
    const std::string path = fmt::format("spec.inputs[{}].", i);
    const json& e = ij[i];
    InputTerm term{r.text(e, "name", path),
                   {r.integer(e, "delay", path), r.integer(e, "numerator", path),
                    r.integer(e, "denominator", path)}};
    InputUse use;
    use.name = term.name;
    use.is_event = r.at(e, "event", path).get<bool>();
    use.future = r.choice<FutureMode>(e, "future", path);
    use.known_steps = r.integer(e, "known_steps", path);
    if (use.is_event) {
      use.shape = r.choice<EventShape>(e, "shape", path);
      use.at = r.text(e, "at", path);
    }
    // Detected effects (files without the field, older ones included, have none).
    if (e.contains("detected"))
      use.effect = effect_from_json(e["detected"], fmt::format("{}: model file '{}detected'",
                                                               source, path));
    m.spec.inputs.push_back(term);
    m.inputs.push_back(use);
  }
  const json& pj = r.at(doc, "params", "");
  m.params = zero_params(m.spec);
  m.params.constant = r.number(pj, "constant", "params.");
  m.params.sigma2 = r.number(pj, "sigma2", "params.");
  m.params.phi = r.numbers(pj, "phi", "params.");
  m.params.theta = r.numbers(pj, "theta", "params.");
  m.params.seasonal_phi = r.numbers(pj, "seasonal_phi", "params.");
  m.params.seasonal_theta = r.numbers(pj, "seasonal_theta", "params.");
  const json& pin = r.at(pj, "inputs", "params.");
  if (pin.size() != m.spec.inputs.size())
    throw InputError(fmt::format("{}: model file has {} input parameter sets for {} inputs", source,
                                 pin.size(), m.spec.inputs.size()));
  for (size_t i = 0; i < pin.size(); ++i) {
    const std::string path = fmt::format("params.inputs[{}].", i);
    m.params.inputs[i].omega = r.numbers(pin[i], "omega", path);
    m.params.inputs[i].delta = r.numbers(pin[i], "delta", path);
    if (static_cast<int>(m.params.inputs[i].omega.size()) != m.spec.inputs[i].order.numerator + 1 ||
        static_cast<int>(m.params.inputs[i].delta.size()) != m.spec.inputs[i].order.denominator)
      throw InputError(fmt::format("{}: model file '{}' does not match the orders of input '{}'",
                                   source, path, m.spec.inputs[i].name));
  }
  if (static_cast<int>(m.params.phi.size()) != m.spec.noise.p ||
      static_cast<int>(m.params.theta.size()) != m.spec.noise.q ||
      static_cast<int>(m.params.seasonal_phi.size()) != m.spec.noise.seasonal_p ||
      static_cast<int>(m.params.seasonal_theta.size()) != m.spec.noise.seasonal_q)
    throw InputError(fmt::format("{}: model file ARMA coefficients do not match spec.noise", source));
  const json& cov = r.at(doc, "covariance", "");
  m.param_names = r.at(cov, "names", "covariance.").get<std::vector<std::string>>();
  const json& mat = r.at(cov, "matrix", "covariance.");
  m.covariance.resize(static_cast<Eigen::Index>(mat.size()), static_cast<Eigen::Index>(mat.size()));
  for (size_t i = 0; i < mat.size(); ++i)
    for (size_t j = 0; j < mat.size(); ++j)
      m.covariance(i, j) = mat[i][j].is_number() ? mat[i][j].get<double>() : std::nan("");
  for (const auto& e : r.at(doc, "input_models", "")) {
    InputModel im;
    im.input = r.text(e, "input", "input_models[].");
    im.p = r.integer(e, "p", "input_models[].");
    im.q = r.integer(e, "q", "input_models[].");
    im.mean = r.number(e, "mean", "input_models[].");
    im.phi = r.numbers(e, "phi", "input_models[].");
    im.theta = r.numbers(e, "theta", "input_models[].");
    im.sigma2 = r.number(e, "sigma2", "input_models[].");
    im.aic = r.number(e, "aic", "input_models[].");
    im.chosen_by_aic = r.at(e, "chosen_by_aic", "input_models[].").get<bool>();
    m.input_models.push_back(im);
  }
  const json& fj = r.at(doc, "fit", "");
  m.loglik = r.number(fj, "loglik", "fit.");
  m.aic = r.number(fj, "aic", "fit.");
  m.aicc = fj.contains("aicc") && fj["aicc"].is_number() ? fj["aicc"].get<double>() : std::nan("");
  m.bic = r.number(fj, "bic", "fit.");
  m.n_obs = r.integer(fj, "n_obs", "fit.");
  m.n_params = r.integer(fj, "n_params", "fit.");
  m.start = r.integer(fj, "start", "fit.");
  m.fit_status = r.text(fj, "status", "fit.");
  const json& tj2 = r.at(doc, "training", "");
  auto& tr = m.training;
  tr.source_file = r.text(tj2, "source_file", "training.");
  tr.target_column = r.text(tj2, "target_column", "training.");
  tr.rows = r.integer(tj2, "rows", "training.");
  tr.first_time = r.text(tj2, "first_time", "training.");
  tr.last_time = r.text(tj2, "last_time", "training.");
  tr.frequency = r.text(tj2, "frequency", "training.");
  tr.fingerprint = r.text(tj2, "fingerprint", "training.");
  tr.config_file = r.text(tj2, "config_file", "training.");
  tr.config_text = r.text(tj2, "config_text", "training.");
  m.backtest = doc.contains("backtest") ? doc["backtest"] : json(nullptr);
  return m;
}

void save_model(const std::filesystem::path& path, const FittedModel& model) {
  write_file_atomic(path, to_json(model).dump(2) + "\n");
}

FittedModel load_model(const std::filesystem::path& path) {
  std::ifstream in(path);
  if (!in)
    throw InputError(fmt::format("{}: cannot open the model file; check the path", path.string()));
  json doc;
  try {
    doc = json::parse(in);
  } catch (const json::parse_error& e) {
    throw InputError(fmt::format("{}: not valid JSON ({}); the model file is damaged",
                                 path.string(), e.what()));
  }
  return fitted_model_from_json(doc, path.string());
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
  j["evaluations"] = fit.evaluations;
  j["seconds"] = fit.seconds;
  j["params"] = json::array();
  for (const auto& e : fit.estimates)
    j["params"].push_back({{"name", e.name}, {"value", e.value}, {"std_error", number_or_null(e.std_error)}});
  json d;
  d["ljung_box"] = json::array();
  for (const auto& lb : fit.diagnostics.ljung_box)
    d["ljung_box"].push_back({{"lag", lb.lag}, {"df", lb.df}, {"statistic", lb.statistic}, {"p_value", lb.p_value}});
  d["gains"] = json::array();
  for (const auto& g : fit.diagnostics.gains)
    d["gains"].push_back({{"input", g.input}, {"gain", number_or_null(g.gain)}, {"std_error", number_or_null(g.std_error)}});
  d["roots"] = json::array();
  for (const auto& r : fit.diagnostics.roots) {
    json roots = json::array();
    for (const auto& z : r.roots) roots.push_back({z.real(), z.imag()});
    d["roots"].push_back({{"polynomial", r.polynomial}, {"min_modulus", r.min_modulus}, {"roots", roots}});
  }
  d["warnings"] = fit.diagnostics.warnings;
  if (!fit.diagnostics.residual_acf.empty()) {
    // Residual autocorrelation at lags 1..L with the approximate 2/sqrt(n) band.
    const auto& r = fit.diagnostics.residual_acf;
    d["residual_acf"] = {{"lags", json::array()}, {"values", r}, {"band", fit.diagnostics.residual_acf_band}};
    for (size_t k = 1; k <= r.size(); ++k) d["residual_acf"]["lags"].push_back(k);
  }
  // Residuals against each prewhitened input: lags -L..L (input at t-k against residual at t),
  // the portmanteau over lags 0..L.
  d["residual_input_ccf"] = json::array();
  for (const auto& c : fit.diagnostics.residual_input)
    d["residual_input_ccf"].push_back({{"input", c.input},
                                       {"lags", c.lags},
                                       {"values", c.values},
                                       {"band", c.band},
                                       {"statistic", c.statistic},
                                       {"df", c.df},
                                       {"p_value", c.p_value},
                                       {"ar_order", c.ar_order},
                                       {"n", c.n},
                                       {"largest_lag", c.largest_lag}});
  j["diagnostics"] = d;
  return j;
}

}  // namespace lagsieve
