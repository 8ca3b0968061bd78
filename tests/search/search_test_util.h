#pragma once
// Helpers of the search tests: run configs built in code around a simulated truth, and the
// simulated data written as CSV for runs of the binary.
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "core/config.h"
#include "core/series.h"
#include "model/simulate.h"
#include "run_binary.h"

namespace lagsieve::testing {

// One simulated input and the ranges the search may try for it.
struct CaseInput {
  std::string name;
  InputOrder truth;              // ignored when the input is irrelevant
  std::vector<double> omega;     // all zero: an irrelevant input
  std::vector<double> delta;
  double ar = 0.5;               // AR(1) of the input series
  IntRange delay, numerator, denominator;
  bool optional = false;

  bool relevant() const {
    for (double w : omega)
      if (w != 0.0) return true;
    return false;
  }
};

struct SearchCase {
  std::string name;
  int n = 500;
  std::uint64_t seed = 1;
  std::vector<CaseInput> inputs;
  NoiseOrder noise;              // true noise orders
  std::vector<double> phi, theta;
  IntRange ar, ma;               // noise ranges of the search
  double constant = 1.0;
};

inline SimulationSpec simulation_of(const SearchCase& c) {
  SimulationSpec sim;
  sim.n = c.n;
  sim.seed = c.seed;
  sim.noise = c.noise;
  sim.phi = c.phi;
  sim.theta = c.theta;
  sim.constant = c.constant;
  sim.sigma = 1.0;
  for (const auto& in : c.inputs) {
    SimulatedInput s;
    s.name = in.name;
    s.order = in.relevant() ? in.truth : InputOrder{0, 0, 0};
    s.params.omega = in.relevant() ? in.omega : std::vector<double>{0.0};
    s.params.delta = in.relevant() ? in.delta : std::vector<double>{};
    s.ar = in.ar;
    s.sd = 1.0;
    sim.inputs.push_back(s);
  }
  return sim;
}

inline RunConfig config_of(const SearchCase& c, int threads) {
  RunConfig config;
  config.config_file = c.name + ".yaml";  // only named in messages
  config.target.columns = {"y"};
  for (const auto& in : c.inputs) {
    InputConfig ic;
    ic.name = in.name;
    ic.delay = in.delay;
    ic.numerator = in.numerator;
    ic.denominator = in.denominator;
    ic.optional = in.optional;
    config.inputs.push_back(ic);
  }
  config.noise.ar = c.ar;
  config.noise.ma = c.ma;
  config.noise.constant = ConstantMode::yes;
  config.search.strategy = Strategy::exhaustive;
  config.search.criterion = Criterion::bic;
  config.search.threads = threads;
  return config;
}

}  // namespace lagsieve::testing
