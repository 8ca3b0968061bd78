#include "search/guided.h"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <map>
#include <set>

#include "io/config.h"
#include "search/evaluator.h"
#include "search/warm_start.h"

namespace lagsieve {

namespace {

using Orders = std::vector<std::optional<InputOrder>>;  // per grid input; nullopt = left out

constexpr int kInputRounds = 3;   // passes over the inputs while a choice changes
constexpr int kNoiseRounds = 2;   // inputs, then noise, again when the noise changed
constexpr int kPolishSteps = 20;  // single-move steps from the best at most

// a before b: rankable first, then the lower criterion, ties (and the unrankable) by key.
bool better(const CandidateRow& a, const CandidateRow& b, Criterion c) {
  if (a.rankable() != b.rankable()) return a.rankable();
  if (a.rankable()) {
    const double ca = a.criterion(c), cb = b.criterion(c);
    const bool fa = std::isfinite(ca), fb = std::isfinite(cb);
    if (fa != fb) return fa;
    if (fa && ca != cb) return ca < cb;
  }
  return a.key < b.key;
}

int level_of(const CandidateGrid::InputRanges& in, const InputOrder& o) {
  return (o.numerator - in.numerator.min) + (o.denominator - in.denominator.min);
}

std::vector<NoiseOrder> noise_orders(const CandidateGrid& g) {
  std::vector<NoiseOrder> out;
  for (int p = g.ar.min; p <= g.ar.max; ++p)
    for (int q = g.ma.min; q <= g.ma.max; ++q)
      for (int sp = g.seasonal_ar.min; sp <= g.seasonal_ar.max; ++sp)
        for (int sq = g.seasonal_ma.min; sq <= g.seasonal_ma.max; ++sq)
          out.push_back({p, q, sp, sq, g.period});
  return out;
}

class Stager {
 public:
  Stager(const CandidateGrid& g, Criterion c, int budget, Evaluator& ev)
      : g_(g),
        crit_(c),
        budget_(budget),
        ev_(ev),
        total_hint_(static_cast<int>(std::min<long long>(budget, grid_size(g)))) {
    for (const auto& in : g.inputs) {
      options_.push_back(options_of(in));
      fates_.emplace_back(options_.back().size(), OptionFate::not_reached);
    }
  }

  ModelSpec spec_of(const Orders& orders, const NoiseOrder& noise, bool constant) const {
    ModelSpec m;
    m.differencing = g_.differencing;
    m.transform = g_.transform;
    m.filter_start = g_.filter_start;
    for (size_t i = 0; i < orders.size(); ++i)
      if (orders[i]) m.inputs.push_back({g_.inputs[i].name, *orders[i]});
    m.noise = noise;
    m.constant = constant;
    return m;
  }

  Orders orders_of(const ModelSpec& spec) const {
    Orders o(g_.inputs.size());
    for (const auto& t : spec.inputs)
      for (size_t i = 0; i < g_.inputs.size(); ++i)
        if (g_.inputs[i].name == t.name) o[i] = t.order;
    return o;
  }

  // Rows of `specs` (evaluating those not seen before, with warm starts from rows finished
  // before this batch); counts go to `stage`. Specs past the budget are left out of the result.
  std::vector<const CandidateRow*> run(const std::vector<ModelSpec>& specs, StageReport& stage) {
    std::vector<const CandidateRow*> out;
    std::vector<ModelSpec> todo;
    std::set<std::string> in_batch;
    for (const auto& s : specs) {
      const std::string key = candidate_key(s);
      if (rows_.count(key)) {
        ++stage.repeated;
        continue;
      }
      if (!in_batch.insert(key).second) continue;
      if (static_cast<int>(rows_.size() + todo.size()) >= budget_) {
        out_of_budget_ = true;
        continue;
      }
      todo.push_back(s);
    }
    if (!todo.empty()) {
      std::vector<const CandidateRow*> done;
      for (const auto& key : order_) done.push_back(&rows_.at(key));
      std::vector<std::optional<ModelParams>> warm;
      for (const auto& s : todo) warm.push_back(nearest_start(s, done));
      const int fitted0 = ev_.fitted(), resumed0 = ev_.resumed();
      const auto t0 = std::chrono::steady_clock::now();
      auto rows = ev_.evaluate(todo, total_hint_, &warm);
      stage.seconds += std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
      stage.fitted += ev_.fitted() - fitted0;
      stage.from_journal += ev_.resumed() - resumed0;
      for (auto& r : rows) {
        mark_evaluated(r.spec);
        order_.push_back(r.key);
        rows_.emplace(r.key, std::move(r));
      }
    }
    for (const auto& s : specs) {
      const auto it = rows_.find(candidate_key(s));
      if (it != rows_.end()) out.push_back(&it->second);
    }
    return out;
  }

  const CandidateRow* best_of(const std::vector<const CandidateRow*>& rows) const {
    const CandidateRow* best = nullptr;
    for (const auto* r : rows)
      if (!best || better(*r, *best, crit_)) best = r;
    return best;
  }

