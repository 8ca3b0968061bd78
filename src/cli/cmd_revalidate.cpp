// `lagsieve revalidate MODEL CONFIG`: is the deployed model still good on the rows that arrived
// after its training data, and is there a better one? Writes revalidation.json, the re-fitted and
// the challenger's model files, the challenger ranking and the new-period backtest tables,
// then the report. Exit codes: 0 keep, 10 refit advised, 11 replace advised, 2 bad input.
#include <fmt/format.h>

#include <filesystem>
#include <memory>
#include <optional>
#include <string>

#include "cli/commands.h"
#include "cli/common.h"
#include "cli/search_run.h"
#include "core/error.h"
#include "forecast/model_file.h"
#include "io/atomic_file.h"
#include "report/report.h"
#include "revalidate/revalidate.h"
#include "search/ranking.h"
#include "search/run_folder.h"

namespace lagsieve::cli {
namespace {

struct RevalidateArgs {
  std::string model;
  std::string config;
  std::string out;
  bool allow_revised_history = false;
  bool json = false;
  bool quiet = false;
  std::optional<int> threads;
  double alpha = 0.05;
  double drift_threshold = 3.0;
  std::optional<int> min_new_rows;  // default: the config's revalidate.min_new_rows (1)
};

int exit_code(Verdict v) {
  switch (v) {
    case Verdict::keep:
      return kExitOk;
    case Verdict::refit:
      return kExitRefitAdvised;
    case Verdict::replace:
      return kExitReplaceAdvised;
  }
  return kExitInternal;
}

int run_revalidate(const RevalidateArgs& args) {
  const FittedModel model = load_model(args.model);
  const LoadedRun run = load_run_one(args.config, model.training.target_column);
  // The series the model was trained on: its target column among the config's targets.
  const SeriesData* data = nullptr;
  std::string targets;
  for (const auto& s : run.series) {
    if (s.target_name == model.training.target_column || model.training.target_column.empty()) {
      data = &s;
      break;
    }
    targets += (targets.empty() ? "" : ", ") + s.target_name;
  }
  if (!data)
    throw InputError(
        fmt::format("{}: the model was trained on target '{}', which {} does not load "
                    "(its targets: {}); name that column under target",
                    args.model, model.training.target_column, args.config, targets));

  RevalidateOptions options;
  options.allow_revised_history = args.allow_revised_history;
  options.alpha = args.alpha;
  options.drift_threshold = args.drift_threshold;
  options.min_new_rows = args.min_new_rows.value_or(run.config.revalidate.min_new_rows);
  options.threads = checked_threads(args.threads, run.config.search.threads);
  options.progress = progress_printer(args.quiet, data->target_name + " challengers");
  const RevalidationResult r = revalidate(model, *data, run.config, options);

  const std::filesystem::path out =
      args.out.empty() ? run.config.output.dir / "revalidation" : std::filesystem::path(args.out);
  std::filesystem::create_directories(out);
  const nlohmann::ordered_json doc = to_json(r);
  write_file_atomic(out / run_files::kRevalidation, doc.dump(2) + "\n");
  if (r.refit_model) save_model(out / kRefitModelFile, *r.refit_model);
  if (r.challenger_model) save_model(out / kChallengerModelFile, *r.challenger_model);
  write_file_atomic(out / run_files::kRankingCsv, ranking_csv(r.search.rows, run.config));
  write_file_atomic(out / run_files::kRankingJson,
                    ranking_json(r.search.rows, run.config).dump(2) + "\n");
  write_file_atomic(out / run_files::kBacktest, backtest_csv(r.comparison));
  write_file_atomic(out / run_files::kAccuracy, accuracy_csv(r.comparison));
  write_file_atomic(out / run_files::kComparisons, comparisons_csv(r.comparison));
  std::string report_note;
  try {
    write_report(out);
  } catch (const std::exception& e) {
    // The verdict stands without the report; say why it is missing.
    report_note = fmt::format("report not written: {}", e.what());
  }

  if (args.json) {
    fmt::print("{}\n", doc.dump(2));
  } else {
    fmt::print("{}", summary_text(r));
    fmt::print("\nfolder: {}\n", out.string());
  }
  if (!report_note.empty()) fmt::print(stderr, "lagsieve: warning: {}\n", report_note);
  return exit_code(r.verdict);
}

}  // namespace

void register_revalidate(CLI::App& app) {
  auto* cmd = app.add_subcommand("revalidate",
                                 "Re-check a deployed model on the rows after its training data "
                                 "and against fresh challengers; "
                                 "exit 0 keep, 10 refit advised, 11 replace advised, 2 bad input");
  auto args = std::make_shared<RevalidateArgs>();
  cmd->add_option("MODEL", args->model, "The deployed model file (JSON from fit --save or search)")
      ->required();
  cmd->add_option("CONFIG", args->config,
                  "Run configuration (YAML) whose data hold the training rows and the new ones")
      ->required();
  cmd->add_option("--out", args->out,
                  "Output folder (default: <output.dir of the config>/revalidation)");
  cmd->add_flag("--allow-revised-history", args->allow_revised_history,
                "Go on when the training rows differ from the data the model was trained on");
  cmd->add_flag("--json", args->json, "Print the JSON summary instead of the readable one");
  cmd->add_flag("--quiet", args->quiet, "No progress on stderr");
  cmd->add_option("--threads", args->threads,
                  "Worker threads (default: search.threads; 0 = all cores)");
  cmd->add_option("--alpha", args->alpha, "False-alarm level of a verdict other than keep")
      ->capture_default_str();
  cmd->add_option(
      "--min-new-rows", args->min_new_rows,
      "Fewest new observed target values to re-validate on (default: revalidate.min_new_rows "
      "of the config, else 1; few values give a verdict with a thin-evidence note)");
  cmd->add_option("--drift-threshold", args->drift_threshold,
                  "Flag a parameter that moved more than this many original standard errors")
      ->capture_default_str();
  cmd->callback([args] { finish(run_command([&] { return run_revalidate(*args); })); });
}

}  // namespace lagsieve::cli
