// The YAML config loader: fuzzed text parsed as a run config, then its grid counted.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "fuzz_support.h"
#include "io/config.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  lagsieve::fuzz::refusals_only([&] {
    const auto config = lagsieve::parse_config(text, "/fuzz/config.yaml");
    (void)lagsieve::candidate_grid_size(config);
  });
  return 0;
}
