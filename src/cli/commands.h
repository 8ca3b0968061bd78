#pragma once
// One registration function per subcommand; each adds its options and callback to the app.
#include <CLI/CLI.hpp>

namespace lagsieve::cli {

void register_validate(CLI::App& app);
void register_fit(CLI::App& app);
void register_forecast(CLI::App& app);
void register_screen(CLI::App& app);
void register_search(CLI::App& app);
void register_backtest(CLI::App& app);
void register_revalidate(CLI::App& app);
void register_report(CLI::App& app);
void register_simulate(CLI::App& app);
void register_merge(CLI::App& app);

}  // namespace lagsieve::cli
