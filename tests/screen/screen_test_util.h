#pragma once
// Series M (R's BJsales, BJsales.lead; tests/reference/data/bjsales.csv) as SeriesData.
#include "core/series.h"
#include "fixture.h"

namespace lagsieve::test {

inline SeriesData read_series_m() {
  SeriesData d;
  d.target_name = "sales";
  d.target = testing::csv_column("data/bjsales.csv", "sales");
  d.input_names = {"lead"};
  d.inputs = {testing::csv_column("data/bjsales.csv", "lead")};
  d.time.assign(d.target.size(), "");
  return d;
}

}  // namespace lagsieve::test
