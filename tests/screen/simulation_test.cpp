// Seeded simulations with known structure (closed-form truth: the delays and zero gains the data
// were generated with). Rates asserted: the suggested delay is right for >= 90% of the inputs with
// a real effect, and >= 80% of the inputs with zero gain are flagged as without significant
// cross-correlation. Plus the warnings on constructed cases (feedback, collinear inputs, short
// series) and event inputs.
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "core/config.h"
#include "core/error.h"
#include "core/random.h"
#include "model/simulate.h"
#include "screen/screen.h"

namespace lagsieve {
namespace {

RunConfig differenced_once() {
  RunConfig config;
  config.differencing.regular = 1;
  return config;
}

bool has_warning(const ScreenResult& r, ScreenWarningKind kind) {
  for (const auto& w : r.warnings)
    if (w.kind == kind) return true;
  return false;
}

TEST(ScreenSimulation, DelaysRecoveredAndZeroGainInputsFlagged) {
  constexpr int kReplications = 60;
  Random pick(20240611);
  int relevant_total = 0, delay_right = 0, zero_total = 0, zero_flagged = 0;
  int relevant_missed = 0;
  for (int rep = 0; rep < kReplications; ++rep) {
    SimulationSpec spec;
    spec.n = 300;
    spec.seed = 1000 + static_cast<std::uint64_t>(rep);
    spec.noise.p = 1;
    spec.phi = {0.5};
    spec.sigma = 1.0;
    spec.integrate.regular = 1;
    // Three inputs with an effect (delays 0..6, shapes from a small menu, gains of either sign
    // between 1 and 2 against unit noise) and two with zero gain.
    for (int i = 0; i < 3; ++i) {
      SimulatedInput in;
      in.name = fmt::format("x{}", i);
      in.order.delay = static_cast<int>(pick.uniform() * 7.0);
      const double gain = (1.0 + pick.uniform()) * (pick.uniform() < 0.5 ? -1.0 : 1.0);
      switch (rep % 3 == 0 ? i : (i + rep) % 3) {
        case 0:
          in.params.omega = {gain};
          break;
        case 1:
          in.order.denominator = 1;
          in.params.omega = {gain};
          in.params.delta = {0.5};
          break;
        default:
          in.order.numerator = 1;
          in.params.omega = {gain, -0.5 * gain};
          break;
      }
      in.ar = 0.3 + 0.4 * pick.uniform();
      spec.inputs.push_back(in);
    }
    for (int i = 0; i < 2; ++i) {
      SimulatedInput in;
      in.name = fmt::format("z{}", i);
      in.order.delay = static_cast<int>(pick.uniform() * 7.0);
      in.params.omega = {0.0};
      in.ar = 0.3 + 0.4 * pick.uniform();
      spec.inputs.push_back(in);
    }
    const auto data = simulate(spec);
    const auto res = screen_series(data, differenced_once());
    ASSERT_EQ(res.inputs.size(), spec.inputs.size());
    for (size_t i = 0; i < spec.inputs.size(); ++i) {
      const auto& s = res.inputs[i];
      const bool has_effect = spec.inputs[i].params.omega[0] != 0.0;
      if (has_effect) {
        ++relevant_total;
        if (!s.relevant) ++relevant_missed;
        if (s.relevant && s.suggested_delay == spec.inputs[i].order.delay) ++delay_right;
      } else {
        ++zero_total;
        if (!s.relevant) ++zero_flagged;
      }
    }
  }
  const double delay_rate = static_cast<double>(delay_right) / relevant_total;
  const double flag_rate = static_cast<double>(zero_flagged) / zero_total;
  std::printf("delay right: %d / %d = %.3f (missed as irrelevant: %d); zero-gain flagged: %d / %d "
              "= %.3f\n",
              delay_right, relevant_total, delay_rate, relevant_missed, zero_flagged, zero_total,
              flag_rate);
  EXPECT_GE(delay_rate, 0.95);  // 176 / 180 with this seed
  EXPECT_GE(flag_rate, 0.90);   // 112 / 120 with this seed
}

// Series built by hand from a seeded generator.
SeriesData two_series(const std::vector<double>& y, const std::vector<std::vector<double>>& us) {
  SeriesData d;
  d.target_name = "y";
  d.target = y;
  for (size_t i = 0; i < us.size(); ++i) {
    d.input_names.push_back(fmt::format("u{}", i));
    d.inputs.push_back(us[i]);
  }
  d.time.assign(y.size(), "");
  return d;
}

TEST(ScreenWarnings, InputDrivenByThePastTargetIsFeedback) {
  // u_t = 0.9 y_{t-2} + e_t: the input follows the target, so r(k) peaks at k = -2.
  Random rng(7);
  const int n = 300;
  std::vector<double> y(n), u(n);
  for (int t = 0; t < n; ++t) {
    y[t] = rng.normal();
    u[t] = (t >= 2 ? 0.9 * y[t - 2] : 0.0) + rng.normal();
  }
  const auto res = screen_series(two_series(y, {u}), RunConfig{});
  ASSERT_EQ(res.inputs.size(), 1u);
  EXPECT_TRUE(has_warning(res, ScreenWarningKind::feedback));
  ASSERT_FALSE(res.inputs[0].feedback_lags.empty());
  EXPECT_EQ(res.inputs[0].feedback_lags.front(), -2);
}

TEST(ScreenWarnings, AStepIndicatorIsNeverCalledFeedback) {
  // The target jumps (and spikes) 4 rows before a 0/1 step column switches on, so the column
  // "follows" the target at lag -4 by construction (with the feedback check forced on for
  // events, this case warns). A step indicator cannot respond to the target: no
  // feedback warning, whatever the correlation at negative lags.
  Random rng(13);
  const int n = 300;
  std::vector<double> y(n), step(n);
  for (int t = 0; t < n; ++t) {
    y[t] = rng.normal() + (t >= 146 ? 3.0 : 0.0) + (t == 146 ? 8.0 : 0.0);
    step[t] = t >= 150 ? 1.0 : 0.0;
  }
  const auto res = screen_series(two_series(y, {step}), RunConfig{});
  ASSERT_EQ(res.inputs.size(), 1u);
  EXPECT_FALSE(has_warning(res, ScreenWarningKind::feedback));
  EXPECT_TRUE(res.inputs[0].feedback_lags.empty());
}

TEST(ScreenWarnings, NearlyEqualInputsAreCollinear) {
  Random rng(11);
  const int n = 200;
  std::vector<double> y(n), u0(n), u1(n), u2(n);
  double level = 0.0;
  for (int t = 0; t < n; ++t) {
    level += rng.normal();
    u0[t] = level;
    u1[t] = level + 0.2 * rng.normal();  // differences still correlate > 0.8 with u0's
    u2[t] = static_cast<double>(t) + 3.0 * rng.normal();
    y[t] = (t >= 1 ? u0[t - 1] : 0.0) + rng.normal();
  }
  const auto res = screen_series(two_series(y, {u0, u1, u2}), differenced_once());
  int pairs = 0;
  for (const auto& w : res.warnings)
    if (w.kind == ScreenWarningKind::correlated_inputs) {
      ++pairs;
      EXPECT_EQ(w.inputs, (std::vector<std::string>{"u0", "u1"}));
    }
  EXPECT_EQ(pairs, 1);
  EXPECT_GT(std::abs(res.input_correlation[0][1]), 0.8);
  EXPECT_LT(std::abs(res.input_correlation[0][2]), 0.8);
}

TEST(ScreenWarnings, ShortSeriesCapsLagsAndWarns) {
  Random rng(3);
  const int n = 41;  // 40 after differencing: L = 10, fewer than 50 observations
  std::vector<double> y(n), u(n);
  for (int t = 0; t < n; ++t) {
    u[t] = rng.normal();
    y[t] = rng.normal();
  }
  const auto res = screen_series(two_series(y, {u}), differenced_once());
  EXPECT_EQ(res.max_lag_used, 10);
  EXPECT_EQ(res.inputs[0].cross_correlation.size(), 21u);
  EXPECT_TRUE(has_warning(res, ScreenWarningKind::lags_capped));
  EXPECT_TRUE(has_warning(res, ScreenWarningKind::few_observations));
}

TEST(ScreenWarnings, TooFewObservationsIsAnInputError) {
  const std::vector<double> y{1, 2, 3, 5, 4, 6, 7, 9}, u{1, 0, 1, 0, 1, 1, 0, 1};
  try {
    screen_series(two_series(y, {u}), differenced_once());
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()),
              "screen: target 'y' has 7 observations after differencing (of 8 rows); screening "
              "needs at least 10: supply more data or reduce `differencing`");
  }
}

