// `lagsieve search CONFIG`: the main job. Fits every candidate the config allows on one common
// sample, ranks them, writes the ranking and the chosen model's model file.
#include <memory>

#include "cli/commands.h"
#include "cli/common.h"
#include "cli/search_run.h"

namespace lagsieve::cli {

void register_search(CLI::App& app) {
  auto* cmd = app.add_subcommand(
      "search",
      "Search inputs, delays, orders and noise models; rank, backtest, write a run folder");
  auto args = std::make_shared<SearchArgs>();
  cmd->add_option("CONFIG", args->config, "Run configuration (YAML)")->required();
  cmd->add_option(
      "--out", args->out,
      "Output folder (default: output.dir of the config); replaced as a whole unless --resume");
  cmd->add_flag("--resume", args->resume, "Skip the candidates the folder's journal already holds");
  cmd->add_flag("--quiet", args->quiet, "No progress on stderr");
  cmd->add_option("--threads", args->threads,
                  "Worker threads (default: search.threads; 0 = all cores)");
  cmd->add_option("--series", args->series,
                  "Run only this series (a key of data.series_key, or a target column); repeatable")
      ->expected(1)
      ->take_all();
  cmd->add_option("--shard", args->shard,
                  "Run only shard K of N of the series (K/N, e.g. 2/8) into its own folder; "
                  "join the shards with `lagsieve merge`");
  cmd->add_option("--pages-worst", args->pages_worst,
                  "Panels: series per 'worst' table of the report, each given a page (default 10)")
      ->check(CLI::Range(0, 100000));
  cmd->add_option("--pages-sample", args->pages_sample,
                  "Panels: further series, spread over the keys, given a page (default 5)")
      ->check(CLI::Range(0, 100000));
  cmd->add_flag("--no-backtest", args->no_backtest, "Skip the backtest even if the config has one");
  cmd->add_flag("--json", args->json,
                "Print one JSON object (what ran, statuses, files) instead of the summary");
  cmd->callback([args] {
    finish(run_command_json(args->json, "search", args->config,
                            [&] { return run_search_command(*args); }));
  });
}

}  // namespace lagsieve::cli
