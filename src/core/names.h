#pragma once
// Enum spellings shared by YAML, CSV, JSON and reports, in one place.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/config.h"

namespace lagsieve {

std::string_view to_string(TransformKind v);
std::string_view to_string(MissingPolicy v);
std::string_view to_string(GapPolicy v);
std::string_view to_string(EventShape v);
std::string_view to_string(FutureMode v);
std::string_view to_string(ConstantMode v);
std::string_view to_string(Strategy v);
std::string_view to_string(Criterion v);
std::string_view to_string(WindowKind v);
std::string_view to_string(OutlierType v);
std::string_view to_string(FilterStart v);
std::string_view to_string(Estimation v);

// Parses a spelling; std::nullopt when unknown. `choices` lists the valid spellings for messages.
template <typename Enum>
std::optional<Enum> parse_enum(std::string_view text);
template <typename Enum>
std::vector<std::string> enum_choices();

// The explicit specialisations defined in names.cpp, declared so every user sees them.
#define LAGSIEVE_DECLARE_ENUM_NAMES(Enum)                       \
  template <>                                                   \
  std::optional<Enum> parse_enum<Enum>(std::string_view text);  \
  template <>                                                   \
  std::vector<std::string> enum_choices<Enum>();
LAGSIEVE_DECLARE_ENUM_NAMES(TransformKind)
LAGSIEVE_DECLARE_ENUM_NAMES(MissingPolicy)
LAGSIEVE_DECLARE_ENUM_NAMES(GapPolicy)
LAGSIEVE_DECLARE_ENUM_NAMES(EventShape)
LAGSIEVE_DECLARE_ENUM_NAMES(FutureMode)
LAGSIEVE_DECLARE_ENUM_NAMES(ConstantMode)
LAGSIEVE_DECLARE_ENUM_NAMES(Strategy)
LAGSIEVE_DECLARE_ENUM_NAMES(Criterion)
LAGSIEVE_DECLARE_ENUM_NAMES(WindowKind)
LAGSIEVE_DECLARE_ENUM_NAMES(OutlierType)
LAGSIEVE_DECLARE_ENUM_NAMES(FilterStart)
LAGSIEVE_DECLARE_ENUM_NAMES(Estimation)
#undef LAGSIEVE_DECLARE_ENUM_NAMES

// The closest of `candidates` to `word` by edit distance, or "" when none is close.
std::string closest_match(std::string_view word, const std::vector<std::string>& candidates);

}  // namespace lagsieve
