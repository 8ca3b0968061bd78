#pragma once
// Helpers shared by the screen tests: fixture paths and the Series M data.
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <string>

#include <nlohmann/json.hpp>

#include "core/series.h"

namespace lagsieve::test {

inline std::string reference_path(const std::string& relative) {
  return std::string(LAGSIEVE_TEST_DATA_DIR) + "/reference/" + relative;
}

inline nlohmann::json read_json(const std::string& relative) {
  std::ifstream in(reference_path(relative));
  if (!in) throw std::runtime_error("missing fixture " + relative);
  return nlohmann::json::parse(in);
}

// Series M (R's BJsales, BJsales.lead) from tests/reference/data/bjsales.csv (t,sales,lead).
inline SeriesData read_series_m() {
  std::ifstream in(reference_path("data/bjsales.csv"));
  if (!in) throw std::runtime_error("missing tests/reference/data/bjsales.csv");
  SeriesData d;
  d.target_name = "sales";
  d.input_names = {"lead"};
  d.inputs.resize(1);
  std::string line;
  std::getline(in, line);  // header
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::stringstream ss(line);
    std::string t, sales, lead;
    std::getline(ss, t, ',');
    std::getline(ss, sales, ',');
    std::getline(ss, lead, ',');
    d.time.push_back(t);
    d.target.push_back(std::stod(sales));
    d.inputs[0].push_back(std::stod(lead));
  }
  return d;
}

}  // namespace lagsieve::test
