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
                          "2024-03-01 25:00", "2024-03-01 10", "tomorrow", "2024-13", "2024-Q5",
                          "2024-W54", "2021-W53", "2024-03-01T06:30+25:00"})
    EXPECT_FALSE(parse_time_stamp(bad).has_value()) << bad;
  EXPECT_TRUE(parse_time_stamp("2024-02-29").has_value());
  EXPECT_EQ(parse_time_stamp("2024/03/01")->key, 1709251200);
  // Months, quarters and ISO weeks start at their first day (2024-W09 is Monday 2024-02-26).
  EXPECT_EQ(parse_time_stamp("2024-03")->key, 1709251200);
  EXPECT_EQ(parse_time_stamp("2024-03")->format, TimeFormat::month);
  EXPECT_EQ(parse_time_stamp("1962Q2")->key, parse_time_stamp("1962-04-01")->key);
  EXPECT_EQ(parse_time_stamp("1962-Q2")->format, TimeFormat::quarter);
  EXPECT_EQ(parse_time_stamp("2024-W09")->key, 1709251200 - 4 * 86400);
  EXPECT_EQ(parse_time_stamp("2020-W53")->format, TimeFormat::week);  // 2020 has 53 ISO weeks
  // Offsets are converted to UTC; Z is UTC.
  EXPECT_EQ(parse_time_stamp("2024-03-01T06:30:00Z")->key, 1709251200 + 6 * 3600 + 30 * 60);
  EXPECT_EQ(parse_time_stamp("2024-03-01T07:30:00+01:00")->key, 1709251200 + 6 * 3600 + 30 * 60);
  EXPECT_EQ(parse_time_stamp("2024-03-01T01:30-0500")->key, 1709251200 + 6 * 3600 + 30 * 60);
  EXPECT_EQ(*parse_time_stamp("2024-03-01T07:30+01:00")->offset_minutes, 60);
  // An explicit format: the whole text must match.
  EXPECT_EQ(parse_time_stamp("01/03/2024", "%d/%m/%Y")->key, 1709251200);
  EXPECT_FALSE(parse_time_stamp("2024-03-01", "%d/%m/%Y").has_value());
  EXPECT_FALSE(parse_time_stamp("01/03/2024x", "%d/%m/%Y").has_value());
}

