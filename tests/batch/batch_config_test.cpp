// The long-format keys of the config: data.series_key with one target column, not the time
// column, the target or an input.
#include <gtest/gtest.h>

#include <string>

#include "core/error.h"
#include "io/config.h"

namespace lagsieve {
namespace {

std::string error_of(const std::string& yaml) {
  try {
    parse_config(yaml, "panel.yaml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(BatchConfig, SeriesKeyIsReadAndChecked) {
  const std::string head = "data:\n  file: p.csv\n  time: date\n  series_key: ";
  const RunConfig ok = parse_config(head + "zone\ntarget:\n  column: y\n", "panel.yaml");
  EXPECT_EQ(ok.data.series_key, "zone");
  EXPECT_EQ(parse_config("data:\n  file: p.csv\ntarget:\n  column: y\n", "w.yaml").data.series_key,
            "");
  EXPECT_NE(error_of(head + "zone\ntarget:\n  columns: [a, b]\n").find("target is one column"),
            std::string::npos);
  EXPECT_NE(error_of(head + "date\ntarget:\n  column: y\n").find("also data.time"),
            std::string::npos);
  EXPECT_NE(error_of(head + "y\ntarget:\n  column: y\n").find("also the target column"),
            std::string::npos);
  EXPECT_NE(error_of(head + "zone\ntarget:\n  column: y\ninputs:\n  - column: zone\n")
                .find("names the series"),
            std::string::npos);
  EXPECT_NE(error_of(head + "''\ntarget:\n  column: y\n").find("panel.yaml:4"), std::string::npos)
      << error_of(head + "''\ntarget:\n  column: y\n");
}

}  // namespace
}  // namespace lagsieve
