#pragma once
// What each stage of a search strategy fitted and skipped, and why: shown in the terminal,
// kept in the run folder's ranking JSON and in the report.
#include <string>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

namespace lagsieve {

struct StageSkip {
  std::string reason;  // a sentence
  long long count = 0;
};

struct StageReport {
  std::string stage;     // "screen", "inputs", "noise", "polish", "grid", "stepwise"
  std::string what;      // what the stage does, in words
  int fitted = 0;        // candidates first evaluated in this stage and fitted in this run
  int from_journal = 0;  // first evaluated in this stage, taken from the journal
  int repeated = 0;      // asked for again (evaluated earlier), neither fitted nor counted
  std::vector<StageSkip> skipped;  // candidates of the config's grid this stage ruled out
  double seconds = 0.0;
};

inline StageReport stage_named(std::string stage, std::string what) {
  StageReport s;
  s.stage = std::move(stage);
  s.what = std::move(what);
  return s;
}

// Candidates accounted for: fitted + from the journal + skipped over every stage. For every
// strategy this equals the size of the config's grid (saturating at the largest long long).
long long accounted(const std::vector<StageReport>& stages);

nlohmann::json stages_json(const std::vector<StageReport>& stages);
// One line per stage, e.g. "inputs: 52 fitted, 0 from the journal; 1,200 skipped (reason)".
std::vector<std::string> stage_lines(const std::vector<StageReport>& stages);

}  // namespace lagsieve
