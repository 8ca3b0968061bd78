#pragma once
// Test helpers: reading reference fixtures (tests/reference/...) and the bundled datasets.
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

namespace lagsieve::testing {

inline std::string reference_path(const std::string& relative) {
  return std::string(LAGSIEVE_TEST_DATA_DIR) + "/reference/" + relative;
}

inline nlohmann::json load_fixture(const std::string& relative) {
  std::ifstream in(reference_path(relative));
  if (!in) throw std::runtime_error("missing fixture " + relative);
  return nlohmann::json::parse(in);
}

inline std::vector<double> to_vector(const nlohmann::json& j) {
  return j.get<std::vector<double>>();
}

// Reads one numeric column of a CSV file with a header (no quoting needed for fixtures).
inline std::vector<double> csv_column(const std::string& relative, const std::string& column) {
  std::ifstream in(reference_path(relative));
  if (!in) throw std::runtime_error("missing data file " + relative);
  std::string line;
  std::getline(in, line);
  std::vector<std::string> header;
  std::stringstream hs(line);
  for (std::string cell; std::getline(hs, cell, ',');) header.push_back(cell);
  size_t index = header.size();
  for (size_t i = 0; i < header.size(); ++i)
    if (header[i] == column || header[i] == "\"" + column + "\"") index = i;
  if (index == header.size()) throw std::runtime_error("no column " + column);
  std::vector<double> out;
  while (std::getline(in, line)) {
    std::stringstream ls(line);
    std::string cell;
    for (size_t i = 0; i <= index; ++i) std::getline(ls, cell, ',');
    out.push_back(std::stod(cell));
  }
  return out;
}

inline double relative_difference(double a, double b) {
  return std::abs(a - b) / std::max(std::abs(b), 1e-300);
}

}  // namespace lagsieve::testing
