// A run folder belongs to one run (the built binary): a second run into a folder in use is
// refused naming the holder's pid, a dead holder's lock is taken over, a re-run replaces the
// folder as a whole (no file of the old run survives, stale temporary files go), a folder with
// foreign files is never replaced, a search with no usable candidate writes no model file, and
// `backtest` writes a complete run folder of its own without touching the search's files.
#include <fcntl.h>
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <string>
#include <thread>
#include <vector>

#include <nlohmann/json.hpp>

#include "search_test_util.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;
using testing::run_lagsieve;
using testing::slurp;

// Every regular file below `dir`, relative, with its content.
std::map<std::string, std::string> files_of(const fs::path& dir) {
  std::map<std::string, std::string> out;
  if (!fs::exists(dir)) return out;
  for (const auto& e : fs::recursive_directory_iterator(dir))
    if (e.is_regular_file()) out[fs::relative(e.path(), dir).string()] = slurp(e.path());
  return out;
}

std::string config(const std::string& inputs_extra, const std::string& noise,
                   const std::string& tail) {
  return "data: {file: data.csv, time: t}\ntarget: {column: y}\ninputs:\n"
         "  - column: x1\n    delay: [0, 2]\n    numerator: [0, 1]\n" +
         inputs_extra + "noise: " + noise + "\nsearch: {threads: 2}\n" + tail;
}

const std::string kBacktest = "backtest: {first_origin: 150, step: 10, horizon: 4, shortlist: 3}\n";

class RunFolder : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    root_ = fs::temp_directory_path() / ("lagsieve_run_folder_" + std::to_string(::getpid()));
    fs::remove_all(root_);
    fs::create_directories(root_);
    testing::SearchCase c;
    c.n = 200;
    c.seed = 77;
    c.inputs = {{"x1", {1, 1, 0}, {1.0, 0.5}, {}, 0.5, {0, 2}, {0, 1}, {0, 0}, false},
                {"x2", {}, {0.0}, {}, 0.5, {0, 0}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 0, 0, 0, 1};
    c.phi = {0.5};
    SeriesData data = simulate(testing::simulation_of(c));
    testing::write_series_csv(root_ / "data.csv", data);
    // x3 = x1 exactly: every candidate that holds both fails.
    data.input_names.push_back("x3");
    data.inputs.push_back(data.inputs[0]);
    testing::write_series_csv(root_ / "copy.csv", data);
    write("with_backtest.yaml", config("", "{ar: [0, 1]}", kBacktest));
    write("no_backtest.yaml", config("  - column: x2\n    optional: true\n", "{ar: 1}", ""));
  }
  static void TearDownTestSuite() { fs::remove_all(root_); }

  static void write(const std::string& name, const std::string& text) {
    std::ofstream(root_ / name) << text;
  }
  static testing::CommandResult lagsieve(const std::string& args) {
    return run_lagsieve(root_, args);
  }

  static inline fs::path root_;
};

TEST_F(RunFolder, ReRunReplacesTheFolderAsAWhole) {
  const fs::path out = root_ / "rerun";
  auto r = lagsieve("search with_backtest.yaml --out rerun --quiet");
  ASSERT_EQ(r.code, 0) << r.err;
  for (const char* f : {"backtest.csv", "accuracy.csv", "model.json", "report.html", "run.json"})
    EXPECT_TRUE(fs::exists(out / f)) << f;
  EXPECT_FALSE(fs::exists(out / "lagsieve.lock")) << "the lock outlives the run";
  EXPECT_FALSE(fs::exists(root_ / ".rerun.lagsieve-next"));
  const auto first = files_of(out);
  // A write cut short by a kill leaves a temporary file; the next run must not keep it.
  std::ofstream(out / "ranking.csv.tmp.99999.0") << "half";
  // A folder first written by the previous release holds the ranking under its legacy name.
  std::ofstream(out / "leaderboard.csv") << "rank,model\n";  // legacy

  r = lagsieve("search no_backtest.yaml --out rerun --quiet");
  ASSERT_EQ(r.code, 0) << r.err;
  const auto second = files_of(out);
  for (const char* f : {"backtest.csv", "accuracy.csv", "comparisons.csv", "input_value.csv",
                        "ranking.csv.tmp.99999.0", "leaderboard.csv"})  // legacy
    EXPECT_FALSE(fs::exists(out / f)) << f << " of the first run survived";
  for (const auto& [name, text] : second) {
    if (name == "journal.jsonl" || name.rfind("charts", 0) == 0) continue;
    const auto it = first.find(name);
    if (it != first.end()) {
      EXPECT_NE(it->second, text) << name << " is the first run's file";
    }
  }
  // The marker names this run and says it completed.
  const auto marker = nlohmann::json::parse(slurp(out / "run.json"));
  EXPECT_EQ(marker["command"], "search");
  EXPECT_EQ(marker["status"], "complete");
  EXPECT_NE(marker["run"], nlohmann::json::parse(first.at("run.json"))["run"]);
  EXPECT_NE(slurp(out / "ranking.csv").find("x2"), std::string::npos);
}

