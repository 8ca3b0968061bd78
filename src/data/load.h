#pragma once
// Reading the data a config names: one SeriesData per target column, checked and ready to model.
#include <filesystem>
#include <span>
#include <string>
#include <vector>

#include "core/config.h"
#include "core/series.h"
#include "core/warning.h"
#include "data/time_index.h"
#include "io/csv.h"

namespace lagsieve {

// Reads `config.data.file` once and returns one series per target column (config order).
// Throws InputError for anything wrong with the file or its agreement with the config:
//  - a column named in the config (time, target, input) absent from the header (with the
//    closest header name as a suggestion);
//  - a cell that is not a number or not finite; a time stamp that is not YYYY-MM-DD,
//    YYYY-MM-DD HH:MM[:SS] or an integer, missing, repeated or out of order;
//  - a missing cell (empty, NA, N/A, NaN, null) with `missing: error`; with `interpolate`,
//    interior gaps are filled linearly (counted in SeriesData::interpolated) but a gap at the
//    start or end is still an error;
//  - a constant input (column or event), a constant target, a non-positive target value under
//    `transform: log | boxcox`;
//  - too few rows for the largest candidate of the grid (see min_rows_needed) or for the
//    backtest settings.
// Every message names the file and line (or the config key) and says what to do.
std::vector<SeriesData> load_series(const RunConfig& config);

// The same for one target column of another CSV file (e.g. new data to re-validate on).
SeriesData load_series_from_csv(const RunConfig& config, const std::filesystem::path& csv,
                                const std::string& target_column);

// The same for an already parsed table (tests parse CSV text).
SeriesData series_from_table(const RunConfig& config, const CsvTable& table,
                             const std::string& target_column);

// Columns of a table given as numbers instead of text cells (a table built in memory, e.g. from
// numpy arrays): numbers[c], when not empty, holds column c's values, NaN for a missing cell,
// and the table's cells of that column are not read. The values are taken as they are and
// checked as parsed cells are (an infinite value is an error naming its row); the time column
// is always text. Empty: every column is text.
using NumericColumns = std::vector<std::span<const double>>;
SeriesData series_from_table(const RunConfig& config, const CsvTable& table,
                             const std::string& target_column, const NumericColumns& numbers);

// One line per column with missing cells (target first) saying how many and what was done
// (left out of the likelihood, or interpolated), then the inserted gaps and time notes; empty
// when the data are complete. Every summary of the data (validate, fit, report) shows these.
std::vector<std::string> describe_missing(const SeriesData& data);
// The same as warnings with codes and numbers (missing_interpolated, missing_left_out,
// periods_inserted, daylight_saving; docs/warnings.md).
std::vector<Warning> missing_warnings(const SeriesData& data);

// Seasonal terms used without a period (config.differencing_period_from_data,
// noise_period_from_data): sets the periods to the one the data's frequency suggests (12
// monthly, 4 quarterly, 7 daily, 24 hourly, 52 weekly) and says so in config.seasonal_note.
// Throws InputError when the frequency suggests none.
void apply_seasonal_default(RunConfig& config, const SeriesData& data);

// Rows the largest candidate of the grid needs: the differencing loss, the longest input lag
// (delay + numerator), every parameter of the largest model (constant, omegas, deltas, ARMA
// terms, sigma^2) and kMinSpareRows more, so every candidate keeps some degrees of freedom.
inline constexpr int kMinSpareRows = 10;
int min_rows_needed(const RunConfig& config);

// Throws InputError when `series` is too short for the grid or the backtest settings.
void check_feasible(const RunConfig& config, const SeriesData& series);

}  // namespace lagsieve
