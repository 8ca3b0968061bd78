// Options with limits and messages that blame the right thing (the built binary): --out at a
// file, below a file, empty or unwritable; --threads bounded by one rule on the command line and
// in YAML; the forecast horizon bounded; a NUL byte in a CSV; a missing --data / --future file;
// near-collinear inputs named by `fit` (exit 2); `validate` making the checks `fit` makes.
#include <gtest/gtest.h>
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>

#include <fmt/format.h>

#include "run_binary.h"

namespace {

namespace fs = std::filesystem;
using lagsieve::testing::run_lagsieve;

// 300 rows: y responds to x at lag 1; x2 = 2 x + 1 + noise of standard deviation `copy_noise`
// (0: an exact copy up to the affine map).
std::string csv(double copy_noise) {
  std::mt19937_64 rng(11);
  std::normal_distribution<double> e(0.0, 1.0);
  std::string text = "t,y,x,x2\n";
  double x = 0.0, y = 0.0, prev_x = 0.0;
  for (int t = 1; t <= 300; ++t) {
    prev_x = x;
    x = 0.6 * x + e(rng);
    y = 0.5 * y + 1.5 * prev_x + e(rng);
    text +=
        fmt::format("{},{:.17g},{:.17g},{:.17g}\n", t, y, x, 2.0 * x + 1.0 + copy_noise * e(rng));
  }
  return text;
}

const std::string kSearch =
    "data: {file: data.csv, time: t}\ntarget: {column: y}\ninputs:\n"
    "  - column: x\n    delay: [0, 2]\nnoise: {ar: [0, 1]}\nsearch: {threads: 1}\n"
    "output: {dir: out}\n";
const std::string kBoth =
    "data: {file: data.csv, time: t}\ntarget: {column: y}\ninputs:\n"
    "  - column: x\n    delay: 1\n  - column: x2\n    delay: 1\nnoise: {ar: 1}\n";

class Options : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() /
           ("lagsieve_options_" + std::to_string(::getpid()) + "_" +
            ::testing::UnitTest::GetInstance()->current_test_info()->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
    std::ofstream(dir_ / "data.csv") << csv(0.0);
    std::ofstream(dir_ / "search.yaml") << kSearch;
    std::ofstream(dir_ / "a_file") << "x";
  }
  void TearDown() override { fs::remove_all(dir_); }

  // Exit 2, the fragment in the message, and nothing written beside the inputs.
  void refused(const std::string& args, const std::string& fragment) {
    const auto before = std::distance(fs::directory_iterator(dir_), fs::directory_iterator());
    const auto r = run_lagsieve(dir_, args);
    EXPECT_EQ(r.code, 2) << args << "\n" << r.err;
    EXPECT_NE(r.err.find(fragment), std::string::npos)
        << args << "\nexpected: " << fragment << "\nstderr: " << r.err;
    EXPECT_EQ(std::distance(fs::directory_iterator(dir_), fs::directory_iterator()), before)
        << args << ": something was written";
    EXPECT_FALSE(fs::exists(dir_ / "out")) << args;
  }

  fs::path dir_;
};

TEST_F(Options, OutMustBeAWritableFolderPath) {
  refused("search search.yaml --quiet --out a_file",
          "--out 'a_file' is a file, not a folder; choose a folder path");
  refused("search search.yaml --quiet --out a_file/run",
          "--out 'a_file/run' is below '" + (dir_ / "a_file").string() + "', which is a file");
  refused("search search.yaml --quiet --out ''", "--out '': the folder name is empty");
  if (::geteuid() != 0) {  // root may write anywhere
    fs::create_directories(dir_ / "locked");
    fs::permissions(dir_ / "locked", fs::perms::owner_read | fs::perms::owner_exec);
    refused("search search.yaml --quiet --out locked/run", "cannot write in '");
    fs::permissions(dir_ / "locked", fs::perms::owner_all);
  }
}

