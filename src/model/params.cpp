#include "model/params.h"

namespace lagsieve {

ModelParams zero_params(const ModelSpec& spec) {
  ModelParams p;
  for (size_t i = 0; i < spec.inputs.size(); ++i) {
    const auto& order = spec.inputs[i].order;
    p.inputs.push_back({std::vector<double>(order.numerator + 1, 0.0),
                        std::vector<double>(order.denominator, 0.0),
                        std::vector<double>(spec.start_states(i), 0.0)});
  }
  p.phi.assign(spec.noise.p, 0.0);
  p.theta.assign(spec.noise.q, 0.0);
  p.seasonal_phi.assign(spec.noise.seasonal_p, 0.0);
  p.seasonal_theta.assign(spec.noise.seasonal_q, 0.0);
  return p;
}

std::string current_parameter_name(const std::string& name) {
  static const std::pair<const char*, const char*> kOld[] = {
      {"sar", "Phi"}, {"sma", "Theta"}, {"ar", "phi"}, {"ma", "theta"}};
  for (const auto& [old, now] : kOld) {
    const std::string prefix(old);
    if (name.size() > prefix.size() && name.compare(0, prefix.size(), prefix) == 0 &&
        name.find_first_not_of("0123456789", prefix.size()) == std::string::npos)
      return now + name.substr(prefix.size());
  }
  return name;
}

}  // namespace lagsieve
