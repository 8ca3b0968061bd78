// Structure recovery: data drawn from known transfer-function models (2-4 inputs, some with no
// effect at all, varied b, r, s, ARMA noise, 200 to 1500 rows) are searched exhaustively over a
// grid around the truth. The reference is the structure the data were drawn from: the top BIC
// candidate must carry the true (b, s, r) of every relevant input and leave out every
// irrelevant one in at least 80% of the cases (BIC is consistent, so with these signal-to-noise
// ratios a miss is rare; a broken likelihood, common sample or ranking misses far more often).
#include <gtest/gtest.h>

#include <chrono>
#include <cstdio>
#include <string>
#include <vector>

#include "search/candidates.h"
#include "search/search.h"
#include "search_test_util.h"

namespace lagsieve {
namespace {

using testing::CaseInput;
using testing::SearchCase;

SearchCase make_case(const std::string& name, int n, std::uint64_t seed) {
  SearchCase c;
  c.name = name;
  c.n = n;
  c.seed = seed;
  return c;
}

std::vector<SearchCase> recovery_cases() {
  std::vector<SearchCase> cases;
  // clang-format off
  {  // one lagged input, one useless; AR(1) noise, short series
    SearchCase c = make_case("short_ar1", 200, 101);
    c.inputs = {{"x1", {1, 0, 0}, {2.0}, {}, 0.5, {0, 2}, {0, 1}, {0, 1}, false},
                {"x2", {}, {0.0}, {}, 0.5, {0, 2}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 0, 0, 0, 1}; c.phi = {0.5};
    c.ar = {0, 1}; c.ma = {0, 1};
    cases.push_back(c);
  }
  {  // slow response plus a two-tap input; MA(1) noise
    SearchCase c = make_case("decay_and_taps_ma1", 300, 102);
    c.inputs = {{"x1", {2, 0, 1}, {1.5}, {0.6}, 0.5, {1, 3}, {0, 1}, {0, 1}, false},
                {"x2", {0, 1, 0}, {1.0, 0.8}, {}, 0.3, {0, 1}, {0, 1}, {0, 1}, false}};
    c.noise = {0, 1, 0, 0, 1}; c.theta = {0.4};
    c.ar = {0, 1}; c.ma = {0, 1};
    cases.push_back(c);
  }
  {  // a pure delay of 3 and two useless inputs; ARMA(1,1) noise
    SearchCase c = make_case("delay3_two_useless_arma11", 500, 103);
    c.inputs = {{"x1", {3, 0, 0}, {1.2}, {}, 0.5, {2, 4}, {0, 1}, {0, 1}, false},
                {"x2", {}, {0.0}, {}, 0.7, {0, 0}, {0, 0}, {0, 0}, true},
                {"x3", {}, {0.0}, {}, 0.2, {0, 0}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 1, 0, 0, 1}; c.phi = {0.6}; c.theta = {0.3};
    c.ar = {0, 1}; c.ma = {0, 1};
    cases.push_back(c);
  }
  {  // a rational input with a numerator lag, a negative delayed input; AR(2) noise
    SearchCase c = make_case("rational_and_delay4_ar2", 800, 104);
    c.inputs = {{"x1", {0, 1, 1}, {2.0, 1.0}, {0.5}, 0.5, {0, 1}, {0, 1}, {0, 1}, false},
                {"x2", {4, 0, 0}, {-1.0}, {}, 0.5, {3, 5}, {0, 0}, {0, 1}, false},
                {"x3", {}, {0.0}, {}, 0.5, {0, 0}, {0, 0}, {0, 0}, true}};
    c.noise = {2, 0, 0, 0, 1}; c.phi = {0.5, 0.2};
    c.ar = {1, 2}; c.ma = {0, 0};
    cases.push_back(c);
  }
  {  // four inputs, two useless; persistent AR(1) noise; long series, weak gains
    SearchCase c = make_case("four_inputs_long", 1500, 105);
    c.inputs = {{"x1", {2, 0, 1}, {0.8}, {0.7}, 0.5, {1, 3}, {0, 0}, {0, 1}, false},
                {"x2", {0, 0, 0}, {0.5}, {}, 0.5, {0, 1}, {0, 1}, {0, 0}, false},
                {"x3", {}, {0.0}, {}, 0.5, {0, 0}, {0, 0}, {0, 0}, true},
                {"x4", {}, {0.0}, {}, 0.8, {0, 1}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 0, 0, 0, 1}; c.phi = {0.8};
    c.ar = {0, 1}; c.ma = {0, 0};
    cases.push_back(c);
  }
  {  // a two-tap input of opposite signs; ARMA(1,1) noise
    SearchCase c = make_case("opposite_taps_arma11", 250, 106);
    c.inputs = {{"x1", {1, 1, 0}, {1.5, -1.0}, {}, 0.5, {0, 2}, {0, 2}, {0, 1}, false},
                {"x2", {}, {0.0}, {}, 0.5, {0, 1}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 1, 0, 0, 1}; c.phi = {0.4}; c.theta = {0.4};
    c.ar = {0, 1}; c.ma = {0, 1};
    cases.push_back(c);
  }
  {  // four inputs: a long delay, a decay, a useless one, a negative same-day effect; MA(1)
    SearchCase c = make_case("delay5_mix_ma1", 400, 107);
    c.inputs = {{"x1", {5, 0, 0}, {1.0}, {}, 0.5, {4, 6}, {0, 0}, {0, 0}, false},
                {"x2", {1, 0, 1}, {1.0}, {0.5}, 0.5, {0, 2}, {0, 0}, {0, 1}, false},
                {"x3", {}, {0.0}, {}, 0.5, {0, 0}, {0, 0}, {0, 0}, true},
                {"x4", {0, 0, 0}, {-0.8}, {}, 0.5, {0, 1}, {0, 1}, {0, 0}, false}};
    c.noise = {0, 1, 0, 0, 1}; c.theta = {-0.5};
    c.ar = {0, 0}; c.ma = {0, 1};
    cases.push_back(c);
  }
  {  // three numerator taps; AR(1) noise
    SearchCase c = make_case("three_taps_ar1", 600, 108);
    c.inputs = {{"x1", {2, 2, 0}, {1.0, 0.8, 0.6}, {}, 0.5, {1, 3}, {1, 3}, {0, 1}, false},
                {"x2", {}, {0.0}, {}, 0.5, {0, 2}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 0, 0, 0, 1}; c.phi = {0.3};
    c.ar = {0, 1}; c.ma = {0, 1};
    cases.push_back(c);
  }
  {  // a second-order (oscillating-free) decay plus a delayed input; AR(1) noise
    SearchCase c = make_case("second_order_decay", 1000, 109);
    c.inputs = {{"x1", {1, 0, 2}, {1.0}, {1.0, -0.4}, 0.5, {0, 2}, {0, 1}, {0, 2}, false},
                {"x2", {}, {0.0}, {}, 0.5, {0, 0}, {0, 0}, {0, 0}, true},
                {"x3", {3, 0, 0}, {0.6}, {}, 0.5, {2, 4}, {0, 0}, {0, 0}, false}};
    c.noise = {1, 0, 0, 0, 1}; c.phi = {0.5};
    c.ar = {0, 1}; c.ma = {0, 0};
    cases.push_back(c);
  }
  {  // every input optional: the relevant one must be kept, the useless ones dropped
    SearchCase c = make_case("all_optional", 350, 110);
    c.inputs = {{"x1", {1, 0, 0}, {1.0}, {}, 0.5, {0, 2}, {0, 1}, {0, 0}, true},
                {"x2", {}, {0.0}, {}, 0.5, {0, 1}, {0, 0}, {0, 0}, true},
                {"x3", {}, {0.0}, {}, 0.5, {0, 1}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 0, 0, 0, 1}; c.phi = {0.6};
    c.ar = {0, 1}; c.ma = {0, 1};
    cases.push_back(c);
  }
  {  // a strong slow same-day response; ARMA(1,1) noise of mixed signs
    SearchCase c = make_case("slow_same_day_arma11", 700, 111);
    c.inputs = {{"x1", {0, 0, 1}, {2.0}, {0.8}, 0.5, {0, 1}, {0, 1}, {0, 1}, false},
                {"x2", {}, {0.0}, {}, 0.5, {0, 2}, {0, 1}, {0, 0}, true}};
    c.noise = {1, 1, 0, 0, 1}; c.phi = {0.7}; c.theta = {-0.3};
    c.ar = {0, 1}; c.ma = {0, 1};
    cases.push_back(c);
  }
  // clang-format on
  return cases;
}

std::string describe(const ModelSpec& spec) {
  std::string out;
  for (const auto& t : spec.inputs)
    out += fmt::format("{}[b{} s{} r{}] ", t.name, t.order.delay, t.order.numerator, t.order.denominator);
  return out + fmt::format("~ ({},{})", spec.noise.p, spec.noise.q);
}

// True when the spec has the true orders of every relevant input and no irrelevant input.
bool recovered(const SearchCase& c, const ModelSpec& spec) {
  for (const auto& in : c.inputs) {
    const InputTerm* term = nullptr;
    for (const auto& t : spec.inputs)
      if (t.name == in.name) term = &t;
    if (in.relevant() != (term != nullptr)) return false;
    if (term && !(term->order == in.truth)) return false;
  }
  return true;
}

TEST(SearchRecovery, TopBicCandidateHasTrueStructureInMostCases) {
  const auto cases = recovery_cases();
  ASSERT_GE(cases.size(), 10u);
  int hits = 0;
  long long candidates = 0;
  const auto t0 = std::chrono::steady_clock::now();
  for (const auto& c : cases) {
    const SeriesData data = simulate(testing::simulation_of(c));
    const RunConfig config = testing::config_of(c, 2);
    const long long size = grid_size(full_grid(config));
    ASSERT_LE(size, 600) << c.name << ": keep the test grid small";
    SearchOptions options;
    options.threads = config.search.threads;
    const auto t1 = std::chrono::steady_clock::now();
    const SearchResult result = run_search(data, config, options);
    const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t1).count();
    ASSERT_EQ(static_cast<long long>(result.rows.size()), size) << c.name;
    ASSERT_FALSE(result.rows.empty());
    const CandidateRow& top = result.rows.front();
    ASSERT_TRUE(top.rankable()) << c.name << ": " << top.message;
    const bool ok = recovered(c, top.spec);
    hits += ok ? 1 : 0;
    candidates += size;
    std::printf("  %-28s n=%4d  %3lld candidates  %5.2f s  %s  top: %s  (bic %.2f)\n", c.name.c_str(),
                c.n, size, secs, ok ? "recovered" : "MISSED   ", describe(top.spec).c_str(), top.bic);
  }
  const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("  recovered %d of %zu cases; %lld candidates in %.1f s\n", hits, cases.size(), candidates, secs);
  EXPECT_GE(hits * 10, static_cast<int>(cases.size()) * 8);
}

}  // namespace
}  // namespace lagsieve
