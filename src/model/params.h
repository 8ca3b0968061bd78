#pragma once
// Parameter values of one model in natural coordinates (the signs of core/spec.h).
#include <string>
#include <vector>

#include "core/spec.h"

namespace lagsieve {

struct InputParams {
  std::vector<double> omega;  // omega_0..omega_s
  std::vector<double> delta;  // delta_1..delta_r
  // Estimated start of 1/delta(B) (FilterStart::estimated): the transfer-function output's part
  // from before the sample at the first r rows of the likelihood sample; empty = zero start.
  std::vector<double> state = {};
};

struct ModelParams {
  double constant = 0.0;
  std::vector<InputParams> inputs;     // same order as ModelSpec::inputs
  std::vector<double> phi;             // phi_1..phi_p
  std::vector<double> theta;           // theta_1..theta_q
  std::vector<double> seasonal_phi;    // Phi_1..Phi_P
  std::vector<double> seasonal_theta;  // Theta_1..Theta_Q
  double sigma2 = 1.0;
};

// Zero-valued parameters of the right shape for `spec`.
ModelParams zero_params(const ModelSpec& spec);

// Parameter names follow core/spec.h: phi1.., theta1.., Phi1.., Theta1.. for the noise, then
// <input>.delta1.., <input>.omega0.., constant. Files written before used ar1, ma1, sar1 and
// sma1; this maps those to today's names (any other name is returned unchanged).
std::string current_parameter_name(const std::string& name);

}  // namespace lagsieve
