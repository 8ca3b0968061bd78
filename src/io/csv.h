#pragma once
// A small CSV reader: a header row, then rows of the same width. Handles quoted fields with
// embedded commas, quotes ("") and line breaks, CRLF or LF line ends, a UTF-8 byte-order mark,
// and any number of columns. Cells stay text; the data layer decides what is numeric.
#include <filesystem>
#include <string>
#include <string_view>
#include <vector>

namespace lagsieve {

struct CsvTable {
  std::string source;                          // file name (or "<text>") for messages
  std::vector<std::string> header;             // column names, unique and non-empty
  std::vector<std::vector<std::string>> rows;  // rows[r][c]; every row has header.size() cells
  std::vector<int> lines;                      // 1-based file line where rows[r] starts

  int columns() const { return static_cast<int>(header.size()); }
  int row_count() const { return static_cast<int>(rows.size()); }
  // Index of the named column, or -1.
  int column_index(std::string_view name) const;
  // "file:line" of data row r, for messages.
  std::string where(int r) const;
};

// Parses CSV text. Unquoted cells are trimmed of surrounding spaces and tabs; blank lines are
// skipped. Throws InputError ("source:line: ...") for an empty or duplicate header name, a row
// whose width differs from the header, an unterminated quote or text after a closing quote.
CsvTable parse_csv(std::string_view text, const std::string& source = "<text>");

// Reads and parses a file; a missing or unreadable file is an InputError naming the path.
CsvTable read_csv(const std::filesystem::path& file);

// Writing: a cell quoted (with quotes doubled) only when it holds a comma, quote or line break,
// so names read back unchanged by parse_csv; a number with 10 significant digits, or an empty
// cell when it is not finite.
std::string csv_field(const std::string& text);
std::string csv_number(double v);

}  // namespace lagsieve