TEST_F(RunFolder, SecondRunIsRefusedWhileTheFirstRunsAndADeadHoldersLockIsTakenOver) {
  // A grid large enough to keep one thread busy for a while.
  write("slow.yaml",
        "data: {file: data.csv, time: t}\ntarget: {column: y}\ninputs:\n"
        "  - column: x1\n    delay: [0, 6]\n    numerator: [0, 2]\n    denominator: [0, 1]\n"
        "  - column: x2\n    delay: [0, 3]\n    numerator: [0, 1]\n    optional: true\n"
        "noise: {ar: [0, 2], ma: [0, 2]}\nsearch: {threads: 1}\n");
  const fs::path out = root_ / "busy";
  const std::string binary = LAGSIEVE_BINARY;
  const pid_t first = ::fork();
  if (first == 0) {
    const int devnull = ::open("/dev/null", O_WRONLY);
    ::dup2(devnull, STDOUT_FILENO);
    ::dup2(devnull, STDERR_FILENO);
    const std::string cfg = (root_ / "slow.yaml").string(), dir = out.string();
    ::execl(binary.c_str(), binary.c_str(), "search", cfg.c_str(), "--out", dir.c_str(), "--quiet",
            static_cast<char*>(nullptr));
    ::_exit(127);
  }
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(30);
  while (!fs::exists(root_ / ".busy.lagsieve-next" / "journal.jsonl") &&
         std::chrono::steady_clock::now() < deadline)
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  ASSERT_TRUE(fs::exists(out / "lagsieve.lock"));

  const auto r = lagsieve("search no_backtest.yaml --out busy --quiet");
  int status = 0;
  EXPECT_EQ(::waitpid(first, &status, WNOHANG), 0) << "the first run ended too soon for the test";
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("in use by another lagsieve run (pid " + std::to_string(first) + ")"),
            std::string::npos)
      << r.err;
  EXPECT_FALSE(fs::exists(out / "ranking.csv"));

  // The first run dies without releasing anything; its lock file stays but holds nothing.
  ::kill(first, SIGKILL);
  ::waitpid(first, &status, 0);
  ASSERT_TRUE(fs::exists(out / "lagsieve.lock"));
  const auto again = lagsieve("search no_backtest.yaml --out busy --quiet");
  EXPECT_EQ(again.code, 0) << again.err;
  EXPECT_NE(again.err.find("took over the lock of 'busy' left by pid " + std::to_string(first)),
            std::string::npos)
      << again.err;
  EXPECT_TRUE(fs::exists(out / "model.json"));
  EXPECT_FALSE(fs::exists(out / "lagsieve.lock"));
  EXPECT_FALSE(fs::exists(root_ / ".busy.lagsieve-next")) << "the killed run's staging survived";
}

TEST_F(RunFolder, FolderWithForeignFilesOrAnotherCommandsRunIsNotReplaced) {
  fs::create_directories(root_ / "mine");
  std::ofstream(root_ / "mine" / "notes.txt") << "keep me";
  auto r = lagsieve("search no_backtest.yaml --out mine --quiet");
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("--out 'mine' holds 'notes.txt', which no lagsieve run writes"),
            std::string::npos)
      << r.err;
  EXPECT_EQ(files_of(root_ / "mine").size(), 1u);
  EXPECT_FALSE(fs::exists(root_ / ".mine.lagsieve-next"));
}

