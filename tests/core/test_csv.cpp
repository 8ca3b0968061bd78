// The CSV reader: quoting, line ends, byte-order mark, width, and its error messages.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "core/error.h"
#include "io/csv.h"

namespace lagsieve {
namespace {

std::string error_of(const std::string& text) {
  try {
    parse_csv(text, "d.csv");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

// What the run folder writes reads back unchanged: names with commas, quotes and line breaks.
TEST(Csv, WrittenFieldsReadBack) {
  const std::vector<std::string> names{"plain", "a,b", "say \"hi\"", "two\nlines", ""};
  std::string text = "name,value\n";
  for (const auto& n : names) text += csv_field(n) + "," + csv_number(0.1) + "\n";
  text += csv_field("nan") + "," + csv_number(std::nan("")) + "\n";
  const auto table = parse_csv(text);
  ASSERT_EQ(table.row_count(), 6);
  for (size_t i = 0; i < names.size(); ++i) {
    EXPECT_EQ(table.rows[i][0], names[i]);
    EXPECT_EQ(table.rows[i][1], "0.1");
  }
  EXPECT_EQ(csv_field("plain"), "plain");
  EXPECT_EQ(csv_field("a,b"), "\"a,b\"");
  EXPECT_EQ(table.rows[5][1], "");
}

TEST(Csv, PlainTable) {
  const auto t = parse_csv("a,b,c\n1,2,3\n4,5,6\n", "d.csv");
  ASSERT_EQ(t.header, (std::vector<std::string>{"a", "b", "c"}));
  ASSERT_EQ(t.row_count(), 2);
  EXPECT_EQ(t.rows[1], (std::vector<std::string>{"4", "5", "6"}));
  EXPECT_EQ(t.lines, (std::vector<int>{2, 3}));
  EXPECT_EQ(t.column_index("c"), 2);
  EXPECT_EQ(t.column_index("z"), -1);
  EXPECT_EQ(t.where(1), "d.csv:3");
}

TEST(Csv, QuotedFieldsWithCommasQuotesAndNewlines) {
  const auto t = parse_csv("name,note\n\"Smith, J\",\"said \"\"hi\"\"\"\n\"two\nlines\",x\nlast,y\n");
  ASSERT_EQ(t.row_count(), 3);
  EXPECT_EQ(t.rows[0][0], "Smith, J");
  EXPECT_EQ(t.rows[0][1], "said \"hi\"");
  EXPECT_EQ(t.rows[1][0], "two\nlines");
  EXPECT_EQ(t.rows[1][1], "x");
  // The record after a quoted line break starts on the right line.
  EXPECT_EQ(t.lines, (std::vector<int>{2, 3, 5}));
}

TEST(Csv, CrLfLineEndsAndByteOrderMark) {
  const auto t = parse_csv("\xEF\xBB\xBFtime,y\r\n1,2.5\r\n2,\"a\r\nb\"\r\n");
  ASSERT_EQ(t.header, (std::vector<std::string>{"time", "y"}));
  ASSERT_EQ(t.row_count(), 2);
  EXPECT_EQ(t.rows[0][1], "2.5");
  EXPECT_EQ(t.rows[1][1], "a\nb");  // CRLF inside quotes is stored as one line break
  EXPECT_EQ(t.lines, (std::vector<int>{2, 3}));
}

TEST(Csv, NoFinalNewlineEmptyCellsBlankLinesAndTrimming) {
  const auto t = parse_csv("a,b,c\n\n 1 , ,3\n,,\n\n7,8,9");
  ASSERT_EQ(t.row_count(), 3);
  EXPECT_EQ(t.rows[0], (std::vector<std::string>{"1", "", "3"}));
  EXPECT_EQ(t.rows[1], (std::vector<std::string>{"", "", ""}));
  EXPECT_EQ(t.rows[2], (std::vector<std::string>{"7", "8", "9"}));
  EXPECT_EQ(t.lines, (std::vector<int>{3, 4, 6}));
}

TEST(Csv, ThreeThousandColumns) {
  constexpr int kColumns = 3000;
  std::string text;
  for (int c = 0; c < kColumns; ++c) {
    if (c > 0) text += ',';
    text += 'c';
    text += std::to_string(c);
  }
  text += "\n";
  for (int r = 0; r < 20; ++r) {
    for (int c = 0; c < kColumns; ++c) {
      if (c > 0) text += ',';
      text += std::to_string(r * kColumns + c);
    }
    text += "\r\n";
  }
  const auto t = parse_csv(text);
  ASSERT_EQ(t.columns(), kColumns);
  ASSERT_EQ(t.row_count(), 20);
  EXPECT_EQ(t.rows[19][2999], std::to_string(19 * kColumns + 2999));
  EXPECT_EQ(t.column_index("c2999"), 2999);
}

TEST(Csv, Errors) {
  EXPECT_EQ(error_of("a,b\n1,2\n3\n"),
            "d.csv:3: row has 1 cell but the header has 2 columns; every row needs one cell per "
            "column (leave a cell empty for a missing value)");
  EXPECT_EQ(error_of("a,b\n1,2,3\n"),
            "d.csv:2: row has 3 cells but the header has 2 columns; every row needs one cell per "
            "column (leave a cell empty for a missing value)");
  EXPECT_EQ(error_of("a,b\n1,\"2\n"),
            "d.csv:2: a quoted cell is never closed; add the closing double quote");
  EXPECT_EQ(error_of("a,b\n1,\"2\"x\n"),
            "d.csv:2: text after the closing quote of a cell; quote the whole cell or remove it");
  EXPECT_EQ(error_of("a,a\n1,2\n"),
            "d.csv:1: column name 'a' appears twice in the header; column names must be unique");
  EXPECT_EQ(error_of("a,,c\n1,2,3\n"),
            "d.csv:1: column 2 of the header has no name; give every column a name");
  EXPECT_EQ(error_of(""),
            "d.csv: the file is empty; it needs a header row of column names and at least one "
            "data row");
  EXPECT_NE(error_of("a,b\n1,x\"y\n").find("d.csv:2: a double quote inside an unquoted cell"),
            std::string::npos);
}

TEST(Csv, ReadsFilesAndNamesMissingOnes) {
  const auto dir = std::filesystem::temp_directory_path() / "lagsieve_test_csv";
  std::filesystem::create_directories(dir);
  const auto file = dir / "x.csv";
  std::ofstream(file) << "a\n1\n";
  const auto t = read_csv(file);
  EXPECT_EQ(t.source, file.string());
  EXPECT_EQ(t.rows[0][0], "1");
  try {
    read_csv(dir / "absent.csv");
    FAIL() << "expected an InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()),
              "data file '" + (dir / "absent.csv").string() +
                  "' does not exist; check `data.file` (paths are relative to the config file)");
  }
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace lagsieve
