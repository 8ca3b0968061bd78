// Atomic replacement and durable appends.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "core/error.h"
#include "io/atomic_file.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;

std::string slurp(const fs::path& p) {
  std::ifstream in(p);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

TEST(AtomicFile, WritesReplacesAndLeavesNoTemporaries) {
  const auto dir = fs::temp_directory_path() / "lagsieve_test_atomic" / "nested";
  fs::remove_all(dir.parent_path());
  const auto file = dir / "result.json";
  write_file_atomic(file, "first");
  EXPECT_EQ(slurp(file), "first");
  write_file_atomic(file, "second, longer content");
  EXPECT_EQ(slurp(file), "second, longer content");
  int entries = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(dir)) ++entries;
  EXPECT_EQ(entries, 1);  // the temporary was renamed, not left behind

  const auto journal = dir / "journal.jsonl";
  append_line_durable(journal, "{\"a\":1}");
  append_line_durable(journal, "{\"b\":2}");
  EXPECT_EQ(slurp(journal), "{\"a\":1}\n{\"b\":2}\n");
  fs::remove_all(dir.parent_path());
}

TEST(AtomicFile, UnwritablePlaceIsAnInputError) {
  // A regular file where a folder is expected cannot hold the output.
  const auto base = fs::temp_directory_path() / "lagsieve_test_atomic_block";
  fs::remove_all(base);
  std::ofstream(base) << "x";
  EXPECT_THROW(write_file_atomic(base / "out.txt", "x"), InputError);
  EXPECT_THROW(append_line_durable(base / "j.txt", "x"), InputError);
  fs::remove_all(base);
}

}  // namespace
}  // namespace lagsieve
