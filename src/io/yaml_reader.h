#pragma once
// Typed access to a YAML tree with the file name in hand, so every error message points at the
// file, line and key path (`file:line: key.path: what is wrong and what to do`). Shared by the
// run config and the simulation spec readers.
#include <yaml-cpp/yaml.h>

#include <limits>
#include <string>
#include <vector>

namespace lagsieve {

std::string join_comma(const std::vector<std::string>& items);          // "a, b, c"
std::string key_path(const std::string& path, const std::string& key);  // "path.key" or "key"

class YamlReader {
 public:
  explicit YamlReader(std::string source) : source_(std::move(source)) {}

  // Throws InputError "source:line: path: what".
  [[noreturn]] void fail(const YAML::Node& node, const std::string& path,
                         const std::string& what) const;

  // "nothing", "a list", "a mapping" or the quoted scalar: what the user wrote instead.
  static std::string describe(const YAML::Node& node);

  // Requires a mapping whose keys are all in `allowed`, each once; an unknown key suggests the
  // closest valid one.
  void check_map(const YAML::Node& node, const std::string& path,
                 const std::vector<std::string>& allowed) const;

  void require_scalar(const YAML::Node& node, const std::string& path,
                      const std::string& expected) const;

  long long get_integer(const YAML::Node& node, const std::string& path, long long min_value,
                        long long max_value) const;
  int get_int(const YAML::Node& node, const std::string& path, int min_value = 0,
              int max_value = std::numeric_limits<int>::max()) const;
  double get_double(const YAML::Node& node, const std::string& path) const;  // finite only
  bool get_bool(const YAML::Node& node, const std::string& path) const;      // true/false/yes/no
  std::string get_string(const YAML::Node& node, const std::string& path) const;  // non-empty
  // `0.7`, `[0.7, -0.2]` or `[]`: a list of finite numbers.
  std::vector<double> get_list(const YAML::Node& node, const std::string& path) const;


 private:
  std::string source_;
};

}  // namespace lagsieve
