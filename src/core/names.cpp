#include "core/names.h"

#include <algorithm>
#include <array>
#include <cctype>
#include <utility>

namespace lagsieve {
namespace {

// Each enum's spellings in declaration order; to_string, parse_enum and enum_choices all read
// the same table so the three can never disagree.
template <typename Enum, size_t N>
using Table = std::array<std::pair<Enum, std::string_view>, N>;

constexpr Table<TransformKind, 3> kTransformKind{{
    {TransformKind::none, "none"}, {TransformKind::log, "log"}, {TransformKind::boxcox, "boxcox"}}};
constexpr Table<MissingPolicy, 3> kMissingPolicy{{{MissingPolicy::error, "error"},
                                                  {MissingPolicy::interpolate, "interpolate"},
                                                  {MissingPolicy::skip, "skip"}}};
constexpr Table<GapPolicy, 2> kGapPolicy{{{GapPolicy::insert, "insert"}, {GapPolicy::error, "error"}}};
constexpr Table<EventShape, 3> kEventShape{
    {{EventShape::pulse, "pulse"}, {EventShape::step, "step"}, {EventShape::ramp, "ramp"}}};
constexpr Table<FutureMode, 2> kFutureMode{
    {{FutureMode::known, "known"}, {FutureMode::forecast, "forecast"}}};
constexpr Table<ConstantMode, 3> kConstantMode{{{ConstantMode::yes, "true"},
                                                 {ConstantMode::no, "false"},
                                                 {ConstantMode::automatic, "auto"}}};
constexpr Table<Strategy, 3> kStrategy{{{Strategy::exhaustive, "exhaustive"},
                                         {Strategy::guided, "guided"},
                                         {Strategy::stepwise, "stepwise"}}};
constexpr Table<Criterion, 3> kCriterion{
    {{Criterion::aic, "aic"}, {Criterion::aicc, "aicc"}, {Criterion::bic, "bic"}}};
constexpr Table<WindowKind, 2> kWindowKind{
    {{WindowKind::expanding, "expanding"}, {WindowKind::sliding, "sliding"}}};
constexpr Table<OutlierType, 4> kOutlierType{{{OutlierType::additive, "additive"},
                                              {OutlierType::level_shift, "level_shift"},
                                              {OutlierType::temporary, "temporary"},
                                              {OutlierType::innovational, "innovational"}}};
constexpr Table<FilterStart, 2> kFilterStart{
    {{FilterStart::estimated, "estimated"}, {FilterStart::zero, "zero"}}};
constexpr Table<Estimation, 2> kEstimation{
    {{Estimation::ml, "ml"}, {Estimation::restricted, "restricted"}}};

template <typename Enum, size_t N>
std::string_view lookup(const Table<Enum, N>& table, Enum v) {
  for (const auto& [e, name] : table)
    if (e == v) return name;
  return "?";
}

template <typename Enum, size_t N>
std::optional<Enum> parse(const Table<Enum, N>& table, std::string_view text) {
  for (const auto& [e, name] : table)
    if (name == text) return e;
  return std::nullopt;
}

template <typename Enum, size_t N>
std::vector<std::string> choices(const Table<Enum, N>& table) {
  std::vector<std::string> out;
  out.reserve(N);
  for (const auto& entry : table) out.emplace_back(entry.second);
  return out;
}

// Edit distance counting insertions, deletions, substitutions and swaps of neighbours (optimal
// string alignment), since swapped letters are the commonest typo in a key.
size_t edit_distance(std::string_view a, std::string_view b) {
  const size_t w = b.size() + 1;
  std::vector<size_t> d((a.size() + 1) * w);
  for (size_t i = 0; i <= a.size(); ++i) d[i * w] = i;
  for (size_t j = 0; j <= b.size(); ++j) d[j] = j;
  for (size_t i = 1; i <= a.size(); ++i) {
    for (size_t j = 1; j <= b.size(); ++j) {
      const size_t sub = d[(i - 1) * w + j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1);
      size_t best = std::min({d[(i - 1) * w + j] + 1, d[i * w + j - 1] + 1, sub});
      if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
        best = std::min(best, d[(i - 2) * w + j - 2] + 1);
      d[i * w + j] = best;
    }
  }
  return d[a.size() * w + b.size()];
}

}  // namespace

std::string_view to_string(TransformKind v) { return lookup(kTransformKind, v); }
std::string_view to_string(MissingPolicy v) { return lookup(kMissingPolicy, v); }
std::string_view to_string(GapPolicy v) { return lookup(kGapPolicy, v); }
std::string_view to_string(EventShape v) { return lookup(kEventShape, v); }
std::string_view to_string(FutureMode v) { return lookup(kFutureMode, v); }
std::string_view to_string(ConstantMode v) { return lookup(kConstantMode, v); }
std::string_view to_string(Strategy v) { return lookup(kStrategy, v); }
std::string_view to_string(Criterion v) { return lookup(kCriterion, v); }
std::string_view to_string(WindowKind v) { return lookup(kWindowKind, v); }
std::string_view to_string(OutlierType v) { return lookup(kOutlierType, v); }
std::string_view to_string(FilterStart v) { return lookup(kFilterStart, v); }
std::string_view to_string(Estimation v) { return lookup(kEstimation, v); }

#define LAGSIEVE_ENUM_NAMES(Enum, table)                                            \
  template <>                                                                       \
  std::optional<Enum> parse_enum<Enum>(std::string_view text) {                     \
    return parse(table, text);                                                      \
  }                                                                                 \
  template <>                                                                       \
  std::vector<std::string> enum_choices<Enum>() {                                   \
    return choices(table);                                                          \
  }

LAGSIEVE_ENUM_NAMES(TransformKind, kTransformKind)
LAGSIEVE_ENUM_NAMES(MissingPolicy, kMissingPolicy)
LAGSIEVE_ENUM_NAMES(GapPolicy, kGapPolicy)
LAGSIEVE_ENUM_NAMES(EventShape, kEventShape)
LAGSIEVE_ENUM_NAMES(FutureMode, kFutureMode)
LAGSIEVE_ENUM_NAMES(ConstantMode, kConstantMode)
LAGSIEVE_ENUM_NAMES(Strategy, kStrategy)
LAGSIEVE_ENUM_NAMES(Criterion, kCriterion)
LAGSIEVE_ENUM_NAMES(WindowKind, kWindowKind)
LAGSIEVE_ENUM_NAMES(OutlierType, kOutlierType)
LAGSIEVE_ENUM_NAMES(FilterStart, kFilterStart)
LAGSIEVE_ENUM_NAMES(Estimation, kEstimation)
#undef LAGSIEVE_ENUM_NAMES

std::string closest_match(std::string_view word, const std::vector<std::string>& candidates) {
  // "Close" = at most a third of the word's length (at least 1, at most 3) edits away, or the
  // word matches a candidate ignoring case.
  std::string best;
  size_t best_distance = 0;
  const size_t limit = std::clamp<size_t>(word.size() / 3, 1, 3);
  for (const auto& c : candidates) {
    std::string lower_word(word), lower_c(c);
    std::transform(lower_word.begin(), lower_word.end(), lower_word.begin(),
                   [](unsigned char ch) { return static_cast<char>(std::tolower(ch)); });
    std::transform(lower_c.begin(), lower_c.end(), lower_c.begin(),
                   [](unsigned char ch) { return static_cast<char>(std::tolower(ch)); });
    const size_t d = lower_word == lower_c ? 0 : edit_distance(word, c);
    // A suggestion must keep part of the word: "x" is not a typo of "t".
    if (d <= limit && d < word.size() && (best.empty() || d < best_distance)) {
      best = c;
      best_distance = d;
    }
  }
  return best;
}

}  // namespace lagsieve
