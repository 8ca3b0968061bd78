#pragma once
// Long-format panels: one file holds many series, one row per (series, time), with a key column
// naming the series (`data.series_key`). Each series keeps its own rows, time range and input
// values; the rest of the data layer (time stamps, gaps, missing values, checks) then reads each
// series' rows exactly as it reads a single-series file.
#include <string>
#include <vector>

#include "io/csv.h"

namespace lagsieve {

// The rows of one series: a table with the file's header, its rows in file order and their file
// lines (so every message still names the line of the file).
struct PanelPart {
  std::string key;
  CsvTable table;
};

// Splits `table` by the values of `key_column`, one part per distinct value, sorted by key
// (byte order). Rows move out of `table`. Throws InputError naming the file and line for an empty
// key cell, and naming `config_key` (with a suggestion) when the column is absent.
std::vector<PanelPart> split_by_key(CsvTable&& table, const std::string& key_column,
                                    const std::string& config_key);

// A file and folder name for a series key: letters, digits, '.', '-' and '_' are kept, anything
// else becomes '_'; a name that had to change (or starts with '.', or is long) gets a short hash
// of the key, so two keys never share a name.
std::string safe_series_name(const std::string& key);

}  // namespace lagsieve
