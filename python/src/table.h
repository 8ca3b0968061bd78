#pragma once
// A pandas DataFrame as the table the CSV reader produces, so data from Python go through the
// same checks (calendar, gaps, missing values, messages) as a CSV file.
#include <pybind11/pybind11.h>

#include <string>
#include <vector>

#include "io/csv.h"

namespace lagsieve::python {

// `columns[c]` is a numpy array (read as float64; NaN is a missing cell) or a sequence of str
// (None is a missing cell). Numbers become their shortest round-trip text, so the loader parses
// back exactly the double Python held. Row r is named `<source>:<r + 1>` in messages.
CsvTable table_from_columns(const std::string& source, const std::vector<std::string>& header,
                            const pybind11::list& columns);

}  // namespace lagsieve::python