TEST_F(RunFolder, SearchWithoutAUsableCandidateWritesNoModelAndSaysWhy) {
  write("copy.yaml",
        "data: {file: copy.csv, time: t}\ntarget: {column: y}\ninputs:\n"
        "  - column: x1\n    delay: 1\n  - column: x3\n    delay: 1\n"
        "noise: {ar: [0, 1]}\nsearch: {threads: 2}\n" +
            kBacktest);
  // An earlier good run in the same folder: none of its files may survive beside the failure.
  ASSERT_EQ(lagsieve("search with_backtest.yaml --out nomodel --quiet").code, 0);
  const auto r = lagsieve("search copy.yaml --out nomodel --quiet");
  EXPECT_EQ(r.code, 4) << r.err;
  EXPECT_NE(r.err.find("series 'y': no usable candidate among 4 (4 numerical_failure)"),
            std::string::npos)
      << r.err;
  EXPECT_NE(r.err.find("x3"), std::string::npos) << "the message names the inputs: " << r.err;
  const fs::path out = root_ / "nomodel";
  for (const char* f : {"model.json", "fit.json", "forecast.json", "backtest.csv"})
    EXPECT_FALSE(fs::exists(out / f)) << f;
  EXPECT_TRUE(fs::exists(out / "ranking.csv"));
  EXPECT_EQ(nlohmann::json::parse(slurp(out / "run.json"))["status"], "no_usable_candidate");
}

TEST_F(RunFolder, BacktestWritesACompleteFolderOfItsOwnAndNeverTheSearchs) {
  ASSERT_EQ(lagsieve("search with_backtest.yaml --out searched --quiet").code, 0);
  const auto search_files = files_of(root_ / "searched");

  // Into a new folder: every backtest file and the report.
  auto r = lagsieve("backtest with_backtest.yaml --models searched/model.json --out fresh");
  ASSERT_EQ(r.code, 0) << r.err;
  for (const char* f : {"backtest.csv", "accuracy.csv", "comparisons.csv", "input_value.csv",
                        "report.html", "run.json"})
    EXPECT_TRUE(fs::exists(root_ / "fresh" / f)) << f;
  const std::string report = slurp(root_ / "fresh" / "report.html");
  EXPECT_NE(report.find("Run report: fresh"), std::string::npos);
  EXPECT_NE(report.find("<h2"), std::string::npos);
  EXPECT_NE(report.find("Backtest"), std::string::npos) << "the report shows no backtest";

  // Into the search's folder: refused before anything is written.
  r = lagsieve("backtest with_backtest.yaml --models searched/model.json --out searched");
  EXPECT_EQ(r.code, 2) << r.err;
  EXPECT_NE(r.err.find("holds the results of a search run"), std::string::npos) << r.err;
  EXPECT_EQ(files_of(root_ / "searched"), search_files);

  // Without --out: <output.dir>/backtest, the search's own files untouched.
  write("default_out.yaml", config("", "{ar: [0, 1]}", kBacktest + "output: {dir: searched}\n"));
  r = lagsieve("backtest default_out.yaml --models searched/model.json");
  ASSERT_EQ(r.code, 0) << r.err;
  auto now = files_of(root_ / "searched");
  for (const auto& [name, text] : search_files) EXPECT_EQ(now[name], text) << name;
  EXPECT_TRUE(fs::exists(root_ / "searched" / "backtest" / "report.html"));
  EXPECT_TRUE(fs::exists(root_ / "searched" / "backtest" / "backtest.csv"));

  // A re-run of the search replaces its folder but carries the nested backtest folder over.
  const auto nested = files_of(root_ / "searched" / "backtest");
  r = lagsieve("search default_out.yaml --quiet");
  ASSERT_EQ(r.code, 0) << r.err;
  EXPECT_EQ(files_of(root_ / "searched" / "backtest"), nested);
}

}  // namespace
}  // namespace lagsieve
