#pragma once
// A pandas DataFrame as the table the CSV reader produces, so data from Python go through the
// same checks (calendar, gaps, missing values, messages) as a CSV file.
#include <pybind11/pybind11.h>

#include <string>
#include <vector>

#include "data/load.h"
#include "io/csv.h"

namespace lagsieve::python {

// The table of a DataFrame's columns: text cells, and the float64 columns as numbers (read in
// place from the arrays, which `arrays` keeps alive while the table is used).
struct FrameTable {
  CsvTable table;
  NumericColumns numbers;  // series_from_table's; empty when every column is text
  std::vector<pybind11::object> arrays;
};

// `columns[c]` is a numpy array or a sequence of str (None is a missing cell). A float (or
// bool) array is numbers, NaN a missing cell: a C-contiguous float64 array is read without a
// copy, other layouts and dtypes are converted once. An integer array is text (time stamps as
// integers). With `as_text` every column becomes text cells, numbers in their shortest
// round-trip form, so the loader parses back exactly the double Python held (tables that are
// split or copied, as a panel's). Row r is named `<source>:<r + 1>` in messages.
FrameTable table_from_columns(const std::string& source, const std::vector<std::string>& header,
                              const pybind11::list& columns, bool as_text = false);

}  // namespace lagsieve::python
