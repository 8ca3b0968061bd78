#pragma once
// Ticks of a time axis labelled with the series' own time stamps. A tick sits at each row where a
// calendar unit starts (hours, days, months, quarters, half-years, years or several years), the
// unit the finest that is no finer than the rows' spacing and leaves room for its labels (at most
// 12): monthly data over ten years get a tick each January labelled "2019", daily data over half
// a year one at each month's first row labelled "2024-03" (as the stamps write it), hourly data
// over two days one every 12 hours ("2024-03-01 00:00", then "12:00"). Integer stamps get ticks
// at round values (50, 100, ... or 1990, 2000). Where fewer than four calendar ticks would fit,
// and for stamps none of the built-in forms read (a custom `data.time_format`), the full stamps
// sit at evenly spaced rows instead.
#include <string>
#include <vector>

#include "report/svg.h"

namespace lagsieve {

// `x` (ascending, one per row) are the positions on the axis, `time` the stamps as written; no
// ticks (the caller falls back to numbered rows) when the sizes differ or a stamp is empty.
// `plot_width` in pixels sets how many labels fit.
std::vector<AxisTick> time_axis_ticks(const std::vector<double>& x,
                                      const std::vector<std::string>& time,
                                      double plot_width = 860.0);

}  // namespace lagsieve
