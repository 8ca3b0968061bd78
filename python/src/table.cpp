#include "table.h"

#include <fmt/format.h>
#include <pybind11/numpy.h>

#include <charconv>
#include <cmath>
#include <set>

#include "core/error.h"

namespace py = pybind11;

namespace lagsieve::python {
namespace {

std::string number_text(double v) {
  if (std::isnan(v)) return "";  // a missing cell, as an empty CSV cell
  char buf[64];
  const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);  // shortest round-trip form
  return std::string(buf, end);
}

std::vector<std::string> column_text(const std::string& source, const std::string& name,
                                     const py::handle& column) {
  std::vector<std::string> out;
  if (py::isinstance<py::array>(column)) {
    // float64 C-contiguous arrays are read in place; other dtypes are converted once.
    const auto a = py::array_t<double, py::array::c_style | py::array::forcecast>::ensure(column);
    if (!a || a.ndim() != 1)
      throw InputError(
          fmt::format("{}: column '{}' is not a one-dimensional numeric column", source, name));
    const auto view = a.unchecked<1>();
    out.reserve(static_cast<size_t>(view.shape(0)));
    for (py::ssize_t i = 0; i < view.shape(0); ++i) out.push_back(number_text(view(i)));
    return out;
  }
  for (const auto& cell : column) {
    if (cell.is_none()) {
      out.emplace_back();
    } else if (py::isinstance<py::str>(cell)) {
      out.push_back(cell.cast<std::string>());
    } else if (py::isinstance<py::float_>(cell) || py::isinstance<py::int_>(cell)) {
      out.push_back(number_text(cell.cast<double>()));
    } else {
      out.push_back(py::str(cell).cast<std::string>());
    }
  }
  return out;
}

}  // namespace

CsvTable table_from_columns(const std::string& source, const std::vector<std::string>& header,
                            const py::list& columns) {
  if (header.size() != columns.size())
    throw InputError(
        fmt::format("{}: {} column names for {} columns", source, header.size(), columns.size()));
  CsvTable table;
  table.source = source;
  table.header = header;
  std::set<std::string> seen;
  for (const auto& name : header) {
    if (name.empty())
      throw InputError(fmt::format("{}: a column has an empty name; name every column", source));
    if (!seen.insert(name).second)
      throw InputError(fmt::format("{}: column '{}' appears twice; give every column its own name",
                                   source, name));
  }
  std::vector<std::vector<std::string>> cells;
  for (size_t c = 0; c < header.size(); ++c) {
    cells.push_back(column_text(source, header[c], columns[c]));
    if (cells[c].size() != cells[0].size())
      throw InputError(fmt::format("{}: column '{}' has {} values, column '{}' {}", source,
                                   header[c], cells[c].size(), header[0], cells[0].size()));
  }
  const size_t rows = cells.empty() ? 0 : cells[0].size();
  table.rows.assign(rows, std::vector<std::string>(header.size()));
  for (size_t c = 0; c < header.size(); ++c)
    for (size_t r = 0; r < rows; ++r) table.rows[r][c] = std::move(cells[c][r]);
  for (size_t r = 0; r < rows; ++r) table.lines.push_back(static_cast<int>(r) + 1);
  return table;
}

}  // namespace lagsieve::python
