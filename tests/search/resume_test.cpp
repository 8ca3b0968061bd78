// Resuming the `lagsieve search` binary: a run killed part-way (SIGKILL, SIGINT) and resumed with
// --resume ends with the same ranking as an uninterrupted run (fit times aside); a torn last
// journal line is tolerated; the journal of another config is refused with exit code 2.
#include <fcntl.h>
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "search_test_util.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;

int line_count(const fs::path& file) {
  std::ifstream in(file);
  int n = 0;
  for (std::string line; std::getline(in, line);) ++n;
  return n;
}

// Starts the binary with stdout and stderr sent to files; returns its pid. Everything the child
// needs is prepared before fork(): the test process may have idle worker threads, so the child
// must not allocate before exec.
pid_t start(const std::vector<std::string>& args, const fs::path& out, const fs::path& err) {
  std::string binary = LAGSIEVE_BINARY;
  std::vector<std::string> copy = args;
  std::vector<char*> argv{binary.data()};
  for (auto& a : copy) argv.push_back(a.data());
  argv.push_back(nullptr);
  const std::string out_path = out.string(), err_path = err.string();
  const pid_t pid = ::fork();
  if (pid == 0) {
    const int fo = ::open(out_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    const int fe = ::open(err_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    ::dup2(fo, STDOUT_FILENO);
    ::dup2(fe, STDERR_FILENO);
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  return pid;
}

struct Exit {
  bool signalled = false;
  int code = -1;  // exit code, or the signal
};

Exit wait_for(pid_t pid) {
  int status = 0;
  ::waitpid(pid, &status, 0);
  if (WIFSIGNALED(status)) return {true, WTERMSIG(status)};
  return {false, WEXITSTATUS(status)};
}

// The streams of a run into `folder` go beside it: a run folder holds only the run's own files.
fs::path log_of(const fs::path& folder, const char* stream) {
  return folder.parent_path() / (folder.filename().string() + "." + stream + ".txt");
}

Exit run(const std::vector<std::string>& args, const fs::path& folder) {
  return wait_for(start(args, log_of(folder, "stdout"), log_of(folder, "stderr")));
}

// One CSV line split into fields (quoted fields may hold commas and doubled quotes).
std::vector<std::string> csv_cells(const std::string& line) {
  std::vector<std::string> cells(1);
  bool quoted = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (quoted && c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
      cells.back() += '"';
      ++i;
    } else if (c == '"') {
      quoted = !quoted;
    } else if (c == ',' && !quoted) {
      cells.emplace_back();
    } else {
      cells.back() += c;
    }
  }
  return cells;
}

// The ranking without the fit_seconds column (wall-clock times differ between runs).
std::string ranking_without_times(const fs::path& folder) {
  std::ifstream in(folder / "ranking.csv");
  std::string line, out;
  int drop = -1;
  size_t width = 0;
  while (std::getline(in, line)) {
    const std::vector<std::string> cells = csv_cells(line);
    if (drop < 0) {
      width = cells.size();
      for (size_t i = 0; i < cells.size(); ++i)
        if (cells[i] == "fit_seconds") drop = static_cast<int>(i);
    }
    EXPECT_EQ(cells.size(), width) << line;
    for (size_t i = 0; i < cells.size(); ++i)
      if (static_cast<int>(i) != drop) out += cells[i] + "|";
    out += "\n";
  }
  EXPECT_GE(drop, 0) << "no fit_seconds column in " << folder;
  return out;
}

std::string config_text(const std::string& x1_delay) {
  return "data:\n  file: data.csv\n  time: t\ntarget:\n  column: y\ninputs:\n"
         "  - column: x1\n    delay: " +
         x1_delay +
         "\n    numerator: [0, 1]\n    denominator: [0, 1]\n"
         "  - column: x2\n    delay: [0, 2]\n    numerator: [0, 1]\n    optional: true\n"
         "  - column: x3\n    delay: [0, 1]\n    optional: true\n"
         "noise:\n  ar: [0, 1]\n  ma: [0, 1]\n  constant: true\n"
         "search:\n  strategy: exhaustive\n  criterion: bic\n  threads: 2\n";
}

class SearchResume : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    root_ = fs::temp_directory_path() / ("lagsieve_resume_" + std::to_string(::getpid()));
    fs::remove_all(root_);
    fs::create_directories(root_);
    testing::SearchCase c;
    c.name = "resume";
    c.n = 300;
    c.seed = 301;
    c.inputs = {{"x1", {2, 0, 1}, {1.5}, {0.6}, 0.5, {0, 3}, {0, 1}, {0, 1}, false},
                {"x2", {1, 1, 0}, {1.0, 0.8}, {}, 0.3, {0, 2}, {0, 1}, {0, 0}, true},
                {"x3", {}, {0.0}, {}, 0.5, {0, 1}, {0, 0}, {0, 0}, true}};
    c.noise = {1, 1, 0, 0, 1};
    c.phi = {0.5};
    c.theta = {0.3};
    testing::write_series_csv(root_ / "data.csv", simulate(testing::simulation_of(c)));
    std::ofstream(root_ / "run.yaml") << config_text("[0, 3]");
    std::ofstream(root_ / "other.yaml") << config_text("[0, 2]");
    // 16 x 7 x 3 x 4 candidates.
    total_ = 16 * 7 * 3 * 4;
    fs::create_directories(root_ / "full");
    const Exit e = run(
        {"search", (root_ / "run.yaml").string(), "--out", (root_ / "full").string(), "--quiet"},
        root_ / "full");
    full_ok_ = !e.signalled && e.code == 0;
  }
  static void TearDownTestSuite() { fs::remove_all(root_); }

  // Starts a run, stops it with `signal` once the journal holds some rows, resumes it; returns
  // the resumed run's folder. `tear` appends half a record to the journal before resuming.
  static fs::path interrupt_and_resume(const std::string& name, int signal, bool tear) {
    const fs::path dir = root_ / name;
    fs::create_directories(dir);
    const std::vector<std::string> args = {"search", (root_ / "run.yaml").string(), "--out",
                                           dir.string(), "--quiet"};
    const pid_t pid = start(args, log_of(dir, "stdout1"), log_of(dir, "stderr1"));
    // While the run works, its journal is in the staging folder beside the run folder.
    const fs::path journal = root_ / ("." + name + ".lagsieve-next") / "journal.jsonl";
    const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(60);
    while (line_count(journal) < 1 + total_ / 6 && std::chrono::steady_clock::now() < deadline)
      std::this_thread::sleep_for(std::chrono::milliseconds(5));
    ::kill(pid, signal);
    const Exit stopped = wait_for(pid);
    EXPECT_TRUE(stopped.signalled) << name << ": the run ended before it was interrupted";
    EXPECT_EQ(stopped.code, signal);
    const int lines = line_count(journal);
    EXPECT_LT(lines, 1 + total_) << name << ": the journal is already complete";
    EXPECT_FALSE(fs::exists(dir / "ranking.csv"));
    if (tear) std::ofstream(journal, std::ios::app) << R"({"series":"y","key":"x1[b0)";
    std::vector<std::string> resume = args;
    resume.push_back("--resume");
    const Exit e = run(resume, dir);
    EXPECT_FALSE(e.signalled);
    EXPECT_EQ(e.code, 0) << testing::slurp(log_of(dir, "stderr"));
    // The resumed run took the interrupted run's rows from the journal.
    // The summary line reads "... (F fitted, R from the journal, ...".
    const std::string out = testing::slurp(log_of(dir, "stdout"));
    const size_t at = out.find(" fitted, ");
    const size_t open = out.rfind('(', at);
    EXPECT_TRUE(at != std::string::npos && open != std::string::npos) << out;
    if (at != std::string::npos && open != std::string::npos) {
      const int fitted = std::stoi(out.substr(open + 1, at - open - 1));
      const int resumed = std::stoi(out.substr(at + 9));
      EXPECT_NE(out.find(std::to_string(resumed) + " from the journal"), std::string::npos) << out;
      std::printf("  %s: stopped with %d journal lines; resumed %d rows, fitted %d\n", name.c_str(),
                  lines, resumed, fitted);
      EXPECT_GE(resumed, total_ / 6);
      EXPECT_EQ(fitted + resumed, total_);
    }
    return dir;
  }

  static inline fs::path root_;
  static inline int total_ = 0;
  static inline bool full_ok_ = false;
};

