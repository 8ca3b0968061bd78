#include "io/csv.h"
#include "io/csv_scan.h"

#include <algorithm>

#include <fmt/format.h>

#include <cmath>
#include <cstdint>

#include <fstream>
#include <sstream>
#include <unordered_set>

#include "core/error.h"

namespace lagsieve {
namespace {

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

// One pass over the text, record by record. A record ends at an unquoted line break.
class Parser {
 public:
  Parser(std::string_view text, const std::string& source, int first_line = 1,
         bool strip_bom = true)
      : text_(text), source_(source), line_(first_line) {
    if (strip_bom && text_.starts_with("\xEF\xBB\xBF")) {
      text_.remove_prefix(3);
      skipped_ = 3;
    }
  }

  // Byte offsets in the text given (a byte-order mark included) of the record `next` read last:
  // where it starts and where the next one may start.
  size_t record_begin() const { return skipped_ + record_begin_; }
  size_t record_end() const { return skipped_ + pos_; }
  int line() const { return line_; }

  // Reads the next non-blank record into `fields`; false at end of input. `start_line` receives
  // the line the record starts on.
  bool next(std::vector<std::string>& fields, int& start_line) {
    while (pos_ < text_.size()) {
      fields.clear();
      start_line = line_;
      record_begin_ = pos_;
      bool blank = true;
      for (;;) {
        bool quoted = false;
        std::string field = read_field(quoted);
        if (quoted || !field.empty()) blank = false;
        fields.push_back(std::move(field));
        if (pos_ >= text_.size()) break;
        const char c = text_[pos_];
        if (c == ',') {
          blank = false;
          ++pos_;
          continue;
        }
        skip_line_break();
        break;
      }
      if (!blank) return true;
    }
    return false;
  }

 private:
  [[noreturn]] void fail(int line, const std::string& what) const {
    throw InputError(fmt::format("{}:{}: {}", source_, line, what));
  }

  bool at_line_break() const { return text_[pos_] == '\n' || text_[pos_] == '\r'; }

  void skip_line_break() {
    if (text_[pos_] == '\r' && pos_ + 1 < text_.size() && text_[pos_ + 1] == '\n') ++pos_;
    ++pos_;
    ++line_;
  }

  std::string read_field(bool& quoted) {
    // Skip blanks before a possible opening quote.
    size_t p = pos_;
    while (p < text_.size() && (text_[p] == ' ' || text_[p] == '\t')) ++p;
    if (p < text_.size() && text_[p] == '"') {
      quoted = true;
      pos_ = p + 1;
      return read_quoted();
    }
    const size_t begin = pos_;
    while (pos_ < text_.size() && text_[pos_] != ',' && !at_line_break()) {
      if (text_[pos_] == '"')
        fail(line_,
             "a double quote inside an unquoted cell; put the whole cell in quotes and "
             "write an inner quote as \"\"");
      ++pos_;
    }
    return std::string(trim(text_.substr(begin, pos_ - begin)));
  }

  std::string read_quoted() {
    const int open_line = line_;
    std::string out;
    for (;;) {
      if (pos_ >= text_.size())
        fail(open_line, "a quoted cell is never closed; add the closing double quote");
      const char c = text_[pos_];
      if (c == '"') {
        if (pos_ + 1 < text_.size() && text_[pos_ + 1] == '"') {
          out.push_back('"');
          pos_ += 2;
          continue;
        }
        ++pos_;
        break;
      }
      if (c == '\r' || c == '\n') {
        // Line breaks inside quotes belong to the cell; store them as '\n'.
        skip_line_break();
        out.push_back('\n');
        continue;
      }
      out.push_back(c);
      ++pos_;
    }
    while (pos_ < text_.size() && (text_[pos_] == ' ' || text_[pos_] == '\t')) ++pos_;
    if (pos_ < text_.size() && text_[pos_] != ',' && !at_line_break())
      fail(line_, "text after the closing quote of a cell; quote the whole cell or remove it");
    return out;
  }

