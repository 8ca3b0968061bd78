#pragma once
// Series M (R's BJsales, BJsales.lead; tests/reference/data/bjsales.csv) as SeriesData: the
// target `sales` and the input `lead`, undifferenced.
#include "core/series.h"
#include "fixture.h"

namespace lagsieve::testing {

inline SeriesData read_series_m() {
  SeriesData d;
  d.target_name = "sales";
  d.target = csv_column("data/bjsales.csv", "sales");
  d.input_names = {"lead"};
  d.inputs = {csv_column("data/bjsales.csv", "lead")};
  d.time.assign(d.target.size(), "");
  return d;
}

}  // namespace lagsieve::testing
