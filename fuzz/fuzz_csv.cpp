// The CSV reader and the data layer behind it: fuzzed text parsed as a table, then read as the
// series of a fixed config (time column t, target y, one input x, interpolation on).
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "data/load.h"
#include "fuzz_support.h"
#include "io/config.h"
#include "io/csv.h"

namespace {

const lagsieve::RunConfig& config() {
  static const lagsieve::RunConfig c =
      lagsieve::parse_config(R"(data: {file: data.csv, time: t, missing: interpolate}
target: {column: y}
inputs:
  - column: x
    delay: [0, 1]
noise: {ar: [0, 1]}
)",
                             "/fuzz/config.yaml");
  return c;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  lagsieve::fuzz::refusals_only([&] {
    const auto table = lagsieve::parse_csv(text, "fuzz.csv");
    if (table.column_index("y") >= 0) lagsieve::series_from_table(config(), table, "y");
  });
  return 0;
}
