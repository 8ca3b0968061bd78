#pragma once
// Simulation of a transfer-function model with known structure: the demo data generator, the
// `lagsieve simulate` command and the seeded recovery tests all use it.
#include <cstdint>
#include <string>
#include <vector>

#include "core/config.h"
#include "core/series.h"
#include "core/spec.h"
#include "model/params.h"

namespace lagsieve {

struct SimulatedInput {
  std::string name;
  InputOrder order;    // b, s, r of the true transfer function
  InputParams params;  // omega (all zero: an irrelevant input), delta
  // Column inputs: mean + AR(1)(ar) with innovation sd `sd`, plus an optional deterministic
  // cycle cycle_amplitude * cos(2 pi (row - cycle_peak) / cycle_period) (a yearly temperature
  // swing, say). Rows count from the first output row; the burn-in has negative rows.
  double mean = 0.0;
  double ar = 0.5;
  double sd = 1.0;
  double cycle_amplitude = 0.0;  // 0 = no cycle
  double cycle_period = 0.0;     // rows per cycle; must be > 0 when the amplitude is not 0
  double cycle_peak = 0.0;       // a row where the cycle is at its maximum
  // Event inputs: event_values(shape, at_row, n) (data/events.h), no randomness. The event is
  // defined on the output (integrated) scale, as a config regenerates it from the data.
  bool is_event = false;
  EventShape shape = EventShape::step;
  int at_row = 0;  // 0-based output row where the event starts
};

// How `simulate` stamps its rows when a start date is given.
enum class SimulatedFrequency { daily, weekly };

struct SimulationSpec {
  std::string target = "y";  // name of the simulated target series
  int n = 500;
  std::uint64_t seed = 1;
  std::vector<SimulatedInput> inputs;
  NoiseOrder noise;
  std::vector<double> phi, theta, seasonal_phi, seasonal_theta;
  double sigma = 1.0;  // innovation standard deviation of the noise
  double constant = 0.0;
  Differencing integrate;  // the target is integrated by this after simulation
  int burn_in = 300;       // discarded start, so the series begin in steady state
  std::string start_date;  // YYYY-MM-DD of the first row; "" = integer stamps 1..n
  SimulatedFrequency frequency = SimulatedFrequency::daily;
};

// Target = constant + sum of transfer-function terms + ARMA noise, then integrated; the column
// inputs are integrated the same way so the model holds between the differenced series, and
// event inputs enter through their differenced values (so the same holds for them). Returns
// every input, events included, in spec order. Deterministic for a given seed on every platform
// (own generator, no std::normal_distribution); events and cycles draw no random numbers, so
// adding one leaves the other series of a seed unchanged. Throws InputError for an invalid spec
// (non-stationary noise AR, unstable delta, |ar| >= 1 of an input, bad date, ...).
SeriesData simulate(const SimulationSpec& spec);

// `n` stamps from `start_date` (YYYY-MM-DD) at `frequency`, as YYYY-MM-DD. Throws InputError for
// a date that does not exist.
std::vector<std::string> simulated_stamps(const std::string& start_date,
                                          SimulatedFrequency frequency, int n);

}  // namespace lagsieve
