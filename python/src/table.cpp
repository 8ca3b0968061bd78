#include "table.h"

#include <fmt/format.h>
#include <pybind11/numpy.h>

#include <charconv>
#include <cmath>
#include <cstdint>
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

std::string integer_text(std::int64_t v) {
  char buf[32];
  const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);
  return std::string(buf, end);
}

using Doubles = py::array_t<double, py::array::c_style | py::array::forcecast>;

// A numeric array as float64 (without a copy when it is one, C-contiguous).
Doubles as_doubles(const std::string& source, const std::string& name, const py::handle& column) {
  auto a = Doubles::ensure(column);
  if (!a || a.ndim() != 1)
    throw InputError(
        fmt::format("{}: column '{}' is not a one-dimensional numeric column", source, name));
  return a;
}

bool is_integer_array(const py::handle& column) {
  const char kind = py::reinterpret_borrow<py::array>(column).dtype().kind();
  return kind == 'i' || kind == 'u';
}

std::vector<std::string> column_text(const std::string& source, const std::string& name,
                                     const py::handle& column) {
  std::vector<std::string> out;
  if (py::isinstance<py::array>(column)) {
    if (is_integer_array(column)) {
      const auto a =
          py::array_t<std::int64_t, py::array::c_style | py::array::forcecast>::ensure(column);
      if (!a || a.ndim() != 1)
        throw InputError(
            fmt::format("{}: column '{}' is not a one-dimensional column", source, name));
      const auto view = a.unchecked<1>();
      out.reserve(static_cast<size_t>(view.shape(0)));
      for (py::ssize_t i = 0; i < view.shape(0); ++i) out.push_back(integer_text(view(i)));
      return out;
    }
    const auto a = as_doubles(source, name, column);
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

FrameTable table_from_columns(const std::string& source, const std::vector<std::string>& header,
                              const py::list& columns, bool as_text) {
  if (header.size() != columns.size())
    throw InputError(
        fmt::format("{}: {} column names for {} columns", source, header.size(), columns.size()));
  FrameTable out;
  CsvTable& table = out.table;
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
  const size_t width = header.size();
  std::vector<std::vector<std::string>> cells(width);
  std::vector<size_t> length(width, 0);
  for (size_t c = 0; c < width; ++c) {
    const py::handle column = columns[c];
    if (!as_text && py::isinstance<py::array>(column) && !is_integer_array(column)) {
      auto a = as_doubles(source, header[c], column);
      if (out.numbers.empty()) out.numbers.resize(width);
      out.numbers[c] = std::span<const double>(a.data(), static_cast<size_t>(a.shape(0)));
      length[c] = out.numbers[c].size();
      out.arrays.push_back(std::move(a));
    } else {
      cells[c] = column_text(source, header[c], column);
      length[c] = cells[c].size();
    }
    if (length[c] != length[0])
      throw InputError(fmt::format("{}: column '{}' has {} values, column '{}' {}", source,
                                   header[c], length[c], header[0], length[0]));
  }
  const size_t rows = width == 0 ? 0 : length[0];
  table.rows.assign(rows, std::vector<std::string>(width));
  for (size_t c = 0; c < width; ++c)
    if (!cells[c].empty())
      for (size_t r = 0; r < rows; ++r) table.rows[r][c] = std::move(cells[c][r]);
  table.lines.resize(rows);
  for (size_t r = 0; r < rows; ++r) table.lines[r] = static_cast<int>(r) + 1;
  return out;
}

}  // namespace lagsieve::python