TEST_F(SearchResume, KilledRunResumesToTheSameRankingDespiteATornLine) {
  ASSERT_TRUE(full_ok_) << testing::slurp(log_of(root_ / "full", "stderr"));
  const std::string expected = ranking_without_times(root_ / "full");
  ASSERT_EQ(std::count(expected.begin(), expected.end(), '\n'), total_ + 1);
  const fs::path dir = interrupt_and_resume("killed", SIGKILL, true);
  EXPECT_EQ(ranking_without_times(dir), expected);
  EXPECT_EQ(testing::slurp(dir / "model.json"), testing::slurp(root_ / "full" / "model.json"));
}

TEST_F(SearchResume, InterruptedRunResumesToTheSameRanking) {
  ASSERT_TRUE(full_ok_) << testing::slurp(log_of(root_ / "full", "stderr"));
  const fs::path dir = interrupt_and_resume("interrupted", SIGINT, false);
  EXPECT_EQ(ranking_without_times(dir), ranking_without_times(root_ / "full"));
}

TEST_F(SearchResume, JournalOfAnotherConfigIsRefused) {
  ASSERT_TRUE(full_ok_) << testing::slurp(log_of(root_ / "full", "stderr"));
  const fs::path dir = root_ / "other";
  fs::create_directories(dir);
  fs::copy_file(root_ / "full" / "journal.jsonl", dir / "journal.jsonl");
  const std::string before = testing::slurp(dir / "journal.jsonl");
  const Exit e =
      run({"search", (root_ / "other.yaml").string(), "--out", dir.string(), "--quiet", "--resume"},
          dir);
  EXPECT_FALSE(e.signalled);
  EXPECT_EQ(e.code, 2);
  const std::string err = testing::slurp(log_of(dir, "stderr"));
  EXPECT_NE(err.find("journal.jsonl"), std::string::npos) << err;
  EXPECT_NE(err.find("another run"), std::string::npos) << err;
  EXPECT_EQ(testing::slurp(dir / "journal.jsonl"), before)
      << "a refused journal must be left as it was";
  EXPECT_FALSE(fs::exists(dir / "ranking.csv"));
}