TEST_F(Options, ThreadsHaveOneBoundOnTheCommandLineAndInYaml) {
  refused("search search.yaml --quiet --threads 70000",
          "--threads 70000: must be between 0 (all cores) and 1024");
  refused("search search.yaml --quiet --threads -1",
          "--threads -1: must be between 0 (all cores) and 1024");
  std::string yaml = kSearch;
  yaml.replace(yaml.find("threads: 1"), 10, "threads: 70000");
  std::ofstream(dir_ / "many.yaml") << yaml;
  refused("search many.yaml --quiet", "search.threads: must be at most 1024");
  yaml.replace(yaml.find("threads: 70000"), 14, "threads: -1");
  std::ofstream(dir_ / "many.yaml") << yaml;
  refused("search many.yaml --quiet", "search.threads: must be at least 0");
  const auto r = run_lagsieve(dir_, "search search.yaml --quiet --threads 1024");
  EXPECT_EQ(r.code, 0) << r.err;
}

TEST_F(Options, HorizonIsBoundedAndLongHorizonsAreCheap) {
  std::ofstream(dir_ / "one.yaml") << "data: {file: data.csv, time: t}\ntarget: {column: y}\n"
                                      "inputs:\n  - column: x\n    delay: 1\n    future: forecast\n"
                                      "noise: {ar: 1}\n";
  ASSERT_EQ(run_lagsieve(dir_, "fit one.yaml --save m.json").code, 0);
  refused("forecast m.json --data data.csv --horizon 1000000000",
          "the horizon must be between 1 and 10000 steps (got 1000000000)");
  std::string yaml = kSearch + "forecast: {horizon: 20000}\n";
  std::ofstream(dir_ / "long.yaml") << yaml;
  refused("validate long.yaml", "forecast.horizon: must be at most 10000");
  // 5,000 steps took minutes with the horizon covariance; with variances accumulated per step it
  // is a fraction of a second (not timed here: benchmarks measure, tests check).
  const auto r = run_lagsieve(dir_, "forecast m.json --data data.csv --horizon 5000 --json");
  EXPECT_EQ(r.code, 0) << r.err;
}

TEST_F(Options, MessagesBlameTheRightFile) {
  std::ofstream(dir_ / "one.yaml") << "data: {file: data.csv, time: t}\ntarget: {column: y}\n"
                                      "inputs:\n  - column: x\n    delay: 1\nnoise: {ar: 1}\n";
  ASSERT_EQ(run_lagsieve(dir_, "fit one.yaml --save m.json").code, 0);
  refused("forecast m.json --data nowhere.csv --horizon 3",
          "--data 'nowhere.csv': the file does not exist");
  refused("forecast m.json --data data.csv --future x=nowhere.csv --horizon 3",
          "--future 'nowhere.csv': the file does not exist");
  std::string text = csv(0.0);
  text[text.find('\n', text.find('\n') + 1) + 3] = '\0';  // third character of line 3
  std::ofstream(dir_ / "data.csv", std::ios::binary) << text;
  refused("validate one.yaml", "data.csv:3: a NUL byte at character 3 of the line");
}

TEST_F(Options, NearCollinearInputsAreNamedAndValidateChecksWhatFitChecks) {
  std::ofstream(dir_ / "both.yaml") << kBoth;
  // An exact copy: refused by validate as by fit.
  refused(
      "validate both.yaml",
      "input 'x2' at lag 1 is (nearly) a linear combination of the constant, input 'x' at lag 1");
  refused("fit both.yaml", "input 'x2' at lag 1 is (nearly) a linear combination");
  // Nearly a copy: the fit fails numerically, and says which inputs are to blame (exit 2).
  std::ofstream(dir_ / "data.csv") << csv(1e-8);
  refused("fit both.yaml",
          "both.yaml: input 'x2' at lag 1 is (nearly) a linear combination of the "
          "constant, input 'x' at lag 1");
}

}  // namespace