  std::string_view text_;
  const std::string& source_;
  size_t pos_ = 0;
  int line_ = 1;
  size_t skipped_ = 0, record_begin_ = 0;
};

[[noreturn]] void fail_nul(std::string_view text, size_t nul, const std::string& source,
                           int first_line) {
  const auto head = text.substr(0, nul);
  const auto line = first_line + std::count(head.begin(), head.end(), '\n');
  const auto line_start = head.rfind('\n');
  const auto column = nul - (line_start == std::string_view::npos ? 0 : line_start + 1) + 1;
  throw InputError(
      fmt::format("{}:{}: a NUL byte at character {} of the line; the file is not "
                  "plain text (saved as UTF-16 or binary?); save it as UTF-8 CSV",
                  source, line, column));
}

void check_width(const std::vector<std::string>& fields, size_t width, const std::string& source,
                 int line) {
  if (fields.size() != width)
    throw InputError(fmt::format(
        "{}:{}: row has {} cell{} but the header has {} columns; every row needs one cell per "
        "column (leave a cell empty for a missing value)",
        source, line, fields.size(), fields.size() == 1 ? "" : "s", width));
}

void check_header(const std::vector<std::string>& header, const std::string& source, int line) {
  std::unordered_set<std::string> seen;
  for (size_t c = 0; c < header.size(); ++c) {
    const auto& name = header[c];
    if (name.empty())
      throw InputError(
          fmt::format("{}:{}: column {} of the header has no name; give every "
                      "column a name",
                      source, line, c + 1));
    if (!seen.insert(name).second)
      throw InputError(
          fmt::format("{}:{}: column name '{}' appears twice in the header; column "
                      "names must be unique",
                      source, line, name));
  }
}

std::ifstream open_data_file(const std::filesystem::path& file) {
  std::error_code ec;
  if (!std::filesystem::exists(file, ec))
    throw InputError(
        fmt::format("data file '{}' does not exist; check `data.file` (paths are "
                    "relative to the config file)",
                    file.string()));
  if (std::filesystem::is_directory(file, ec))
    throw InputError(fmt::format("data file '{}' is a folder, not a CSV file; check `data.file`",
                                 file.string()));
  std::ifstream in(file, std::ios::binary);
  if (!in)
    throw InputError(
        fmt::format("cannot read data file '{}'; check its permissions", file.string()));
  return in;
}

}  // namespace

int CsvTable::column_index(std::string_view name) const {
  for (size_t i = 0; i < header.size(); ++i)
    if (header[i] == name) return static_cast<int>(i);
  return -1;
}

std::string CsvTable::where(int r) const {
  return fmt::format("{}:{}", source, r >= 0 && r < static_cast<int>(lines.size()) ? lines[r] : 0);
}

CsvTable parse_csv(std::string_view text, const std::string& source) {
  // A NUL byte is never text: the file is binary or in a wide encoding (UTF-16). Quoting the
  // cell would cut the message at the NUL, so the spot is named instead.
  if (const auto nul = text.find('\0'); nul != std::string_view::npos)
    fail_nul(text, nul, source, 1);
  CsvTable table;
  table.source = source;
  Parser parser(text, table.source);
  int line = 0;
  if (!parser.next(table.header, line))
    throw InputError(
        fmt::format("{}: the file is empty; it needs a header row of column names "
                    "and at least one data row",
                    source));
  check_header(table.header, source, line);
  std::vector<std::string> fields;
  while (parser.next(fields, line)) {
    check_width(fields, table.header.size(), source, line);
    table.rows.push_back(fields);
    table.lines.push_back(line);
  }
  return table;
}

CsvTable read_csv(const std::filesystem::path& file) {
  std::ifstream in = open_data_file(file);
  std::ostringstream buffer;
  buffer << in.rdbuf();
  return parse_csv(buffer.str(), file.string());
}

CsvScan scan_csv(const std::filesystem::path& file, const CsvRowVisitor& on_row,
                 size_t block_bytes) {
  std::ifstream in = open_data_file(file);
  CsvScan scan;
  scan.source = file.string();
  std::uint64_t hash = 1469598103934665603ULL;  // FNV-1a over the bytes, as text_fingerprint
  std::string buffer;       // whole records not yet parsed, starting at a record boundary
  std::uint64_t base = 0;   // file offset of buffer[0]
  int line = 1;             // file line of buffer[0]
  bool first = true, have_header = false, in_quotes = false;
  size_t scanned = 0;       // bytes of buffer already scanned for the quote state
  std::vector<std::string> fields;
  std::vector<char> block(std::max<size_t>(block_bytes, 16));
  const auto parse = [&](size_t cut) {
    const std::string_view text(buffer.data(), cut);
    if (const auto nul = text.find('\0'); nul != std::string_view::npos)
      fail_nul(text, nul, scan.source, line);
    Parser parser(text, scan.source, line, first);
    first = false;
    int start = 0;
    while (parser.next(fields, start)) {
      if (!have_header) {
        check_header(fields, scan.source, start);
        scan.header = fields;
        have_header = true;
        continue;
      }
      check_width(fields, scan.header.size(), scan.source, start);
      on_row(scan, fields, CsvSpan{base + parser.record_begin(),
                             static_cast<std::uint64_t>(parser.record_end() -
                                                        parser.record_begin()),
                             start});
    }
    line = parser.line();
    base += cut;
    buffer.erase(0, cut);
    scanned -= cut;
  };
  for (;;) {
    in.read(block.data(), static_cast<std::streamsize>(block.size()));
    const auto got = static_cast<size_t>(in.gcount());
    if (got == 0) break;
    scan.bytes += got;
    for (size_t i = 0; i < got; ++i) hash = (hash ^ static_cast<unsigned char>(block[i])) * 1099511628211ULL;
    buffer.append(block.data(), got);
    // The last line break outside quotes ends the whole records of the buffer. Quotes toggle the
    // state exactly ("" inside a quoted cell toggles twice; an unquoted cell has none).
    size_t cut = 0;
    for (; scanned < buffer.size(); ++scanned) {
      const char c = buffer[scanned];
      if (c == '"') in_quotes = !in_quotes;
      else if (c == '\n' && !in_quotes) cut = scanned + 1;
    }
    if (cut > 0) parse(cut);
  }
  if (!buffer.empty()) parse(buffer.size());
  if (!have_header)
    throw InputError(
        fmt::format("{}: the file is empty; it needs a header row of column names "
                    "and at least one data row",
                    scan.source));
  scan.fingerprint = fmt::format("fnv1a64:{:016x}", hash);
  return scan;
}

void read_csv_spans(const std::filesystem::path& file, const std::vector<CsvSpan>& spans,
                    CsvTable& into) {
  std::ifstream in = open_data_file(file);
  std::string text;
  std::vector<std::string> fields;
  for (const auto& span : spans) {
    text.resize(span.length);
    in.clear();
    in.seekg(static_cast<std::streamoff>(span.offset));
    in.read(text.data(), static_cast<std::streamsize>(span.length));
    if (static_cast<std::uint64_t>(in.gcount()) != span.length)
      throw InputError(fmt::format(
          "{}: the file changed while the run was reading it (line {} is gone); run again on a "
          "file that stays as it is",
          file.string(), span.line));
    Parser parser(text, into.source, span.line, false);
    int start = 0;
    while (parser.next(fields, start)) {
      check_width(fields, into.header.size(), into.source, start);
      into.rows.push_back(fields);
      into.lines.push_back(start);
    }
  }
}

std::string csv_field(const std::string& text) {
  if (text.find_first_of(",\"\n\r") == std::string::npos) return text;
  std::string out = "\"";
  for (char c : text) {
    if (c == '"') out += '"';
    out += c;
  }
  return out + "\"";
}

std::string csv_number(double v) { return std::isfinite(v) ? fmt::format("{:.10g}", v) : ""; }

}  // namespace lagsieve