// A row edited by hand (a better BIC than any real fit) fails its checksum: the candidate is
// fitted again and the ranking is the one of an untouched run.
TEST_F(SearchResume, TamperedJournalRowIsNotTrusted) {
  ASSERT_TRUE(full_ok_) << testing::slurp(log_of(root_ / "full", "stderr"));
  const fs::path dir = root_ / "tampered";
  fs::create_directories(dir);
  std::ifstream in(root_ / "full" / "journal.jsonl");
  std::ofstream out(dir / "journal.jsonl");
  int edited = 0;
  for (std::string line; std::getline(in, line);) {
    const auto at = line.find("\"bic\":");
    if (edited == 0 && at != std::string::npos &&
        line.find("\"status\":\"ok\"") != std::string::npos) {
      const auto end = line.find_first_of(",}", at);
      line = line.substr(0, at) + "\"bic\":-99999.0" + line.substr(end);
      ++edited;
    }
    out << line << "\n";
  }
  out.close();
  ASSERT_EQ(edited, 1);
  const Exit e = run(
      {"search", (root_ / "run.yaml").string(), "--out", dir.string(), "--quiet", "--resume"}, dir);
  EXPECT_FALSE(e.signalled);
  EXPECT_EQ(e.code, 0);
  const std::string err = testing::slurp(log_of(dir, "stderr"));
  EXPECT_NE(err.find("1 row(s) fail their checksum"), std::string::npos) << err;
  const std::string summary = testing::slurp(log_of(dir, "stdout"));
  EXPECT_NE(summary.find("(1 fitted, " + std::to_string(total_ - 1) + " from the journal"),
            std::string::npos)
      << summary;
  EXPECT_EQ(ranking_without_times(dir), ranking_without_times(root_ / "full"));
  EXPECT_EQ(testing::slurp(dir / "ranking.csv").find("-99999"), std::string::npos);
}

// The fingerprint covers what determines the candidates' results only: a comment, other
// threads and a backtest section do not block --resume; a changed input range that moves the
// common sample does.
TEST_F(SearchResume, CommentsAndUnrelatedSectionsDoNotBlockResume) {
  ASSERT_TRUE(full_ok_) << testing::slurp(log_of(root_ / "full", "stderr"));
  const fs::path dir = root_ / "edited";
  fs::create_directories(dir);
  fs::copy_file(root_ / "full" / "journal.jsonl", dir / "journal.jsonl");
  std::string text = "# edited after the run\n" + config_text("[0, 3]");
  text.replace(text.find("threads: 2"), 10, "threads: 1");
  std::ofstream(root_ / "edited.yaml") << text << "forecast: {horizon: 5}  # a comment\n";
  const Exit e = run(
      {"search", (root_ / "edited.yaml").string(), "--out", dir.string(), "--quiet", "--resume"},
      dir);
  EXPECT_EQ(e.code, 0) << testing::slurp(log_of(dir, "stderr"));
  EXPECT_NE(testing::slurp(log_of(dir, "stdout")).find("(0 fitted, " + std::to_string(total_)),
            std::string::npos)
      << testing::slurp(log_of(dir, "stdout"));
  EXPECT_EQ(ranking_without_times(dir), ranking_without_times(root_ / "full"));
}

}  // namespace
}  // namespace lagsieve
