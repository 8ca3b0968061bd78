#pragma once
// Loaded, validated data for one target series: original scale, one row per period of the
// calendar (a missing period of the file is an inserted row), missing target values NaN.
#include <cmath>
#include <string>
#include <vector>

namespace lagsieve {

struct SeriesData {
  std::string target_name;
  std::vector<double> target;               // original scale, one value per row; NaN = missing
  std::vector<std::string> time;            // time stamps as read ("" when the file has none)
  std::vector<std::string> input_names;     // every configured input, events included, config order
  std::vector<std::vector<double>> inputs;  // inputs[i][row], events generated from the config
  // 1 where input i was generated from an event of the config (or is a detected effect); may be
  // shorter than `inputs` (missing entries: data columns). Events are not prewhitened.
  std::vector<unsigned char> input_is_event;
  std::string source_file;
  int interpolated = 0;            // cells filled by `missing: interpolate` (target and inputs)
  std::string time_format;         // data.time_format ("" = a recognised form)
  std::string frequency = "none";  // inferred from the time column (time_index.h)
  int seasonal_hint = 0;           // the seasonal period the frequency suggests (0: none)
  // Missing cells per column (the target first, then inputs with any), and how many were filled.
  struct ColumnFill {
    std::string column;
    bool is_target = false;
    int missing = 0;       // cells missing in the file or on inserted rows
    int interpolated = 0;  // of which filled linearly
  };
  std::vector<ColumnFill> fills;
  // 1 where the target value was not observed but filled (interpolate); empty when none was.
  // Such values are never scored as data.
  std::vector<unsigned char> target_filled;
  // The same per input (index as `inputs`); the list or an input's entry is empty when none of
  // its values was filled. Re-validation tells a filled value from a revised one by it.
  std::vector<std::vector<unsigned char>> input_filled;
  bool input_was_filled(size_t input, int t) const {
    return input < input_filled.size() && !input_filled[input].empty() && input_filled[input][t];
  }
  struct InsertedGap {
    int row = 0;    // first inserted row (0-based, in the rows above)
    int count = 0;  // periods inserted
    std::string first_stamp;
  };
  std::vector<InsertedGap> gaps;
  std::vector<std::string> time_notes;  // e.g. offset (daylight-saving) changes

  // A target value that was observed in the file (not missing, not filled).
  bool observed(int t) const {
    return !std::isnan(target[t]) && (target_filled.empty() || !target_filled[t]);
  }
  int target_missing() const {
    int k = 0;
    for (double v : target) k += std::isnan(v) ? 1 : 0;
    return k;
  }

  int rows() const { return static_cast<int>(target.size()); }
  bool is_event(size_t input) const {
    return input < input_is_event.size() && input_is_event[input] != 0;
  }
  // Appends a column with its name and whether it is an event.
  void add_input(std::string name, std::vector<double> values, bool event) {
    input_names.push_back(std::move(name));
    inputs.push_back(std::move(values));
    if (event || !input_is_event.empty()) input_is_event.resize(inputs.size());
    if (event) input_is_event.back() = 1;
  }
  int input_index(const std::string& name) const {
    for (size_t i = 0; i < input_names.size(); ++i)
      if (input_names[i] == name) return static_cast<int>(i);
    return -1;
  }
};

// Rows from..to-1 of every column (time, target, inputs); names and source kept.
inline SeriesData slice_rows(const SeriesData& data, int from, int to) {
  SeriesData s;
  s.target_name = data.target_name;
  s.source_file = data.source_file;
  s.input_names = data.input_names;
  s.input_is_event = data.input_is_event;
  s.interpolated = data.interpolated;
  s.time_format = data.time_format;
  s.frequency = data.frequency;
  s.seasonal_hint = data.seasonal_hint;
  if (!data.target_filled.empty())
    s.target_filled.assign(data.target_filled.begin() + from, data.target_filled.begin() + to);
  for (const auto& f : data.input_filled)
    s.input_filled.push_back(f.empty() ? std::vector<unsigned char>()
                                       : std::vector<unsigned char>(f.begin() + from, f.begin() + to));
  s.target.assign(data.target.begin() + from, data.target.begin() + to);
  if (!data.time.empty()) s.time.assign(data.time.begin() + from, data.time.begin() + to);
  for (const auto& u : data.inputs) s.inputs.emplace_back(u.begin() + from, u.begin() + to);
  return s;
}

}  // namespace lagsieve
