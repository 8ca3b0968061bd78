#pragma once
// Long-format panels: one file holds many series, one row per (series, time), with a key column
// naming the series (`data.series_key`). Each series keeps its own rows, time range and input
// values; the rest of the data layer (time stamps, gaps, missing values, checks) then reads each
// series' rows exactly as it reads a single-series file.
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "io/csv.h"
#include "io/csv_scan.h"

namespace lagsieve {

// A long-format file indexed by series: its path and what the scan learnt (header, size,
// fingerprint).
struct PanelFile {
  std::filesystem::path path;
  std::string key_column;
  CsvScan scan;
};

// The rows of one series: either a table with the file's header, its rows in file order and
// their file lines (split from a table in memory), or where those rows lie in the file (indexed:
// read when the series runs). Either way messages name the line of the file.
struct PanelPart {
  std::string key;
  std::string name;  // its file and folder name (safe_series_names over the panel's keys)
  int rows = 0;
  CsvTable table;                          // split_by_key
  std::shared_ptr<const PanelFile> file;   // index_panel: the file and the spans of its rows
  std::vector<CsvSpan> spans;
};

// Sets the names of `parts` (safe_series_names of their keys).
void name_parts(std::vector<PanelPart>& parts);

// Indexes a long-format file by the values of `key_column` without holding its cells: the file is
// read block by block and each series keeps the byte spans of its rows (one span when its rows
// are consecutive, as in a file sorted by series), so memory grows with the series, not the
// cells. Parts are sorted by key; errors as split_by_key's.
std::vector<PanelPart> index_panel(const std::filesystem::path& file, const std::string& key_column,
                                   const std::string& config_key);

// The rows of a part as a table (read from the file for an indexed part). InputError when the
// file changed since it was indexed.
CsvTable part_table(const PanelPart& part);

// Splits `table` by the values of `key_column`, one part per distinct value, sorted by key
// (byte order). Rows move out of `table`. Throws InputError naming the file and line for an empty
// key cell, and naming `config_key` (with a suggestion) when the column is absent.
std::vector<PanelPart> split_by_key(CsvTable&& table, const std::string& key_column,
                                    const std::string& config_key);

// A file and folder name for a series key: letters, digits, '.', '-' and '_' are kept, anything
// else becomes '_'; a name that had to change (or starts with '.', or is long) gets a short hash
// of the key, so two keys never share a name.
std::string safe_series_name(const std::string& key);

// Names for every key of a panel that no two keys share, even on a file system that ignores case
// ("North" and "north"): safe_series_name, and where two names would still meet (case only, or a
// shared hash), each of them gets the hash of its key, then a counter if need be. Deterministic
// for a given set of keys; in the order of `keys`.
std::vector<std::string> safe_series_names(const std::vector<std::string>& keys);

}  // namespace lagsieve
