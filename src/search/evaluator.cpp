#include "search/evaluator.h"

#include <tbb/parallel_for.h>

#include <algorithm>
#include <map>
#include <string>
#include <variant>

#include "backtest/backtest.h"
#include "model/likelihood.h"
#include "search/candidates.h"
#include "search/journal_rows.h"

namespace lagsieve {

namespace {

// Candidates per chunk: the prepared problems of one chunk are alive at the same time, so this
// bounds memory on any grid; inside a chunk, candidates with the same regressors share one.
constexpr size_t kChunk = 256;

// The part of a spec that determines the prepared problem's data and checks: inputs, constant.
std::string regressor_key(const ModelSpec& spec) {
  ModelSpec s = spec;
  s.noise = {0, 0, 0, 0, spec.noise.period};
  return candidate_key(s);
}

}  // namespace

nlohmann::json journal_json(const CandidateRow& row) {
  nlohmann::json j = journal_row(row);  // the compact line, plus the warm start
  if (!row.nonlinear.empty()) j["nonlinear"] = row.nonlinear;
  return j;
}

void Evaluator::report(int total) {
  if (!options_.progress) return;
  std::lock_guard lock(mutex_);
  options_.progress(++done_, total);
}

std::vector<CandidateRow> Evaluator::evaluate(const std::vector<ModelSpec>& specs, int total_hint,
                                              const std::vector<std::optional<ModelParams>>* warm) {
  std::vector<CandidateRow> out(specs.size());
  std::vector<size_t> todo;
  for (size_t i = 0; i < specs.size(); ++i) {
    const std::string key = candidate_key(specs[i]);
    const auto* j = options_.journal ? options_.journal->find(data_.target_name, key) : nullptr;
    if (j) {
      out[i] = candidate_row_from_json(*j, specs[i]);
      ++resumed_;
      report(total_hint);
    } else {
      todo.push_back(i);
    }
  }
  for (size_t from = 0; from < todo.size(); from += kChunk) {
    const size_t to = std::min(todo.size(), from + kChunk);
    // One prepared problem per regressor set of the chunk (built in parallel; a set whose
    // problem cannot be built leaves its candidates to fit_candidate, which words the failure).
    std::map<std::string, size_t> group_of;
    std::vector<size_t> first;  // the spec each group's problem is built from
    std::vector<size_t> group(to - from);
    for (size_t k = from; k < to; ++k) {
      const auto [it, fresh] = group_of.try_emplace(regressor_key(specs[todo[k]]), first.size());
      if (fresh) first.push_back(todo[k]);
      group[k - from] = it->second;
    }
    std::vector<std::optional<LikelihoodProblem>> problems(first.size());
    run_in_arena(threads_, [&] {
      tbb::parallel_for(tbb::blocked_range<size_t>(0, first.size(), 1), [&](const auto& range) {
        for (size_t g = range.begin(); g != range.end(); ++g) {
          try {
            problems[g] = make_problem(data_, specs[first[g]], start_);
          } catch (const std::exception&) {
            problems[g].reset();
          }
        }
      });
      tbb::parallel_for(tbb::blocked_range<size_t>(from, to, 1), [&](const auto& range) {
        for (size_t k = range.begin(); k != range.end(); ++k) {
          if (options_.cancel && options_.cancel->load()) return;  // Cancelled is thrown below
          const size_t i = todo[k];
          const auto& shared = problems[group[k - from]];
          const std::optional<ModelParams>* start = warm ? &(*warm)[i] : nullptr;
          const std::optional<ModelParams> no_start;
          bool done = false;
          if (shared) {
            LikelihoodProblem problem = *shared;
            problem.spec = specs[i];
            // The only check of make_problem that depends on the noise: enough observations.
            if (problem.n_obs() >= problem.n_params() + 3) {
              out[i] = fit_candidate(data_, problem, start ? *start : no_start);
              done = true;
            }
          }
          if (!done) out[i] = fit_candidate(data_, specs[i], start_, start ? *start : no_start);
          if (options_.journal) options_.journal->append(journal_json(out[i]));
          report(total_hint);
        }
      });
    });
    check_cancel(options_.cancel);
  }
  fitted_ += static_cast<int>(todo.size());
  return out;
}

}  // namespace lagsieve
