// Seeded simulations of the re-validation verdict. The reference is the process the data were
// drawn from: a model deployed after 300 rows of y = 10 + [2 / (1 - 0.5B)] B^2 x + AR(1) noise
// meets 100 new rows
//   - from the same process: the verdict must be keep in at least 90% of 40 seeds (the rule's
//     false-alarm level is alpha = 0.05 by Bonferroni, so about 95% or more is expected);
//   - after the input's gain halved (omega 2 -> 1) or its delay moved (b 2 -> 3): the verdict
//     must be refit or replace in at least 90% of 20 seeds, and the changed input's parameter
//     flagged as drifted (for the gain: x.omega0 itself).
// A broken degradation test, drift scale or Bonferroni count fails one side or the other.
#include <gtest/gtest.h>

#include <chrono>
#include <cstdio>
#include <string>

#include "core/error.h"
#include "revalidate/revalidate.h"
#include "revalidate_test_util.h"

namespace lagsieve {
namespace {

using namespace lagsieve::testing;

// The keep rate is estimated on more seeds than the change scenarios: its false-alarm rate is
// small (about 3% in 100 seeds of this setup) and 20 seeds would leave a ~2% chance of failing
// with a correct rule.
constexpr int kSeedsSame = 40;
constexpr int kSeedsChanged = 20;

bool flagged(const RevalidationResult& r, const std::string& prefix) {
  for (const auto& d : r.drift.parameters)
    if (d.flagged && d.name.rfind(prefix, 0) == 0) return true;
  return false;
}

struct Tally {
  int keep = 0, refit = 0, replace = 0, flagged = 0;
};

Tally run_scenario(const char* name, int seeds, double omega_after, int delay_after,
                   const std::string& flag_prefix) {
  Tally t;
  const RunConfig config = small_config();
  const auto t0 = std::chrono::steady_clock::now();
  for (int k = 0; k < seeds; ++k) {
    const std::uint64_t seed = 7000 + static_cast<std::uint64_t>(k);
    const SeriesData before = simulate(truth(seed));
    const SeriesData after = simulate(truth(seed, omega_after, delay_after));
    EXPECT_EQ(before.inputs, after.inputs) << "the input draws must not depend on the transfer function";
    const SeriesData data = spliced(before, after);
    const FittedModel model = deployed_model(head(data, kTrainingRows), config);
    const RevalidationResult r = revalidate(model, data, config);
    switch (r.verdict) {
      case Verdict::keep: ++t.keep; break;
      case Verdict::refit: ++t.refit; break;
      case Verdict::replace: ++t.replace; break;
    }
    t.flagged += flag_prefix.empty() ? 0 : flagged(r, flag_prefix) ? 1 : 0;
    if (r.verdict != Verdict::keep && omega_after == 2.0 && delay_after == 2) {
      std::printf("  seed %llu: %s\n", static_cast<unsigned long long>(seed), std::string(to_string(r.verdict)).c_str());
      for (const auto& reason : r.reasons) std::printf("    %s\n", reason.c_str());
    }
  }
  const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("%s: keep %d, refit %d, replace %d, flagged %d of %d seeds (%.1f s)\n", name, t.keep, t.refit,
              t.replace, t.flagged, seeds, secs);
  return t;
}

TEST(RevalidateVerdict, SameProcessIsKept) {
  const Tally t = run_scenario("same process", kSeedsSame, 2.0, 2, "");
  EXPECT_GE(t.keep, 36);  // 90% of 40
}

TEST(RevalidateVerdict, HalvedGainIsRefitOrReplacedWithTheGainFlagged) {
  const Tally t = run_scenario("gain 2 -> 1", kSeedsChanged, 1.0, 2, "x.omega0");
  EXPECT_GE(t.refit + t.replace, 18);
  EXPECT_GE(t.flagged, 18);
}

TEST(RevalidateVerdict, MovedDelayIsRefitOrReplacedWithTheInputFlagged) {
  const Tally t = run_scenario("delay 2 -> 3", kSeedsChanged, 2.0, 3, "x.");
  EXPECT_GE(t.refit + t.replace, 18);
  EXPECT_GE(t.flagged, 18);
}

}  // namespace
}  // namespace lagsieve