TEST(ScreenOptionsCheck, BadOptionNamesTheField) {
  ScreenOptions opt;
  opt.family_level = 1.5;
  try {
    opt.validate();
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()), "screen options: family_level = 1.5 must lie in (0, 1)");
  }
}

TEST(ScreenEvents, StepEventWithDelayTwoIsFound) {
  // A level shift of +4 two rows after a step event at row 120; the event is screened without
  // prewhitening, so after one difference v_2 is the size of the shift.
  Random rng(5);
  const int n = 240;
  std::vector<double> y(n), step(n, 0.0);
  double level = 0.0;
  for (int t = 0; t < n; ++t) {
    level += 0.3 * rng.normal();
    if (t >= 120) step[t] = 1.0;
    y[t] = level + (t >= 122 ? 4.0 : 0.0);
  }
  auto data = two_series(y, {step});
  data.input_names = {"shift"};
  RunConfig config = differenced_once();
  InputConfig ev;
  ev.name = "shift";
  ev.is_event = true;
  ev.shape = EventShape::step;
  config.inputs.push_back(ev);
  const auto res = screen_series(data, config);
  const auto& s = res.inputs[0];
  EXPECT_TRUE(s.is_event);
  EXPECT_FALSE(s.prewhitened);
  EXPECT_TRUE(s.relevant);
  EXPECT_EQ(s.suggested_delay, 2);
  EXPECT_NEAR(s.impulse[2], 4.0, 1.0);  // the shift plus one step of the random walk
  // Exactly: an event is not prewhitened, so v_2 = c_{du,dy}(2) / c_{du,du}(0) of the differenced
  // series (Box & Jenkins' identity v_k = r_k s_y / s_x).
  std::vector<double> du, dy;
  for (size_t t = 1; t < y.size(); ++t) {
    du.push_back(step[t] - step[t - 1]);
    dy.push_back(y[t] - y[t - 1]);
  }
  const double m = static_cast<double>(du.size());
  double mu = 0.0, my = 0.0;
  for (size_t t = 0; t < du.size(); ++t) mu += du[t] / m, my += dy[t] / m;
  double cuu = 0.0, cuy = 0.0;
  for (size_t t = 0; t < du.size(); ++t) cuu += (du[t] - mu) * (du[t] - mu);
  for (size_t t = 0; t + 2 < du.size(); ++t) cuy += (du[t] - mu) * (dy[t + 2] - my);
  EXPECT_NEAR(s.impulse[2], cuy / cuu, 1e-12);
}

}  // namespace
}  // namespace lagsieve
