#include "cli/common.h"

#include <fmt/format.h>
#include <CLI/CLI.hpp>
#include <exception>

#include <algorithm>
#include <cstdio>
#include <regex>

#include "core/error.h"
#include "core/names.h"
#include "batch/batch.h"
#include "data/load.h"
#include "data/panel.h"
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

std::string exit_meaning(int code) {
  switch (code) {
    case kExitOk:
      return "ok";
    case kExitBadInput:
      return "bad input (config, data, model file or options)";
    case kExitInternal:
      return "internal or numerical error";
    case kExitNoModel:
      return "no usable candidate: no model file written";
    case kExitSomeSeriesFailed:
      return "some series failed, the others finished";
    case kExitRefitAdvised:
      return "revalidate verdict: refit";
    case kExitReplaceAdvised:
      return "revalidate verdict: replace";
    default:
      return "unknown";
  }
}

nlohmann::json input_error_json(const InputError& e) {
  nlohmann::json j = {{"kind", "bad_input"}, {"message", e.what()}};
  std::string file = e.file(), key = e.key();
  int line = e.line();
  if (file.empty()) {
    // "path:12: ..." (CSV and YAML syntax errors): the spot from the message.
    static const std::regex spot(R"(^([^:\s][^:]*):(\d+): )");
    std::cmatch m;
    if (std::regex_search(e.what(), m, spot)) {
      file = m[1].str();
      line = std::stoi(m[2].str());
    }
  }
  j["file"] = file.empty() ? nlohmann::json(nullptr) : nlohmann::json(file);
  j["line"] = line > 0 ? nlohmann::json(line) : nlohmann::json(nullptr);
  j["key"] = key.empty() ? nlohmann::json(nullptr) : nlohmann::json(key);
  return j;
}

int print_json_result(nlohmann::json& j, int code) {
  j["exit_code"] = code;
  j["exit_meaning"] = exit_meaning(code);
  fmt::print("{}\n", j.dump(2));
  std::fflush(stdout);
  return code;
}

int run_command_json(bool json, const std::string& command, const std::string& config,
                     const std::function<int()>& body) {
  if (!json) return run_command(body);
  nlohmann::json error;
  int code = kExitOk;
  try {
    return body();
  } catch (const InputError& e) {
    fmt::print(stderr, "lagsieve: error: {}\n", e.what());
    error = input_error_json(e);
    code = kExitBadInput;
  } catch (const NumericalError& e) {
    fmt::print(stderr, "lagsieve: numerical error: {}\n", e.what());
    error = {{"kind", "numerical"}, {"message", e.what()}};
    code = kExitInternal;
  } catch (const std::exception& e) {
    fmt::print(stderr, "lagsieve: internal error: {}\n", e.what());
    error = {{"kind", "internal"}, {"message", e.what()}};
    code = kExitInternal;
  }
  nlohmann::json j = {{"command", command}, {"config", config}, {"error", error}};
  return print_json_result(j, code);
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

namespace {

// One series of a long-format panel, named by --series (fit, backtest, screen, revalidate work on
// one series; `search` runs them all).
void load_panel_run(LoadedRun& run, const std::vector<std::string>& only) {
  const RunConfig& config = run.config;
  if (only.empty()) {
    const auto parts = load_panel(config, {});
    std::string examples;
    for (size_t i = 0; i < parts.size() && i < 3; ++i)
      examples += fmt::format("{}'{}'", i ? ", " : "", parts[i].key);
    throw InputError(fmt::format(
        "{}: data.series_key '{}' makes {} a panel of {} series{}; this command works on one: "
        "give --series NAME (a value of column '{}'), or run every series with `lagsieve search`",
        config.config_file.string(), config.data.series_key, config.data.file.string(),
        parts.size(), examples.empty() ? "" : " (" + examples + (parts.size() > 3 ? ", ..." : "") + ")",
        config.data.series_key));
  }
  for (const auto& part : load_panel(config, only)) {
    RunConfig own = config;
    try {
      run.series.push_back(load_panel_series(own, part));
    } catch (const InputError& e) {
      throw InputError(fmt::format("series '{}' ({} '{}'): {}", part.key, "data.series_key",
                                   config.data.series_key, e.what()));
    }
  }
}

}  // namespace

LoadedRun load_run(const std::filesystem::path& config_file, const std::vector<std::string>& only) {
  LoadedRun run;
  run.config = load_config(config_file);
  if (!run.config.data.series_key.empty()) {
    load_panel_run(run, only);
    apply_seasonal_default(run.config, run.series.front());
    return run;
  }
  select_target_columns(run.config, only);
  run.series = load_series(run.config);
  apply_seasonal_default(run.config, run.series.front());
  return run;
}

SeriesData load_panel_history(const RunConfig& config, const std::filesystem::path& csv,
                              const std::string& key) {
  RunConfig own = config;
  own.data.file = csv;
  auto parts = index_panel(csv, config.data.series_key, "data.series_key");
  const auto it = std::find_if(parts.begin(), parts.end(),
                               [&](const PanelPart& p) { return p.key == key; });
  if (it == parts.end())
    throw InputError(fmt::format(
        "{}: no rows of series '{}' (column '{}', data.series_key of the model's config); give "
        "a file with that series' rows",
        csv.string(), key, config.data.series_key));
  return load_panel_series(own, *it);
}

LoadedRun load_run_one(const std::filesystem::path& config_file, const std::string& series) {
  if (load_config(config_file).data.series_key.empty()) return load_run(config_file);
  return load_run(config_file, series.empty() ? std::vector<std::string>{}
                                              : std::vector<std::string>{series});
}

}  // namespace lagsieve::cli
