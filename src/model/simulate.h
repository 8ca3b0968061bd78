#pragma once
// Simulation of a transfer-function model with known structure: the demo data generator, the
// `lagsieve simulate` command and the seeded recovery tests all use it.
#include <cstdint>
#include <string>
#include <vector>

#include "core/series.h"
#include "core/spec.h"
#include "model/params.h"

namespace lagsieve {

struct SimulatedInput {
  std::string name;
  InputOrder order;            // b, s, r of the true transfer function
  InputParams params;          // omega (all zero: an irrelevant input), delta
  double mean = 0.0;           // the input is mean + AR(1)(ar) with innovation sd `sd`
  double ar = 0.5;
  double sd = 1.0;
};

struct SimulationSpec {
  int n = 500;
  std::uint64_t seed = 1;
  std::vector<SimulatedInput> inputs;
  NoiseOrder noise;
  std::vector<double> phi, theta, seasonal_phi, seasonal_theta;
  double sigma = 1.0;          // innovation standard deviation of the noise
  double constant = 0.0;
  Differencing integrate;      // the target is integrated by this after simulation
  int burn_in = 300;           // discarded start, so the series begin in steady state
};

// Target = constant + sum of transfer-function terms + ARMA noise, then integrated; the inputs
// are integrated the same way so the model holds between the differenced series. Deterministic
// for a given seed on every platform (own generator, no std::normal_distribution).
SeriesData simulate(const SimulationSpec& spec);

}  // namespace lagsieve
