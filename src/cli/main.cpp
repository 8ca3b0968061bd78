// The `lagsieve` command line: a thin driver over the library; every subcommand registers itself.
#include <CLI/CLI.hpp>

#include "cli/commands.h"
#include "cli/common.h"

#ifndef LAGSIEVE_VERSION
#define LAGSIEVE_VERSION "unknown"
#endif

int main(int argc, char** argv) {
  CLI::App app{
      "lagsieve: selects, backtests and re-validates multi-input transfer-function forecasting "
      "models from one YAML config.\n"
      "Exit codes: 0 ok, 2 bad input, 3 internal or numerical error, 10/11 revalidate verdicts.",
      "lagsieve"};
  app.set_version_flag("--version", std::string("lagsieve ") + LAGSIEVE_VERSION);
  app.require_subcommand(1);
  app.fallthrough(false);

  namespace cli = lagsieve::cli;
  cli::register_validate(app);
  cli::register_fit(app);
  cli::register_forecast(app);
  cli::register_screen(app);
  cli::register_search(app);
  cli::register_backtest(app);
  cli::register_revalidate(app);
  cli::register_report(app);
  cli::register_simulate(app);
  cli::register_merge(app);

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    // Usage errors (unknown option, missing argument) are bad input; --help/--version exit 0;
    // finish() arrives here as a RuntimeError carrying the command's exit code.
    const int code = app.exit(e);
    if (dynamic_cast<const CLI::RuntimeError*>(&e) != nullptr) return code;
    return code == 0 ? cli::kExitOk : cli::kExitBadInput;
  }
  return cli::kExitOk;
}
