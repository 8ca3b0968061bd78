#pragma once
// A warning as it is raised: a stable code, the sentence people read, and its numbers (and names),
// so JSON outputs carry `{"code", "message", "values"}` beside the text list. The codes are listed
// in docs/warnings.md; a new kind gets a new code there.
#include <nlohmann/json.hpp>

#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace lagsieve {

struct Warning {
  std::string code;     // e.g. "near_cancellation"; stable across releases
  std::string message;  // the whole sentence, as printed and as in the text `warnings` lists
  std::vector<std::pair<std::string, double>> numbers;     // e.g. {"p_value", 0.003}
  std::vector<std::pair<std::string, std::string>> names;  // e.g. {"input", "temp"}

  bool is(std::string_view c) const { return code == c; }
  // The number named `key`, NaN when absent.
  double number(std::string_view key) const;
};

// The text list people read (one message per warning), e.g. fit.json's `warnings`.
std::vector<std::string> warning_texts(const std::vector<Warning>& warnings);

// `[{"code", "message", "values": {name: number or text}}]`; non-finite numbers as null.
nlohmann::json warnings_json(const std::vector<Warning>& warnings);

// The inverse of warnings_json (files read back, e.g. a shard's summary at merge); a text-only
// list (files of older releases) becomes warnings of code "unspecified".
std::vector<Warning> warnings_from_json(const nlohmann::json& structured,
                                        const nlohmann::json& texts);

}  // namespace lagsieve
