// Time stamps, frequency labels, continued stamps, and generated event inputs.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "core/error.h"
#include "data/events.h"
#include "data/time_index.h"

namespace lagsieve {
namespace {

using Strings = std::vector<std::string>;

TEST(TimeStamp, Parsing) {
  // 2024-03-01 is day 19783 after 1970-01-01 (date -d 2024-03-01 +%s = 1709251200).
  EXPECT_EQ(parse_time_stamp("2024-03-01")->key, 1709251200);
  EXPECT_EQ(parse_time_stamp("2024-03-01")->format, TimeFormat::date);
  EXPECT_EQ(parse_time_stamp("2024-03-01 06:30")->key, 1709251200 + 6 * 3600 + 30 * 60);
  EXPECT_EQ(parse_time_stamp("2024-03-01T06:30:15")->key, 1709251200 + 6 * 3600 + 30 * 60 + 15);
  EXPECT_EQ(parse_time_stamp("2024-03-01T06:30:15")->format, TimeFormat::datetime);
  EXPECT_EQ(parse_time_stamp("1969-12-31")->key, -86400);
  EXPECT_EQ(parse_time_stamp("42")->key, 42);
  EXPECT_EQ(parse_time_stamp("-3")->format, TimeFormat::integer);
  for (const char* bad : {"", "2024-02-30", "2023-02-29", "2024-13-01", "2024-3-1", "12.5",
                          "2024-03-01 25:00", "2024-03-01 10", "tomorrow", "2024/03/01"})
    EXPECT_FALSE(parse_time_stamp(bad).has_value()) << bad;
  EXPECT_TRUE(parse_time_stamp("2024-02-29").has_value());
}

TEST(TimeStamp, FrequencyLabels) {
  EXPECT_EQ(infer_frequency({"2024-02-27", "2024-02-28", "2024-02-29", "2024-03-01"}), "daily");
  EXPECT_EQ(infer_frequency({"2024-01-01", "2024-01-08", "2024-01-15"}), "weekly");
  EXPECT_EQ(infer_frequency({"2023-11-15", "2023-12-15", "2024-01-15", "2024-02-15"}), "monthly");
  EXPECT_EQ(infer_frequency({"2024-01-31", "2024-02-29", "2024-03-31", "2024-04-30"}), "monthly");
  EXPECT_EQ(infer_frequency({"2023-01-01", "2023-04-01", "2023-07-01"}), "quarterly");
  EXPECT_EQ(infer_frequency({"2021-01-01", "2022-01-01", "2023-01-01"}), "yearly");
  EXPECT_EQ(infer_frequency({"2024-03-01 23:00", "2024-03-02 00:00"}), "hourly");
  EXPECT_EQ(infer_frequency({"2024-03-01 00:00", "2024-03-01 00:15", "2024-03-01 00:30"}),
            "every 900 seconds");
  EXPECT_EQ(infer_frequency({"1", "2", "3"}), "integer");
  EXPECT_EQ(infer_frequency({"", "", ""}), "integer");
  EXPECT_EQ(infer_frequency({"1", "2", "4"}), "irregular");
  EXPECT_EQ(infer_frequency({"2024-01-01", "2024-01-02", "2024-01-04"}), "irregular");
}

TEST(TimeStamp, NextStamps) {
  EXPECT_EQ(next_time_stamps({"2024-02-27", "2024-02-28"}, 3),
            (Strings{"2024-02-29", "2024-03-01", "2024-03-02"}));
  EXPECT_EQ(next_time_stamps({"2023-12-25", "2024-01-01"}, 2), (Strings{"2024-01-08", "2024-01-15"}));
  EXPECT_EQ(next_time_stamps({"2023-11-15", "2023-12-15"}, 2), (Strings{"2024-01-15", "2024-02-15"}));
  // Month ends stay month ends, leap February included.
  EXPECT_EQ(next_time_stamps({"2023-12-31", "2024-01-31"}, 3),
            (Strings{"2024-02-29", "2024-03-31", "2024-04-30"}));
  EXPECT_EQ(next_time_stamps({"2024-01-31", "2024-02-29"}, 2), (Strings{"2024-03-31", "2024-04-30"}));
  EXPECT_EQ(next_time_stamps({"2023-07-01", "2023-10-01"}, 2), (Strings{"2024-01-01", "2024-04-01"}));
  EXPECT_EQ(next_time_stamps({"2024-03-01 22:00", "2024-03-01 23:00"}, 2),
            (Strings{"2024-03-02 00:00", "2024-03-02 01:00"}));
  EXPECT_EQ(next_time_stamps({"2024-03-01T22:00:00", "2024-03-01T22:00:30"}, 1),
            (Strings{"2024-03-01T22:01:00"}));
  EXPECT_EQ(next_time_stamps({"8", "10", "12"}, 2), (Strings{"14", "16"}));
  EXPECT_EQ(next_time_stamps({"1", "2", "5"}, 2), (Strings{"8", "11"}));  // repeats the last step
  EXPECT_EQ(next_time_stamps({"", ""}, 2), (Strings{"", ""}));
  EXPECT_TRUE(next_time_stamps({"1", "2"}, 0).empty());
}

TEST(Events, ShapesAreClosedForm) {
  EXPECT_EQ(event_values(EventShape::pulse, 2, 5), (std::vector<double>{0, 0, 1, 0, 0}));
  EXPECT_EQ(event_values(EventShape::step, 2, 5), (std::vector<double>{0, 0, 1, 1, 1}));
  EXPECT_EQ(event_values(EventShape::ramp, 2, 5), (std::vector<double>{0, 0, 0, 1, 2}));
  EXPECT_EQ(event_values(EventShape::step, 7, 3), (std::vector<double>{0, 0, 0}));
}

InputConfig event_at(const std::string& at) {
  InputConfig in;
  in.name = "shock";
  in.is_event = true;
  in.at = at;
  in.line = 9;
  return in;
}

std::string row_error(const std::string& at, const Strings& time) {
  try {
    event_row(event_at(at), time, "c.yaml");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

TEST(Events, StartRow) {
  const Strings days{"2024-01-01", "2024-01-08", "2024-01-15", "2024-01-22"};
  EXPECT_EQ(event_row(event_at("2024-01-15"), days, "c.yaml"), 2);
  EXPECT_EQ(event_row(event_at("2024-01-10"), days, "c.yaml"), 2);  // between stamps: next row
  EXPECT_EQ(event_row(event_at("2024-01-15 12:00"), days, "c.yaml"), 3);
  EXPECT_EQ(event_row(event_at("1"), days, "c.yaml"), 1);  // a row index against dates
  EXPECT_EQ(event_row(event_at("3"), Strings(5, ""), "c.yaml"), 3);
  EXPECT_EQ(event_row(event_at("12"), Strings{"10", "11", "12", "13"}, "c.yaml"), 2);
  EXPECT_EQ(row_error("2024-02-01", days),
            "c.yaml:9: event 'shock': `at: 2024-02-01` is after the last time stamp 2024-01-22; "
            "the data hold no row with the event, so its effect cannot be estimated");
  EXPECT_EQ(row_error("4", days),
            "c.yaml:9: event 'shock': row index 4 is outside the data (rows 0 to 3); give a row "
            "inside the data");
  EXPECT_EQ(row_error("March", days),
            "c.yaml:9: event 'shock': `at: March` is neither a time stamp nor a row index; write "
            "it like the time column (YYYY-MM-DD, YYYY-MM-DD HH:MM) or as a 0-based row number");
}

}  // namespace
}  // namespace lagsieve