  // Chooses input i with the others held at `orders`: the lowest orders at every delay and the
  // input left out first; an input worse than left out at every one is not tried higher; then
  // one order level at a time while the best of the level improves on the best so far.
  void choose_input(size_t i, Orders& orders, const NoiseOrder& noise, bool constant,
                    StageReport& stage) {
    const auto& in = g_.inputs[i];
    const auto& opts = options_[i];
    if (opts.size() <= 1) return;
    int top = 0;
    for (const auto& o : opts)
      if (o) top = std::max(top, level_of(in, *o));
    auto variant = [&](const std::optional<InputOrder>& o) {
      Orders v = orders;
      v[i] = o;
      return spec_of(v, noise, constant);
    };
    auto level_batch = [&](int level) {
      std::vector<ModelSpec> specs;
      for (const auto& o : opts)
        if (o ? level_of(in, *o) == level : level == 0) specs.push_back(variant(o));
      return specs;
    };
    auto mark_above = [&](int level, OptionFate why) {
      for (size_t k = 0; k < opts.size(); ++k)
        if (opts[k] && level_of(in, *opts[k]) > level && fates_[i][k] != OptionFate::evaluated)
          fates_[i][k] = why;
    };
    // The current choice is part of the comparison.
    std::vector<const CandidateRow*> seen = run({variant(orders[i])}, stage);
    for (const auto* r : run(level_batch(0), stage)) seen.push_back(r);
    if (seen.empty()) return;  // out of budget
    const CandidateRow* best = best_of(seen);
    if (in.optional) {
      const CandidateRow* out_row = nullptr;
      std::vector<const CandidateRow*> with_input;
      for (const auto* r : seen)
        if (orders_of(r->spec)[i])
          with_input.push_back(r);
        else
          out_row = r;
      const CandidateRow* best_in = best_of(with_input);
      if (out_row && (!best_in || better(*out_row, *best_in, crit_))) {
        mark_above(0, OptionFate::left_out);
        orders[i].reset();
        return;
      }
    }
    for (int level = 1; level <= top && !out_of_budget_; ++level) {
      const auto rows = run(level_batch(level), stage);
      const CandidateRow* best_here = best_of(rows);
      if (!best_here || !better(*best_here, *best, crit_)) {
        mark_above(level, OptionFate::orders_stopped);
        break;
      }
      best = best_here;
    }
    orders[i] = orders_of(best->spec)[i];
  }

  StagedSearch search(const ModelSpec& start) {
    StagedSearch result;
    StageReport inputs =
        stage_named("inputs",
                    "each input chosen with the others held: left out and the lowest orders "
                    "at every delay first, then one order level at a time while it improves");
    StageReport noise =
        stage_named("noise", "every noise order of the grid with the chosen inputs");
    StageReport polish =
        stage_named("polish",
                    "single moves (one order, one input in or out, one noise order) "
                    "from the best until none improves");
    Orders orders = orders_of(start);
    // The start inside the grid (the screen's suggestion is clamped to the config's ranges).
    for (size_t i = 0; i < orders.size(); ++i) {
      const auto& in = g_.inputs[i];
      if (!in.allow_in) orders[i].reset();
      if (!orders[i]) {
        if (!in.optional)
          orders[i] = InputOrder{in.delay.min, in.numerator.min, in.denominator.min};
        continue;
      }
      orders[i]->delay = std::clamp(orders[i]->delay, in.delay.min, in.delay.max);
      orders[i]->numerator = std::clamp(orders[i]->numerator, in.numerator.min, in.numerator.max);
      orders[i]->denominator =
          std::clamp(orders[i]->denominator, in.denominator.min, in.denominator.max);
    }
    NoiseOrder n = start.noise;
    n.p = std::clamp(n.p, g_.ar.min, g_.ar.max);
    n.q = std::clamp(n.q, g_.ma.min, g_.ma.max);
    n.seasonal_p = std::clamp(n.seasonal_p, g_.seasonal_ar.min, g_.seasonal_ar.max);
    n.seasonal_q = std::clamp(n.seasonal_q, g_.seasonal_ma.min, g_.seasonal_ma.max);
    n.period = g_.period;
    bool constant =
        std::find(g_.constant.begin(), g_.constant.end(), start.constant) != g_.constant.end()
            ? start.constant
            : g_.constant.back();
    const auto all_noise = noise_orders(g_);
    for (int round = 0; round < kNoiseRounds && !out_of_budget_; ++round) {
      for (int pass = 0; pass < kInputRounds && !out_of_budget_; ++pass) {
        const Orders before = orders;
        for (size_t i = 0; i < g_.inputs.size() && !out_of_budget_; ++i)
          choose_input(i, orders, n, constant, inputs);
        if (orders == before) break;
      }
      std::vector<ModelSpec> specs;
      for (const auto& no : all_noise)
        for (bool c : g_.constant) specs.push_back(spec_of(orders, no, c));
      const CandidateRow* best = best_of(run(specs, noise));
      if (!best) break;
      const bool same = best->spec.noise == n && best->spec.constant == constant;
      n = best->spec.noise;
      constant = best->spec.constant;
      if (same) break;
    }
    const CandidateRow* best = best_of(run({spec_of(orders, n, constant)}, polish));
    for (int step = 0; best && step < kPolishSteps && !out_of_budget_; ++step) {
      auto rows = run(neighbours(best->spec, g_), polish);
      rows.push_back(best);
      const CandidateRow* next = best_of(rows);
      if (next == best) break;
      best = next;
    }
    // Skipped candidates: the inputs stage rules out options, the rest were off the path.
    const SkipCounts skip = count_skipped(g_, fates_, static_cast<long long>(rows_.size()));
    inputs.skipped = {
        {"an optional input worse than left out at its lowest orders and every delay is not "
         "tried with higher orders",
         skip.left_out},
        {"higher orders of an input not tried once a level did not improve the criterion",
         skip.orders_stopped}};
    polish.skipped = {
        {"combinations of the orders tried that no stage reached (inputs chosen "
         "one at a time, the noise with the chosen inputs)",
         skip.off_path}};
    if (skip.not_reached > 0 || out_of_budget_) {
      polish.skipped.push_back(
          {fmt::format("not reached within search.budget ({} fits)", budget_), skip.not_reached});
      result.warnings.push_back(
          {"search_budget_reached",
           fmt::format("search_budget_reached: the guided search stopped after search.budget = "
                       "{} fits; raise it to let every stage finish",
                       budget_),
           {{"budget", budget_}, {"not_reached", static_cast<double>(skip.not_reached)}},
           {}});
    }
    result.stages = {inputs, noise, polish};
    for (const auto& key : order_) result.rows.push_back(rows_.at(key));
    return result;
  }

