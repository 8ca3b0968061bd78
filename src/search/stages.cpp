#include "search/stages.h"

#include <fmt/format.h>

#include <limits>

namespace lagsieve {

namespace {

long long saturating_sum(long long a, long long b) {
  const long long top = std::numeric_limits<long long>::max();
  return a > top - b ? top : a + b;
}

}  // namespace

long long accounted(const std::vector<StageReport>& stages) {
  long long n = 0;
  for (const auto& s : stages) {
    n = saturating_sum(n, s.fitted + s.from_journal);
    for (const auto& k : s.skipped) n = saturating_sum(n, k.count);
  }
  return n;
}

nlohmann::json stages_json(const std::vector<StageReport>& stages) {
  auto out = nlohmann::json::array();
  for (const auto& s : stages) {
    nlohmann::json skipped = nlohmann::json::array();
    for (const auto& k : s.skipped) skipped.push_back({{"count", k.count}, {"reason", k.reason}});
    out.push_back({{"stage", s.stage},
                   {"what", s.what},
                   {"fitted", s.fitted},
                   {"from_journal", s.from_journal},
                   {"repeated", s.repeated},
                   {"skipped", skipped},
                   {"seconds", s.seconds}});
  }
  return out;
}

std::vector<std::string> stage_lines(const std::vector<StageReport>& stages) {
  std::vector<std::string> lines;
  for (const auto& s : stages) {
    std::string line = fmt::format("{}: {} fitted", s.stage, s.fitted);
    if (s.from_journal > 0) line += fmt::format(", {} from the journal", s.from_journal);
    if (s.fitted + s.from_journal > 0) line += fmt::format(" ({:.1f} s)", s.seconds);
    for (const auto& k : s.skipped)
      if (k.count > 0) line += fmt::format("; {} skipped: {}", k.count, k.reason);
    lines.push_back(std::move(line));
  }
  return lines;
}

}  // namespace lagsieve