std::string analysis_error(const Strings& time, const std::string& format = "") {
  try {
    analyse_time(time, format, "when", {}, "d.csv");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

TEST(TimeStamp, AnalysisFindsGapsAndRefusesBadColumns) {
  const auto a = analyse_time({"1969-01", "1969-02", "1969-05", "1969-06"}, "", "when");
  EXPECT_EQ(a.frequency, Frequency::monthly);
  ASSERT_EQ(a.gaps.size(), 1u);
  EXPECT_EQ(a.gaps[0].before_row, 2);
  EXPECT_EQ(a.gaps[0].count, 2);
  EXPECT_EQ(stamp_of_period(a, 1, "1969-02"), "1969-03");
  const auto d = analyse_time({"2024-01-01", "2024-01-02", "2024-01-04"}, "", "when");
  EXPECT_EQ(d.frequency, Frequency::daily);
  ASSERT_EQ(d.gaps.size(), 1u);
  EXPECT_EQ(stamp_of_period(d, 1, "2024-01-02"), "2024-01-03");
  EXPECT_EQ(analyse_time({"1871", "1872", "1873"}, "", "when").frequency, Frequency::annual);
  EXPECT_EQ(analyse_time({"1962Q1", "1962Q2"}, "", "when").frequency, Frequency::quarterly);
  EXPECT_EQ(analyse_time({"2020-W52", "2020-W53", "2021-W01"}, "", "when").frequency,
            Frequency::weekly);
  // A daylight-saving change in offset stamps: regular in UTC, the change reported.
  const auto dst = analyse_time({"2024-03-31T00:00+01:00", "2024-03-31T01:00+01:00",
                                 "2024-03-31T03:00+02:00", "2024-03-31T04:00+02:00"},
                                "", "when");
  EXPECT_EQ(dst.frequency, Frequency::hourly);
  EXPECT_TRUE(dst.gaps.empty());
  ASSERT_EQ(dst.offset_changes.size(), 1u);
  EXPECT_EQ(dst.offset_changes[0].row, 2);
  EXPECT_EQ(next_time_stamps({"2024-03-31T01:00+01:00", "2024-03-31T03:00+02:00"}, 1),
            (Strings{"2024-03-31T04:00+02:00"}));

  EXPECT_EQ(analysis_error({"2024-01", "2024-01-15", "2024-02"}),
            "d.csv: row 2: time column 'when': '2024-01-15' falls in the same month as '2024-01' "
            "on d.csv: row 1; each period may appear once, so remove one row or write every "
            "stamp in one form");
  EXPECT_NE(analysis_error({"2024-01-01", "2024-02"}).find("write every stamp in one form"),
            std::string::npos);
  EXPECT_NE(analysis_error({"1", "2", "4"}).find("irregular integer index"), std::string::npos);
  EXPECT_NE(analysis_error({"2024-01-01", "2024-01-08", "2024-01-11", "2024-01-18"})
                .find("the frequency cannot be inferred"),
            std::string::npos);
  EXPECT_EQ(analysis_error({"01/02/2024", "2024-02-02"}, "%d/%m/%Y"),
            "d.csv: row 2: time column 'when': '2024-02-02' does not match data.time_format "
            "'%d/%m/%Y' (the column begins '01/02/2024', '2024-02-02'); correct the stamp or the "
            "format (e.g. '%d/%m/%Y' for 31/01/2024)");
  EXPECT_NE(analysis_error({"31/01/2024"}).find("set data.time_format"), std::string::npos);
}

TEST(TimeStamp, FrequencyLabels) {
  EXPECT_EQ(infer_frequency({"2024-02-27", "2024-02-28", "2024-02-29", "2024-03-01"}), "daily");
  EXPECT_EQ(infer_frequency({"2024-01-01", "2024-01-08", "2024-01-15"}), "weekly");
  EXPECT_EQ(infer_frequency({"2023-11-15", "2023-12-15", "2024-01-15", "2024-02-15"}), "monthly");
  EXPECT_EQ(infer_frequency({"2024-01-31", "2024-02-29", "2024-03-31", "2024-04-30"}), "monthly");
  EXPECT_EQ(infer_frequency({"2023-01-01", "2023-04-01", "2023-07-01"}), "quarterly");
  EXPECT_EQ(infer_frequency({"2021-01-01", "2022-01-01", "2023-01-01"}), "annual");
  EXPECT_EQ(infer_frequency({"2024-03-01 23:00", "2024-03-02 00:00"}), "hourly");
  EXPECT_EQ(infer_frequency({"2024-03-01 00:00", "2024-03-01 00:15", "2024-03-01 00:30"}),
            "every 900 seconds");
  EXPECT_EQ(infer_frequency({"1", "2", "3"}), "none");
  EXPECT_EQ(infer_frequency({"", "", ""}), "none");
  EXPECT_EQ(infer_frequency({"1", "2", "4"}), "irregular");
  EXPECT_EQ(infer_frequency({"2024-01-01", "2024-01-02", "2024-01-04"}), "daily");  // a gap
  EXPECT_EQ(infer_frequency({"2024-01-01", "2024-01-02", "2024-01-04", "2024-01-05"}), "daily");
}

TEST(TimeStamp, NextStamps) {
  EXPECT_EQ(next_time_stamps({"2024-02-27", "2024-02-28"}, 3),
            (Strings{"2024-02-29", "2024-03-01", "2024-03-02"}));
  EXPECT_EQ(next_time_stamps({"2023-12-25", "2024-01-01"}, 2),
            (Strings{"2024-01-08", "2024-01-15"}));
  EXPECT_EQ(next_time_stamps({"2023-11-15", "2023-12-15"}, 2),
            (Strings{"2024-01-15", "2024-02-15"}));
  // Month ends stay month ends, leap February included.
  EXPECT_EQ(next_time_stamps({"2023-12-31", "2024-01-31"}, 3),
            (Strings{"2024-02-29", "2024-03-31", "2024-04-30"}));
  EXPECT_EQ(next_time_stamps({"2024-01-31", "2024-02-29"}, 2),
            (Strings{"2024-03-31", "2024-04-30"}));
  EXPECT_EQ(next_time_stamps({"2023-07-01", "2023-10-01"}, 2),
            (Strings{"2024-01-01", "2024-04-01"}));
  EXPECT_EQ(next_time_stamps({"2024-03-01 22:00", "2024-03-01 23:00"}, 2),
            (Strings{"2024-03-02 00:00", "2024-03-02 01:00"}));
  EXPECT_EQ(next_time_stamps({"2024-03-01T22:00:00", "2024-03-01T22:00:30"}, 1),
            (Strings{"2024-03-01T22:01:00"}));
  EXPECT_EQ(next_time_stamps({"8", "10", "12"}, 2), (Strings{"14", "16"}));
  EXPECT_EQ(next_time_stamps({"1969-11", "1969-12"}, 2), (Strings{"1970-01", "1970-02"}));
  EXPECT_EQ(next_time_stamps({"1962Q3", "1962Q4"}, 2), (Strings{"1963Q1", "1963Q2"}));
  EXPECT_EQ(next_time_stamps({"1962-Q4"}, 1), (Strings{"1963-Q1"}));
  EXPECT_EQ(next_time_stamps({"2020-W52", "2020-W53"}, 2), (Strings{"2021-W01", "2021-W02"}));
  EXPECT_EQ(next_time_stamps({"1969", "1970"}, 2), (Strings{"1971", "1972"}));
  EXPECT_EQ(next_time_stamps({"2024/01/30", "2024/01/31"}, 1), (Strings{"2024/02/01"}));
  EXPECT_EQ(next_time_stamps({"2024-03-01T22:00:00Z", "2024-03-01T23:00:00Z"}, 1),
            (Strings{"2024-03-02T00:00:00Z"}));
  EXPECT_EQ(next_time_stamps({"30/01/2024", "31/01/2024"}, 2, "%d/%m/%Y"),
            (Strings{"01/02/2024", "02/02/2024"}));
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
            "it like the time column (2024-03-01, 2024-03-01 06:00, 2024-03, 2024-Q1, 2024-W09, "
            "2024) or as a 0-based row number");
  EXPECT_EQ(event_row(event_at("1983-02"), Strings{"1983-01", "1983-02", "1983-03"}, "c.yaml"), 1);
  // A date inside a month of a monthly column starts in that month.
  EXPECT_EQ(event_row(event_at("1983-02-10"), Strings{"1983-01", "1983-02", "1983-03"}, "c.yaml"),
            1);
}

}  // namespace
}  // namespace lagsieve
