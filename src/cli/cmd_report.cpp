// `lagsieve report DIR`: rebuilds report.html and charts/*.svg from the files of a run folder.
#include <fmt/format.h>

#include <memory>
#include <string>

#include "cli/commands.h"
#include "cli/common.h"
#include "report/report.h"

namespace lagsieve::cli {
namespace {

struct ReportArgs {
  std::string dir;
  ReportOptions options;
  bool no_charts = false;
};

int report(const ReportArgs& args) {
  ReportOptions options = args.options;
  options.write_charts = !args.no_charts;
  const ReportResult r = write_report(args.dir, options);
  for (const auto& w : r.warnings) fmt::print(stderr, "lagsieve: warning: {}\n", w);
  fmt::print("report  {} ({} sections, {} charts{})\n", r.path.string(), r.sections.size(),
             r.charts.size(), r.charts.empty() ? "" : " in " + r.charts.front().parent_path().string());
  return kExitOk;
}

}  // namespace

void register_report(CLI::App& app) {
  auto* cmd = app.add_subcommand(
      "report", "Rebuild the HTML report (report.html, charts/*.svg) from a run folder's files");
  auto args = std::make_shared<ReportArgs>();
  cmd->add_option("DIR", args->dir, "Run folder written by search, backtest or revalidate")
      ->required();
  cmd->add_option("--rows", args->options.ranking_rows, "Ranking rows shown per series")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--models", args->options.backtest_models,
                  "Most models drawn in the error-by-horizon chart")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--title", args->options.title, "Page title (default: Run report: <folder>)");
  cmd->add_flag("--no-charts", args->no_charts, "Do not write the standalone SVGs into charts/");
  cmd->callback([args] { finish(run_command([&] { return report(*args); })); });
}

}  // namespace lagsieve::cli
