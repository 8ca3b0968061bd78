#pragma once
// Reading a CSV file without holding it: a block-by-block scan that visits every record with
// where it lies in the file, and reading chosen records back by their byte spans (data/panel.h
// indexes a long-format file with them). Same checks and messages as parse_csv (io/csv.h).
#include <cstdint>
#include <filesystem>
#include <functional>
#include <string>
#include <vector>

#include "io/csv.h"

namespace lagsieve {

// Where records lie in a file: bytes [offset, offset + length) hold whole records (and maybe
// blank lines), the first starting on file line `line`.
struct CsvSpan {
  std::uint64_t offset = 0;
  std::uint64_t length = 0;
  int line = 0;
};

// What a scan learnt of the file as a whole.
struct CsvScan {
  std::string source;               // file name, for messages
  std::vector<std::string> header;  // checked as parse_csv checks it
  std::uint64_t bytes = 0;
  std::string fingerprint;  // of the file's bytes; equals text_fingerprint of its text
};

// Called for every data row with the scan so far (the header is known), the row's cells and
// where it lies in the file.
using CsvRowVisitor =
    std::function<void(const CsvScan&, const std::vector<std::string>& cells, const CsvSpan&)>;

// Reads a file block by block (the file is never held whole: memory stays at a block and the
// row being visited), with the checks and messages of parse_csv.
CsvScan scan_csv(const std::filesystem::path& file, const CsvRowVisitor& on_row,
                 size_t block_bytes = size_t{1} << 20);

// Appends the rows of `spans` of `file` to `into` (whose source and header are set), with their
// file lines, as parse_csv reads them. InputError when the file no longer holds them.
void read_csv_spans(const std::filesystem::path& file, const std::vector<CsvSpan>& spans,
                    CsvTable& into);

}  // namespace lagsieve
