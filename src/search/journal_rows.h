#pragma once
// Journal lines as rows: what a search writes per finished candidate, and the trusted rows of a
// journal read without opening it for writing (merge joins the journals of shards).
#include <filesystem>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "search/search.h"

namespace lagsieve {

// A journal line: the fit's outcome only (no spec, rank or empty message); read back by
// candidate_row_from_json with the spec of the key.
nlohmann::json journal_row(const CandidateRow& row);

// The trusted rows of the journal at `path` of the run `run_fingerprint` (file order; none when
// absent). InputError for a journal of another run; rows failing their checksum are skipped and
// counted in `notes`; `has_header`: whether the file has its header line.
std::vector<nlohmann::json> read_journal_rows(const std::filesystem::path& path,
                                              const std::string& run_fingerprint,
                                              std::vector<std::string>* notes = nullptr,
                                              bool* has_header = nullptr);

}  // namespace lagsieve
