#pragma once
// Loaded, validated data for one target series: original scale, aligned rows, no gaps.
#include <string>
#include <vector>

namespace lagsieve {

struct SeriesData {
  std::string target_name;
  std::vector<double> target;               // original scale, one value per row
  std::vector<std::string> time;            // time stamps as read ("" when the file has none)
  std::vector<std::string> input_names;     // every configured input, events included, config order
  std::vector<std::vector<double>> inputs;  // inputs[i][row], events generated from the config
  std::string source_file;
  int interpolated = 0;  // cells filled by `missing: interpolate`

  int rows() const { return static_cast<int>(target.size()); }
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
  s.interpolated = data.interpolated;
  s.target.assign(data.target.begin() + from, data.target.begin() + to);
  if (!data.time.empty()) s.time.assign(data.time.begin() + from, data.time.begin() + to);
  for (const auto& u : data.inputs) s.inputs.emplace_back(u.begin() + from, u.begin() + to);
  return s;
}

}  // namespace lagsieve
