#pragma once
// Test helpers for end-to-end runs of the built `lagsieve` binary (LAGSIEVE_BINARY) and the files
// they read and write.
#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <fmt/format.h>

#include "core/series.h"

namespace lagsieve::testing {

struct CommandResult {
  int code = -1;  // exit status; -1 when the process did not exit normally
  std::string out;
  std::string err;
};

inline std::string slurp(const std::filesystem::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

// Runs `lagsieve <args>` in `dir`, capturing both streams (through files removed afterwards, so
// a test that checks a run writes nothing sees only the run's own files).
inline CommandResult run_lagsieve(const std::filesystem::path& dir, const std::string& args) {
  const std::string cmd = "cd '" + dir.string() + "' && '" + LAGSIEVE_BINARY + "' " + args +
                          " > stdout.txt 2> stderr.txt";
  const int status = std::system(cmd.c_str());
  CommandResult r;
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.out = slurp(dir / "stdout.txt");
  r.err = slurp(dir / "stderr.txt");
  std::filesystem::remove(dir / "stdout.txt");
  std::filesystem::remove(dir / "stderr.txt");
  return r;
}

// CSV with an integer time column `t`, the target `y` and every input, at full precision.
inline void write_series_csv(const std::filesystem::path& file, const SeriesData& data) {
  std::ofstream out(file);
  out << "t,y";
  for (const auto& name : data.input_names) out << "," << name;
  out << "\n";
  for (int t = 0; t < data.rows(); ++t) {
    out << (t + 1) << "," << fmt::format("{:.17g}", data.target[t]);
    for (const auto& column : data.inputs) out << "," << fmt::format("{:.17g}", column[t]);
    out << "\n";
  }
}

}  // namespace lagsieve::testing
