#include "model/spec_from_config.h"

#include <fmt/format.h>

#include "core/error.h"

namespace lagsieve {

namespace {

int single(const IntRange& range, const std::string& key) {
  if (range.min != range.max)
    throw InputError(fmt::format(
        "{} is a range [{}, {}]; `fit` estimates one model, so give a single number (or run "
        "`lagsieve search` to compare the range)",
        key, range.min, range.max));
  return range.min;
}

}  // namespace

ModelSpec single_spec(const RunConfig& config) {
  ModelSpec spec;
  for (size_t i = 0; i < config.inputs.size(); ++i) {
    const auto& in = config.inputs[i];
    const std::string key = fmt::format("{}: inputs[{}]", config.config_file.filename().string(), i);
    spec.inputs.push_back({in.name,
                           {single(in.delay, key + ".delay"), single(in.numerator, key + ".numerator"),
                            single(in.denominator, key + ".denominator")}});
  }
  const std::string noise = config.config_file.filename().string() + ": noise";
  spec.noise.p = single(config.noise.ar, noise + ".ar");
  spec.noise.q = single(config.noise.ma, noise + ".ma");
  spec.noise.seasonal_p = single(config.noise.seasonal_ar, noise + ".seasonal_ar");
  spec.noise.seasonal_q = single(config.noise.seasonal_ma, noise + ".seasonal_ma");
  spec.noise.period = config.noise.period;
  spec.constant = config.noise.constant != ConstantMode::no;
  spec.differencing = config.differencing;
  spec.transform = config.target.transform;
  spec.filter_start = config.fit.filter_start;
  spec.estimation = config.fit.estimation;
  return spec;
}

std::string filter_start_note(const ModelSpec& spec) {
  int with_denominator = 0, states = 0;
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    with_denominator += spec.inputs[i].order.denominator > 0 ? 1 : 0;
    states += spec.start_states(i);
  }
  if (with_denominator == 0) return {};
  if (spec.filter_start == FilterStart::zero)
    return "filter start: zero (each 1/delta(B) starts from zeros before the first differenced "
           "row; fit.filter_start: zero)";
  return fmt::format(
      "filter start: estimated; k counts {} start state{} of 1/delta(B) (the inputs' effect "
      "from before the data at the first rows of the sample; fit.filter_start: zero leaves "
      "them out)",
      states, states == 1 ? "" : "s");
}

std::string model_label(const ModelSpec& spec) {
  std::string label;
  for (const auto& term : spec.inputs) {
    if (!label.empty()) label += " + ";
    const auto& o = term.order;
    label += fmt::format("{}[b{}", term.name, o.delay);
    if (o.numerator > 0) label += fmt::format(" s{}", o.numerator);
    if (o.denominator > 0) label += fmt::format(" r{}", o.denominator);
    label += "]";
  }
  if (label.empty()) label = "no inputs";
  const auto& n = spec.noise;
  label += fmt::format(" ~ ({},{})", n.p, n.q);
  if (n.seasonal_p + n.seasonal_q > 0)
    label += fmt::format("({},{}){}", n.seasonal_p, n.seasonal_q, n.period);
  if (spec.constant) label += " +c";
  return label;
}

}  // namespace lagsieve
