#pragma once
// Shared pieces of the command-line front: exit codes, error handling, config + data loading.
#include <filesystem>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "core/config.h"
#include "core/error.h"
#include "core/series.h"

namespace lagsieve::cli {

// Exit codes of every command (documented in README.md, "Exit codes").
inline constexpr int kExitOk = 0;
inline constexpr int kExitBadInput = 2;          // InputError: config, CSV, model file, options
inline constexpr int kExitInternal = 3;          // numerical failure or a bug
inline constexpr int kExitNoModel = 4;           // `search`: no usable candidate, no model file
inline constexpr int kExitSomeSeriesFailed = 5;  // `search` of many series: some failed, rest done
inline constexpr int kExitRefitAdvised = 10;     // `revalidate`: verdict refit
inline constexpr int kExitReplaceAdvised = 11;   // `revalidate`: verdict replace

// Runs a command body and maps exceptions to exit codes: InputError -> message on stderr
// ("lagsieve: error: ...") and 2; NumericalError and anything else -> 3.
int run_command(const std::function<int()>& body);

// The README's one-line meaning of an exit code ("ok", "bad input", ...).
std::string exit_meaning(int code);

// The same for a command with --json: with `json`, an error is also one JSON object on stdout,
// `{"command", "config", "error": {"kind", "message", "file", "line", "key"}, "exit_code",
// "exit_meaning"}` (file/line/key where known), so a caller always has an object to parse.
int run_command_json(bool json, const std::string& command, const std::string& config,
                     const std::function<int()>& body);

// {"kind": "bad_input", "message", "file", "line", "key"} of an InputError: the fields the YAML
// reader sets, else read from a leading "file:line: " of the message (CSV errors).
nlohmann::json input_error_json(const InputError& e);

// Sets "exit_code" and "exit_meaning" and prints the object on stdout; returns `code`.
int print_json_result(nlohmann::json& j, int code);

// Throws the exit code out of a CLI11 callback so main() returns it.
[[noreturn]] void finish(int code);

struct LoadedRun {
  RunConfig config;
  std::vector<SeriesData> series;  // one per target column
};

// The worker threads of a command: --threads when given, else the config's search.threads.
// One rule for both (0 = all cores, at most kMaxThreads); throws InputError naming --threads.
int checked_threads(const std::optional<int>& option, int config_value);

// Throws InputError naming the option when `path` is not an existing regular file (a data file
// given on the command line is blamed on its option, not on the config's data.file).
void require_file(const std::string& path, const std::string& option);

// Reads and validates the config, then loads and checks the data of every target column (only
// the columns in `only` when it is not empty: `--series` on a wide panel).
// With `data.series_key` (a long-format panel) `only` names the series to load (its keys); without
// it the command is refused, naming the key and what to give (--series NAME).
LoadedRun load_run(const std::filesystem::path& config_file,
                   const std::vector<std::string>& only = {});

// Keeps only the target columns named in `only` (each must be one: InputError naming it).
void select_target_columns(RunConfig& config, const std::vector<std::string>& only);

// For the commands that work on one series (fit, backtest, screen, revalidate): on a long-format
// panel the series `series` (its key; required), otherwise load_run of every target column (the
// command picks `series` among them).
LoadedRun load_run_one(const std::filesystem::path& config_file, const std::string& series);

// The rows of series `key` of a long-format file `csv` (the key column of config.data.series_key),
// checked as the series of a search; InputError naming the file and key when it has no such rows.
SeriesData load_panel_history(const RunConfig& config, const std::filesystem::path& csv,
                              const std::string& key);

}  // namespace lagsieve::cli
