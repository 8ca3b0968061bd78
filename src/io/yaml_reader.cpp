#include "io/yaml_reader.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <limits>
#include <set>

#include "core/error.h"
#include "core/names.h"

namespace lagsieve {

std::string join_comma(const std::vector<std::string>& items) {
  std::string out;
  for (const auto& s : items) {
    if (!out.empty()) out += ", ";
    out += s;
  }
  return out;
}

std::string key_path(const std::string& path, const std::string& key) {
  return path.empty() ? key : path + "." + key;
}

void YamlReader::fail(const YAML::Node& node, const std::string& path,
                      const std::string& what) const {
  const int line = node.Mark().is_null() ? 0 : node.Mark().line + 1;
  if (path.empty())
    throw InputError(fmt::format("{}:{}: {}", source_, line, what), source_, line, "");
  throw InputError(fmt::format("{}:{}: {}: {}", source_, line, path, what), source_, line, path);
}

std::string YamlReader::describe(const YAML::Node& node) {
  if (node.IsNull()) return "nothing";
  if (node.IsSequence()) return "a list";
  if (node.IsMap()) return "a mapping";
  return fmt::format("'{}'", node.Scalar());
}

void YamlReader::check_map(const YAML::Node& node, const std::string& path,
                           const std::vector<std::string>& allowed) const {
  if (!node.IsMap())
    fail(node, path,
         fmt::format("expected a mapping of keys ({}), got {}", join_comma(allowed),
                     describe(node)));
  std::set<std::string> seen;
  for (const auto& kv : node) {
    const auto key = kv.first.Scalar();
    if (std::find(allowed.begin(), allowed.end(), key) == allowed.end()) {
      const auto guess = closest_match(key, allowed);
      fail(kv.first, key_path(path, key),
           guess.empty() ? fmt::format("unknown key; valid keys here: {}", join_comma(allowed))
                         : fmt::format("unknown key; did you mean `{}`? (valid keys here: {})",
                                       guess, join_comma(allowed)));
    }
    if (!seen.insert(key).second) fail(kv.first, key_path(path, key), "key given twice; keep one");
  }
}

void YamlReader::require_scalar(const YAML::Node& node, const std::string& path,
                                const std::string& expected) const {
  if (!node.IsScalar())
    fail(node, path, fmt::format("expected {}, got {}", expected, describe(node)));
}

long long YamlReader::get_integer(const YAML::Node& node, const std::string& path,
                                  long long min_value, long long max_value) const {
  require_scalar(node, path, "an integer");
  const auto& s = node.Scalar();
  const char* b = s.data();
  const char* e = s.data() + s.size();
  if (b != e && *b == '+') ++b;
  long long v = 0;
  const auto [p, ec] = std::from_chars(b, e, v);
  if (ec != std::errc() || p != e || b == e)
    fail(node, path, fmt::format("expected an integer, got '{}'", s));
  if (v < min_value) fail(node, path, fmt::format("must be at least {}, got {}", min_value, v));
  if (v > max_value) fail(node, path, fmt::format("must be at most {}, got {}", max_value, v));
  return v;
}

int YamlReader::get_int(const YAML::Node& node, const std::string& path, int min_value,
                        int max_value) const {
  return static_cast<int>(get_integer(node, path, min_value, max_value));
}

double YamlReader::get_double(const YAML::Node& node, const std::string& path) const {
  require_scalar(node, path, "a number");
  const auto& s = node.Scalar();
  const char* b = s.data();
  const char* e = s.data() + s.size();
  if (b != e && *b == '+') ++b;
  double v = 0.0;
  const auto [p, ec] = std::from_chars(b, e, v);
  if (ec != std::errc() || p != e || b == e || !std::isfinite(v))
    fail(node, path, fmt::format("expected a finite number, got '{}'", s));
  return v;
}

bool YamlReader::get_bool(const YAML::Node& node, const std::string& path) const {
  require_scalar(node, path, "true or false");
  const auto& s = node.Scalar();
  if (s == "true" || s == "yes") return true;
  if (s == "false" || s == "no") return false;
  fail(node, path, fmt::format("expected true or false, got '{}'", s));
}

std::string YamlReader::get_string(const YAML::Node& node, const std::string& path) const {
  require_scalar(node, path, "a text value");
  if (node.Scalar().empty()) fail(node, path, "must not be empty");
  return node.Scalar();
}

std::vector<double> YamlReader::get_list(const YAML::Node& node, const std::string& path) const {
  std::vector<double> out;
  if (node.IsScalar()) {
    out.push_back(get_double(node, path));
  } else if (node.IsSequence()) {
    for (size_t i = 0; i < node.size(); ++i)
      out.push_back(get_double(node[i], fmt::format("{}[{}]", path, i)));
  } else if (!node.IsNull()) {
    fail(node, path,
         fmt::format("expected a number or a list of numbers such as [0.5, -0.2], got {}",
                     describe(node)));
  }
  return out;
}

}  // namespace lagsieve