 private:
  void mark_evaluated(const ModelSpec& spec) {
    const Orders o = orders_of(spec);
    for (size_t i = 0; i < o.size(); ++i)
      for (size_t k = 0; k < options_[i].size(); ++k)
        if (options_[i][k] == o[i]) fates_[i][k] = OptionFate::evaluated;
  }

  const CandidateGrid& g_;
  Criterion crit_;
  int budget_;
  Evaluator& ev_;
  int total_hint_;  // the progress total: the fits the budget and the grid allow
  std::vector<std::vector<std::optional<InputOrder>>> options_;
  std::vector<std::vector<OptionFate>> fates_;
  std::map<std::string, CandidateRow> rows_;
  std::vector<std::string> order_;
  bool out_of_budget_ = false;
};

}  // namespace

std::vector<std::optional<InputOrder>> options_of(const CandidateGrid::InputRanges& in) {
  std::vector<std::optional<InputOrder>> out;
  if (in.optional) out.emplace_back(std::nullopt);
  if (!in.allow_in) return out;
  for (int b = in.delay.min; b <= in.delay.max; ++b)
    for (int s = in.numerator.min; s <= in.numerator.max; ++s)
      for (int r = in.denominator.min; r <= in.denominator.max; ++r)
        out.emplace_back(InputOrder{b, s, r});
  return out;
}

SkipCounts count_skipped(const CandidateGrid& grid,
                         const std::vector<std::vector<OptionFate>>& fates, long long evaluated) {
  long long noise = static_cast<long long>(grid.constant.size());
  auto span = [](const IntRange& r) { return static_cast<long long>(r.max) - r.min + 1; };
  for (const IntRange* r : {&grid.ar, &grid.ma, &grid.seasonal_ar, &grid.seasonal_ma})
    noise = saturating_product(noise, span(*r));
  const long long top = std::numeric_limits<long long>::max();
  auto add = [top](long long a, long long b) { return a > top - b ? top : a + b; };
  SkipCounts out;
  long long prefix = 1;  // combinations of evaluated options of the inputs before i
  for (size_t i = 0; i < fates.size(); ++i) {
    long long rest = noise;  // every option of the inputs after i, times the noise
    for (size_t j = i + 1; j < fates.size(); ++j)
      rest = saturating_product(rest, static_cast<long long>(fates[j].size()));
    long long evaluated_here = 0;
    for (OptionFate f : fates[i]) {
      if (f == OptionFate::evaluated) {
        ++evaluated_here;
        continue;
      }
      const long long n = saturating_product(prefix, rest);
      long long& bucket = f == OptionFate::left_out         ? out.left_out
                          : f == OptionFate::orders_stopped ? out.orders_stopped
                                                            : out.not_reached;
      bucket = add(bucket, n);
    }
    prefix = saturating_product(prefix, evaluated_here);
  }
  out.off_path = saturating_product(prefix, noise) - evaluated;
  return out;
}

StagedSearch staged_search(const CandidateGrid& grid, const ModelSpec& start, Criterion criterion,
                           int budget, Evaluator& evaluator) {
  Stager stager(grid, criterion, budget, evaluator);
  return stager.search(start);
}

}  // namespace lagsieve
