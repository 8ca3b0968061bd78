#include "cli/common.h"

#include <fmt/format.h>
#include <CLI/CLI.hpp>
#include <exception>

#include <algorithm>

#include "core/error.h"
#include "core/names.h"
#include "data/load.h"
#include "io/config.h"

namespace lagsieve::cli {

int run_command(const std::function<int()>& body) {
  try {
    return body();
  } catch (const InputError& e) {
    fmt::print(stderr, "lagsieve: error: {}\n", e.what());
    return kExitBadInput;
  } catch (const NumericalError& e) {
    fmt::print(stderr, "lagsieve: numerical error: {}\n", e.what());
    return kExitInternal;
  } catch (const std::exception& e) {
    fmt::print(stderr, "lagsieve: internal error: {}\n", e.what());
    return kExitInternal;
  }
}

void finish(int code) { throw CLI::RuntimeError(code); }

int checked_threads(const std::optional<int>& option, int config_value) {
  if (!option) return config_value;  // search.threads is checked when the config is read
  if (*option < 0 || *option > kMaxThreads)
    throw InputError(
        fmt::format("--threads {}: must be between 0 (all cores) and {}", *option, kMaxThreads));
  return *option;
}

void require_file(const std::string& path, const std::string& option) {
  std::error_code ec;
  if (path.empty()) throw InputError(fmt::format("{} '': the file name is empty", option));
  if (!std::filesystem::exists(path, ec))
    throw InputError(
        fmt::format("{} '{}': the file does not exist; check the path (relative to "
                    "the current folder)",
                    option, path));
  if (!std::filesystem::is_regular_file(path, ec))
    throw InputError(
        fmt::format("{} '{}' is not a file (a folder?); give a CSV file", option, path));
}

void select_target_columns(RunConfig& config, const std::vector<std::string>& only) {
  if (only.empty()) return;
  for (const auto& name : only)
    if (std::find(config.target.columns.begin(), config.target.columns.end(), name) ==
        config.target.columns.end()) {
      const auto guess = closest_match(name, config.target.columns);
      throw InputError(fmt::format(
          "--series '{}': not a series of {} (target.columns){}", name, config.config_file.string(),
          guess.empty() ? "" : fmt::format("; did you mean '{}'?", guess)));
    }
  std::erase_if(config.target.columns, [&](const std::string& c) {
    return std::find(only.begin(), only.end(), c) == only.end();
  });
}

LoadedRun load_run(const std::filesystem::path& config_file, const std::vector<std::string>& only) {
  LoadedRun run;
  run.config = load_config(config_file);
  select_target_columns(run.config, only);
  run.series = load_series(run.config);
  apply_seasonal_default(run.config, run.series.front());
  return run;
}

}  // namespace lagsieve::cli
