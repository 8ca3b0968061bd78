// The data generator: determinism, exact event and cycle values, the moments of simulated series
// against their closed forms, the spec parser's messages and the CSV it leads to.
#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <numeric>
#include <string>
#include <vector>

#include "core/error.h"
#include "data/events.h"
#include "data/transform.h"
#include "io/simulation_spec.h"
#include "model/simulate.h"

namespace lagsieve {
namespace {

double mean_of(const std::vector<double>& x) {
  return std::accumulate(x.begin(), x.end(), 0.0) / static_cast<double>(x.size());
}

// Sample autocovariance at `lag` (divisor n), of x against y shifted back by `lag`.
double cross_cov(const std::vector<double>& x, const std::vector<double>& y, int lag) {
  const double mx = mean_of(x), my = mean_of(y);
  double s = 0.0;
  for (size_t t = static_cast<size_t>(lag); t < x.size(); ++t)
    s += (x[t] - mx) * (y[t - static_cast<size_t>(lag)] - my);
  return s / static_cast<double>(x.size());
}

SimulatedInput ar1_input(const std::string& name, double mean, double ar, double sd) {
  SimulatedInput in;
  in.name = name;
  in.mean = mean;
  in.ar = ar;
  in.sd = sd;
  in.params.omega = {0.0};
  return in;
}

SimulatedInput event_input(const std::string& name, EventShape shape, int row) {
  SimulatedInput in;
  in.name = name;
  in.is_event = true;
  in.shape = shape;
  in.at_row = row;
  in.params.omega = {0.0};
  return in;
}

SimulationSpec small_spec(std::uint64_t seed) {
  SimulationSpec spec;
  spec.n = 300;
  spec.seed = seed;
  spec.phi = {0.5};
  spec.theta = {0.2};
  spec.noise = {1, 1, 0, 0, 1};
  auto x = ar1_input("x", 1.0, 0.6, 1.0);
  x.order = {2, 0, 1};
  x.params = {{1.5}, {0.4}};
  auto shift = event_input("shift", EventShape::step, 100);
  shift.params.omega = {4.0};
  spec.inputs = {x, shift};
  return spec;
}

TEST(Simulate, SameSeedSameSeriesOtherSeedOtherSeries) {
  const auto a = simulate(small_spec(7));
  const auto b = simulate(small_spec(7));
  const auto c = simulate(small_spec(8));
  EXPECT_EQ(a.target, b.target);  // bit-identical, not just close
  EXPECT_EQ(a.inputs, b.inputs);
  EXPECT_EQ(a.time, b.time);
  EXPECT_NE(a.target, c.target);
  EXPECT_NE(a.inputs[0], c.inputs[0]);
  ASSERT_EQ(a.input_names, (std::vector<std::string>{"x", "shift"}));
  EXPECT_EQ(a.rows(), 300);
  EXPECT_EQ(a.time.front(), "1");
  EXPECT_EQ(a.time.back(), "300");
}

TEST(Simulate, EventsAndCyclesDrawNoRandomNumbers) {
  // Dropping the event leaves the random input unchanged and moves the target only from the
  // event row on; adding a cycle to the input changes it by exactly the cycle.
  auto with = small_spec(3);
  auto without = small_spec(3);
  without.inputs.pop_back();
  const auto a = simulate(with), b = simulate(without);
  EXPECT_EQ(a.inputs[0], b.inputs[0]);
  for (int t = 0; t < 100; ++t) EXPECT_EQ(a.target[t], b.target[t]) << t;
  for (int t = 100; t < 300; ++t) EXPECT_NEAR(a.target[t] - b.target[t], 4.0, 1e-12) << t;
  auto cycled = without;
  cycled.inputs[0].cycle_amplitude = 2.0;
  cycled.inputs[0].cycle_period = 10.0;
  const auto c = simulate(cycled);
  for (int t = 0; t < 300; ++t)
    EXPECT_NEAR(c.inputs[0][t] - b.inputs[0][t], 2.0 * std::cos(2.0 * std::numbers::pi * t / 10.0),
                1e-12)
        << t;
}

TEST(Simulate, EventValuesAreExact) {
  SimulationSpec spec;
  spec.n = 40;
  spec.inputs = {event_input("p", EventShape::pulse, 5), event_input("s", EventShape::step, 10),
                 event_input("r", EventShape::ramp, 30)};
  const auto data = simulate(spec);
  EXPECT_EQ(data.inputs[0], event_values(EventShape::pulse, 5, 40));
  EXPECT_EQ(data.inputs[1], event_values(EventShape::step, 10, 40));
  EXPECT_EQ(data.inputs[2], event_values(EventShape::ramp, 30, 40));
  EXPECT_EQ(data.inputs[2][39], 9.0);
  // Integrated data keep the event on the scale a config regenerates it on.
  spec.integrate = {1, 1, 4};
  const auto integrated = simulate(spec);
  EXPECT_EQ(integrated.inputs[1], event_values(EventShape::step, 10, 40));
  EXPECT_EQ(integrated.inputs[2], event_values(EventShape::ramp, 30, 40));
}

TEST(Simulate, StepResponseMatchesClosedForm) {
  // No noise: y_t = 50 + [3 B^2 / (1 - 0.5 B)] step_t, so for m = t - row - 2 >= 0
  // y_t = 50 + 3 (1 - 0.5^(m+1)) / (1 - 0.5).
  SimulationSpec spec;
  spec.n = 60;
  spec.sigma = 0.0;
  spec.constant = 50.0;
  auto step = event_input("step", EventShape::step, 20);
  step.order = {2, 0, 1};
  step.params = {{3.0}, {0.5}};
  spec.inputs = {step};
  const auto data = simulate(spec);
  for (int t = 0; t < 60; ++t) {
    const int m = t - 22;
    const double expected = m < 0 ? 50.0 : 50.0 + 3.0 * (1.0 - std::pow(0.5, m + 1)) / 0.5;
    EXPECT_NEAR(data.target[t], expected, 1e-12) << t;
  }
  // Integrated once, the model holds between differences: the step's difference is a pulse, so
  // y_t - y_{t-1} = 3 * 0.5^m from t = row + 2 on and 0 before.
  spec.integrate = {1, 0, 1};
  spec.constant = 0.0;
  const auto integrated = simulate(spec);
  for (int t = 1; t < 60; ++t) {
    const int m = t - 22;
    const double expected = m < 0 ? 0.0 : 3.0 * std::pow(0.5, m);
    EXPECT_NEAR(integrated.target[t] - integrated.target[t - 1], expected, 1e-12) << t;
  }
}

TEST(Simulate, CycleIsTheStatedCosine) {
  SimulationSpec spec;
  spec.n = 400;
  auto temp = ar1_input("temp", 9.0, 0.0, 0.0);
  temp.cycle_amplitude = 8.0;
  temp.cycle_period = 365.25;
  temp.cycle_peak = 196.0;
  spec.inputs = {temp};
  const auto data = simulate(spec);
  for (int t = 0; t < 400; ++t)
    EXPECT_NEAR(data.inputs[0][t],
                9.0 + 8.0 * std::cos(2.0 * std::numbers::pi * (t - 196.0) / 365.25), 1e-12);
  EXPECT_NEAR(data.inputs[0][196], 17.0, 1e-12);
}

TEST(Simulate, DateStamps) {
  EXPECT_EQ(simulated_stamps("2024-02-27", SimulatedFrequency::daily, 4),
            (std::vector<std::string>{"2024-02-27", "2024-02-28", "2024-02-29", "2024-03-01"}));
  EXPECT_EQ(simulated_stamps("2023-12-25", SimulatedFrequency::weekly, 3),
            (std::vector<std::string>{"2023-12-25", "2024-01-01", "2024-01-08"}));
  SimulationSpec spec;
  spec.n = 1096;
  spec.start_date = "2022-01-01";
  const auto data = simulate(spec);
  EXPECT_EQ(data.time.back(), "2024-12-31");
  spec.start_date = "2023-02-29";
  EXPECT_THROW(simulate(spec), InputError);
}

TEST(Simulate, AR1InputAndTargetMomentsMatchTheory) {
  // u_t = 5 + AR(1) with phi 0.8, innovation sd 2: E u = 5, var u = 4 / (1 - 0.64), lag-1
  // autocorrelation 0.8. y_t = 10 + 2 u_{t-1} + a_t (sd 1): E y = 20, var y = 4 var u + 1,
  // corr(y_t, u_{t-1}) = 2 var u / sqrt(var y var u), corr(y_t, u_t) = 0.8 times that.
  // n = 20000; tolerances are about 4 standard errors of each sample statistic.
  SimulationSpec spec;
  spec.n = 20000;
  spec.seed = 11;
  spec.constant = 10.0;
  auto u = ar1_input("u", 5.0, 0.8, 2.0);
  u.order = {1, 0, 0};
  u.params.omega = {2.0};
  spec.inputs = {u};
  const auto data = simulate(spec);
  const auto& x = data.inputs[0];
  const auto& y = data.target;
  const double var_u = 4.0 / (1.0 - 0.64);
  const double var_y = 4.0 * var_u + 1.0;
  EXPECT_NEAR(mean_of(x), 5.0, 0.30);           // se 0.071
  EXPECT_NEAR(cross_cov(x, x, 0), var_u, 1.0);  // se 0.24
  EXPECT_NEAR(cross_cov(x, x, 1) / cross_cov(x, x, 0), 0.8, 0.02);
  EXPECT_NEAR(mean_of(y), 20.0, 0.60);          // se 0.14
  EXPECT_NEAR(cross_cov(y, y, 0), var_y, 4.0);  // se 0.95
  const double c1 = 2.0 * var_u / std::sqrt(var_y * var_u);
  const double sd_prod = std::sqrt(cross_cov(y, y, 0) * cross_cov(x, x, 0));
  EXPECT_NEAR(cross_cov(y, x, 1) / sd_prod, c1, 0.005);
  EXPECT_NEAR(cross_cov(y, x, 0) / sd_prod, 0.8 * c1, 0.02);
}

TEST(Simulate, ArmaNoiseMomentsMatchTheory) {
  // (1 - 0.7 B) n_t = (1 + 0.3 B) a_t, sd 1: var = (1 + 2 phi theta + theta^2) / (1 - phi^2),
  // rho_1 = (1 + phi theta)(phi + theta) / (1 + 2 phi theta + theta^2), rho_2 = phi rho_1.
  SimulationSpec spec;
  spec.n = 20000;
  spec.seed = 5;
  spec.phi = {0.7};
  spec.theta = {0.3};
  spec.noise = {1, 1, 0, 0, 1};
  const auto y = simulate(spec).target;
  const double var = (1.0 + 2 * 0.21 + 0.09) / (1.0 - 0.49);
  const double rho1 = 1.21 * 1.0 / 1.51;
  EXPECT_NEAR(mean_of(y), 0.0, 0.08);          // se 0.018 * 4.3
  EXPECT_NEAR(cross_cov(y, y, 0), var, 0.22);  // se 0.055
  EXPECT_NEAR(cross_cov(y, y, 1) / cross_cov(y, y, 0), rho1, 0.02);
  EXPECT_NEAR(cross_cov(y, y, 2) / cross_cov(y, y, 0), 0.7 * rho1, 0.03);
}

TEST(Simulate, RejectsInvalidModels) {
  auto spec = small_spec(1);
  spec.phi = {1.0};
  EXPECT_THROW(simulate(spec), InputError);
  spec = small_spec(1);
  spec.inputs[0].params.delta = {-1.2};
  EXPECT_THROW(simulate(spec), InputError);
  spec = small_spec(1);
  spec.inputs[1].at_row = 300;
  EXPECT_THROW(simulate(spec), InputError);
  spec = small_spec(1);
  spec.inputs[1].name = "x";
  EXPECT_THROW(simulate(spec), InputError);
}

// ---- the YAML spec ----

const char* kSpec = R"(target: heat
n: 50
seed: 9
start_date: 2022-01-01
decimals: 2
constant: 100
noise: {ar: [0.5], ma: 0.2, sigma: 2}
inputs:
  - name: temp
    delay: 1
    omega: [-3, 1]
    delta: [0.4]
    mean: 9
    ar: 0.7
    sd: 2
    cycle: {amplitude: 8, period: 365.25, peak: 196}
  - name: tariff
    event: step
    at: 2022-01-31
    omega: -5
  - name: clouds
    mean: 60
)";

TEST(SimulationSpecFile, ParsesEveryKey) {
  const auto file = parse_simulation_spec(kSpec, "sim.yaml");
  const auto& s = file.spec;
  EXPECT_EQ(s.target, "heat");
  EXPECT_EQ(s.n, 50);
  EXPECT_EQ(s.seed, 9u);
  EXPECT_EQ(s.start_date, "2022-01-01");
  EXPECT_EQ(file.time_column, "date");
  EXPECT_EQ(file.decimals, 2);
  EXPECT_EQ(s.constant, 100.0);
  EXPECT_EQ(s.phi, (std::vector<double>{0.5}));
  EXPECT_EQ(s.theta, (std::vector<double>{0.2}));
  EXPECT_EQ(s.noise.p, 1);
  EXPECT_EQ(s.noise.q, 1);
  EXPECT_EQ(s.sigma, 2.0);
  ASSERT_EQ(s.inputs.size(), 3u);
  EXPECT_EQ(s.inputs[0].order, (InputOrder{1, 1, 1}));
  EXPECT_EQ(s.inputs[0].params.omega, (std::vector<double>{-3.0, 1.0}));
  EXPECT_EQ(s.inputs[0].cycle_period, 365.25);
  EXPECT_EQ(s.inputs[0].cycle_peak, 196.0);
  EXPECT_TRUE(s.inputs[1].is_event);
  EXPECT_EQ(s.inputs[1].shape, EventShape::step);
  EXPECT_EQ(s.inputs[1].at_row, 30);  // 2022-01-31 is 30 days after the start
  EXPECT_EQ(s.inputs[1].params.omega, (std::vector<double>{-5.0}));
  EXPECT_EQ(s.inputs[2].params.omega, (std::vector<double>{0.0}));  // no omega: zero gain
  EXPECT_EQ(s.inputs[2].order, (InputOrder{0, 0, 0}));
}

TEST(SimulationSpecFile, CsvLeavesEventsOut) {
  const auto file = parse_simulation_spec(kSpec, "sim.yaml");
  const auto data = simulate(file.spec);
  const auto csv = simulated_csv(file, data);
  const auto first_line = csv.substr(0, csv.find('\n'));
  EXPECT_EQ(first_line, "date,heat,temp,clouds");
  const auto second = csv.substr(first_line.size() + 1,
                                 csv.find('\n', first_line.size() + 1) - first_line.size() - 1);
  EXPECT_EQ(second.substr(0, 11), "2022-01-01,");
  EXPECT_EQ(std::count(csv.begin(), csv.end(), '\n'), 51);
  // Two decimals: the target cell reads back to within half a unit in the last place.
  const double target0 = std::stod(second.substr(11, second.find(',', 11) - 11));
  EXPECT_NEAR(target0, data.target[0], 0.005 + 1e-12);
}

std::string error_of(const std::string& yaml) {
  try {
    parse_simulation_spec(yaml, "sim.yaml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

TEST(SimulationSpecFile, MessagesPointAtTheSpot) {
  EXPECT_EQ(error_of("n: 100\nnoise:\n  ar: [0.5]\n  sgima: 2\n"),
            "sim.yaml:4: noise.sgima: unknown key; did you mean `sigma`? (valid keys here: ar, "
            "ma, seasonal_ar, seasonal_ma, period, sigma)");
  EXPECT_EQ(error_of("n: 100\ninputs:\n  - name: x\n    omgea: [1]\n"),
            "sim.yaml:4: inputs[0].omgea: unknown key; did you mean `omega`? (valid keys here: "
            "name, event, at, delay, omega, delta, mean, ar, sd, cycle)");
  EXPECT_EQ(error_of("seeed: 3\n"),
            "sim.yaml:1: seeed: unknown key; did you mean `seed`? (valid keys here: target, n, "
            "seed, start_date, frequency, time_column, decimals, burn_in, constant, noise, "
            "integrate, inputs)");
  EXPECT_EQ(error_of("n: 100\ninputs:\n  - {name: e, event: stpe, at: 3}\n"),
            "sim.yaml:3: inputs[0].event: unknown shape 'stpe'; did you mean 'step'? choose one "
            "of: pulse, step, ramp");
  EXPECT_EQ(error_of("n: 100\ninputs:\n  - {name: e, event: step, at: 2022-03-01}\n"),
            "sim.yaml:3: inputs[0].at: a date needs `start_date` at the top level; or give a "
            "0-based row");
  EXPECT_EQ(error_of("n: 10\ninputs:\n  - {name: e, event: step, at: 10}\n"),
            "sim.yaml:3: inputs[0].at: row 10 is not inside the 10 simulated rows (0..9)");
  EXPECT_EQ(error_of("n: 10\ninputs:\n  - {name: e, event: pulse, at: 2, sd: 1}\n"),
            "sim.yaml:3: inputs[0].sd: only for random inputs; an event has fixed values (remove "
            "it)");
  EXPECT_EQ(error_of("start_date: 2022-02-30\n"),
            "sim.yaml:1: start_date: '2022-02-30' is not a date; write YYYY-MM-DD (e.g. "
            "2022-01-01)");
  EXPECT_EQ(error_of("inputs:\n  - {name: x, ar: 1.0}\n"),
            "sim.yaml:2: inputs[0].ar: 1 must lie strictly between -1 and 1");
  EXPECT_EQ(error_of("n: ten\n"), "sim.yaml:1: n: expected an integer, got 'ten'");
}

}  // namespace
}  // namespace lagsieve
