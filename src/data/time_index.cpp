#include "data/time_index.h"

#include <date/date.h>
#include <date/iso_week.h>
#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <map>
#include <sstream>

#include "core/error.h"

namespace lagsieve {
namespace {

constexpr std::int64_t kDay = 86400;
constexpr std::int64_t kWeek = 7 * kDay;

// Reads exactly `width` digits at `pos`.
bool digits(std::string_view s, size_t pos, size_t width, int& out) {
  if (pos + width > s.size()) return false;
  out = 0;
  for (size_t i = pos; i < pos + width; ++i) {
    if (s[i] < '0' || s[i] > '9') return false;
    out = out * 10 + (s[i] - '0');
  }
  return true;
}

bool all_digits(std::string_view s) {
  return !s.empty() && std::all_of(s.begin(), s.end(), [](char c) { return c >= '0' && c <= '9'; });
}

// Seconds since the epoch of a civil date; nullopt when the date does not exist.
std::optional<std::int64_t> day_key(int y, int m, int d) {
  const date::year_month_day ymd{date::year{y}, date::month{static_cast<unsigned>(m)},
                                 date::day{static_cast<unsigned>(d)}};
  if (m < 1 || m > 12 || d < 1 || !ymd.ok()) return std::nullopt;
  return static_cast<std::int64_t>(date::sys_days{ymd}.time_since_epoch().count()) * kDay;
}

date::year_month_day civil_of(std::int64_t key) {
  const auto days = date::floor<date::days>(date::sys_seconds{std::chrono::seconds{key}});
  return date::year_month_day{days};
}

std::int64_t month_index(std::int64_t key) {
  const auto ymd = civil_of(key);
  return static_cast<std::int64_t>(static_cast<int>(ymd.year())) * 12 +
         (static_cast<unsigned>(ymd.month()) - 1);
}

std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  return a / b - ((a % b != 0) && ((a < 0) != (b < 0)) ? 1 : 0);
}

// Parses "Z", "+HH:MM", "+HHMM" or "+HH" (the whole text) into minutes east of UTC.
std::optional<int> parse_offset(std::string_view s) {
  if (s == "Z" || s == "z") return 0;
  if (s.size() < 3 || (s[0] != '+' && s[0] != '-')) return std::nullopt;
  int hh = 0, mm = 0;
  if (!digits(s, 1, 2, hh)) return std::nullopt;
  if (s.size() == 6 && s[3] == ':') {
    if (!digits(s, 4, 2, mm)) return std::nullopt;
  } else if (s.size() == 5) {
    if (!digits(s, 3, 2, mm)) return std::nullopt;
  } else if (s.size() != 3) {
    return std::nullopt;
  }
  if (hh > 23 || mm > 59) return std::nullopt;
  return (s[0] == '-' ? -1 : 1) * (hh * 60 + mm);
}

std::optional<TimeStamp> parse_custom(std::string_view text, const std::string& format) {
  std::istringstream in{std::string(text)};
  date::sys_seconds tp{};
  in >> date::parse(format, tp);
  if (in.fail()) return std::nullopt;
  in.peek();  // sets eof when everything was read
  if (!in.eof()) return std::nullopt;
  return TimeStamp{TimeFormat::custom, tp.time_since_epoch().count(), std::nullopt};
}

std::optional<TimeStamp> parse_auto(std::string_view s) {
  TimeStamp ts;
  int y = 0, m = 0, d = 0;
  // Integers (and 4-digit years, told apart for the whole column by analyse_time).
  if (!s.empty() && (s[0] == '-' || s[0] == '+' || (s[0] >= '0' && s[0] <= '9')) &&
      (s.size() < 5 || (s[4] != '-' && s[4] != '/' && s[4] != 'Q' && s[4] != 'W' && s[4] != ' '))) {
    std::int64_t v = 0;
    const char* begin = s.data() + (s[0] == '+' ? 1 : 0);
    const char* end = s.data() + s.size();
    const auto [p, ec] = std::from_chars(begin, end, v);
    if (ec != std::errc() || p != end || begin == end) return std::nullopt;
    return TimeStamp{TimeFormat::integer, v, std::nullopt};
  }
  if (!digits(s, 0, 4, y)) return std::nullopt;
  const char sep = s.size() > 4 ? s[4] : '\0';
  // Quarters: 2024-Q1, 2024Q1, 2024 Q1.
  {
    size_t q = 4;
    if (sep == '-' || sep == ' ') q = 5;
    if (s.size() == q + 2 && (s[q] == 'Q' || s[q] == 'q')) {
      int quarter = 0;
      if (!digits(s, q + 1, 1, quarter) || quarter < 1 || quarter > 4) return std::nullopt;
      ts.format = TimeFormat::quarter;
      ts.key = *day_key(y, 3 * quarter - 2, 1);
      return ts;
    }
  }
  // ISO weeks: 2024-W09, 2024W09.
  {
    const size_t w = sep == '-' ? 5 : 4;
    if (s.size() == w + 3 && (s[w] == 'W' || s[w] == 'w')) {
      int week = 0;
      if (!digits(s, w + 1, 2, week)) return std::nullopt;
      const iso_week::year_weeknum_weekday iw{iso_week::year{y},
                                              iso_week::weeknum{static_cast<unsigned>(week)},
                                              iso_week::weekday{date::Monday}};
      if (week < 1 || !iw.ok()) return std::nullopt;
      ts.format = TimeFormat::week;
      ts.key = static_cast<std::int64_t>(date::sys_days{iw}.time_since_epoch().count()) * kDay;
      return ts;
    }
  }
  if (sep != '-' && sep != '/') return std::nullopt;
  if (!digits(s, 5, 2, m)) return std::nullopt;
  if (s.size() == 7) {  // a month
    const auto key = day_key(y, m, 1);
    if (!key) return std::nullopt;
    ts.format = TimeFormat::month;
    ts.key = *key;
    return ts;
  }
  if (s.size() < 10 || s[7] != sep || !digits(s, 8, 2, d)) return std::nullopt;
  const auto key = day_key(y, m, d);
  if (!key) return std::nullopt;
  ts.key = *key;
  ts.format = TimeFormat::date;
  if (s.size() == 10) return ts;
  // Date-times: [T ]HH:MM[:SS][offset].
  int hh = 0, mm = 0, ss = 0;
  if ((s[10] != ' ' && s[10] != 'T') || s.size() < 16 || s[13] != ':') return std::nullopt;
  if (!digits(s, 11, 2, hh) || !digits(s, 14, 2, mm)) return std::nullopt;
  size_t rest = 16;
  if (s.size() >= 19 && s[16] == ':') {
    if (!digits(s, 17, 2, ss)) return std::nullopt;
    rest = 19;
  }
  if (hh > 23 || mm > 59 || ss > 59) return std::nullopt;
  ts.format = TimeFormat::datetime;
  ts.key += hh * 3600 + mm * 60 + ss;
  if (rest < s.size()) {
    const auto offset = parse_offset(s.substr(rest));
    if (!offset) return std::nullopt;
    ts.offset_minutes = *offset;
    ts.key -= static_cast<std::int64_t>(*offset) * 60;
  }
  return ts;
}

// How a stamp is written, read back from one stamp of the column.
struct Style {
  char date_sep = '-';
  char time_sep = ' ';
  bool seconds = false;
  std::string offset_text;  // "", "Z", "+01:00", "+0100", "+01"
  int offset_minutes = 0;
  std::string quarter_sep;  // "-", "", " "
  std::string week_sep;     // "-", ""
};

Style style_of(std::string_view s) {
  Style st;
  if (s.size() > 4 && (s[4] == '-' || s[4] == '/')) st.date_sep = s[4];
  if (s.size() > 10) st.time_sep = s[10];
  st.seconds = s.size() >= 19 && s[16] == ':';
  if (s.size() > 16) {
    const size_t rest = st.seconds ? 19 : 16;
    if (rest < s.size()) {
      st.offset_text = std::string(s.substr(rest));
      st.offset_minutes = parse_offset(st.offset_text).value_or(0);
    }
  }
  const auto q = s.find_first_of("Qq");
  if (q != std::string_view::npos) st.quarter_sep = std::string(s.substr(4, q - 4));
  const auto w = s.find_first_of("Ww");
  if (w != std::string_view::npos) st.week_sep = std::string(s.substr(4, w - 4));
  return st;
}

std::string offset_like(const Style& st) {
  if (st.offset_text.empty() || st.offset_text == "Z" || st.offset_text == "z")
    return st.offset_text;
  const int a = std::abs(st.offset_minutes);
  const char sign = st.offset_minutes < 0 ? '-' : '+';
  if (st.offset_text.size() == 6) return fmt::format("{}{:02d}:{:02d}", sign, a / 60, a % 60);
  if (st.offset_text.size() == 5) return fmt::format("{}{:02d}{:02d}", sign, a / 60, a % 60);
  return fmt::format("{}{:02d}", sign, a / 60);
}

std::string write_stamp(TimeFormat format, std::int64_t key, const Style& st,
                        const std::string& custom) {
  switch (format) {
    case TimeFormat::integer:
      return std::to_string(key);
    case TimeFormat::custom:
      return date::format(custom, date::sys_seconds{std::chrono::seconds{key}});
    case TimeFormat::year:
      return fmt::format("{:04d}", static_cast<int>(civil_of(key).year()));
    case TimeFormat::month: {
      const auto ymd = civil_of(key);
      return fmt::format("{:04d}{}{:02d}", static_cast<int>(ymd.year()), st.date_sep,
                         static_cast<unsigned>(ymd.month()));
    }
    case TimeFormat::quarter: {
      const auto ymd = civil_of(key);
      return fmt::format("{:04d}{}Q{}", static_cast<int>(ymd.year()), st.quarter_sep,
                         (static_cast<unsigned>(ymd.month()) - 1) / 3 + 1);
    }
    case TimeFormat::week: {
      const auto days = date::floor<date::days>(date::sys_seconds{std::chrono::seconds{key}});
      const iso_week::year_weeknum_weekday iw{days};
      return fmt::format("{:04d}{}W{:02d}", static_cast<int>(iw.year()), st.week_sep,
                         static_cast<unsigned>(iw.weeknum()));
    }
    case TimeFormat::date: {
      const auto ymd = civil_of(key);
      return fmt::format("{:04d}{}{:02d}{}{:02d}", static_cast<int>(ymd.year()), st.date_sep,
                         static_cast<unsigned>(ymd.month()), st.date_sep,
                         static_cast<unsigned>(ymd.day()));
    }
    case TimeFormat::datetime: {
      const std::int64_t local = key + static_cast<std::int64_t>(st.offset_minutes) * 60;
      const auto ymd = civil_of(local);
      const std::int64_t secs = local - floor_div(local, kDay) * kDay;
      std::string out =
          fmt::format("{:04d}{}{:02d}{}{:02d}{}{:02d}:{:02d}", static_cast<int>(ymd.year()),
                      st.date_sep, static_cast<unsigned>(ymd.month()), st.date_sep,
                      static_cast<unsigned>(ymd.day()), st.time_sep, secs / 3600, (secs / 60) % 60);
      if (st.seconds) out += fmt::format(":{:02d}", secs % 60);
      return out + offset_like(st);
    }
  }
  return {};
}

// The most frequent value (the smallest on ties).
std::int64_t mode_of(const std::vector<std::int64_t>& v) {
  std::map<std::int64_t, int> count;
  for (auto x : v) ++count[x];
  std::int64_t best = v.front();
  int best_count = 0;
  for (const auto& [x, c] : count)
    if (c > best_count) {
      best = x;
      best_count = c;
    }
  return best;
}

std::string sample_of(const std::vector<std::string>& time) {
  std::string out;
  for (size_t i = 0; i < std::min<size_t>(time.size(), 3); ++i)
    out += (i ? ", " : "") + fmt::format("'{}'", time[i]);
  if (time.size() > 3) out += ", ...";
  return out;
}

// Month-based stamps: every stamp at the same time of day, on the same day of the month (or
// every one a month end), at least a month apart. 0: not month-based, 1: same day, 2: month ends.
int month_aligned(const std::vector<TimeStamp>& stamps) {
  if (stamps.size() < 2) return 0;
  const auto d0 = civil_of(stamps[0].key).day();
  bool same_day = true, month_end = true;
  const std::int64_t tod = stamps[0].key - floor_div(stamps[0].key, kDay) * kDay;
  for (size_t i = 0; i < stamps.size(); ++i) {
    const auto k = stamps[i].key;
    if (k - floor_div(k, kDay) * kDay != tod) return 0;
    const auto ymd = civil_of(k);
    same_day = same_day && ymd.day() == d0;
    const date::year_month_day_last last{ymd.year(), date::month_day_last{ymd.month()}};
    month_end = month_end && ymd.day() == last.day();
    if (i > 0 && month_index(k) <= month_index(stamps[i - 1].key)) return 0;
  }
  return same_day ? 1 : month_end ? 2 : 0;
}

}  // namespace

std::string_view to_string(TimeFormat f) {
  switch (f) {
    case TimeFormat::integer:
      return "integer";
    case TimeFormat::date:
      return "date";
    case TimeFormat::datetime:
      return "date-time";
    case TimeFormat::month:
      return "month";
    case TimeFormat::quarter:
      return "quarter";
    case TimeFormat::week:
      return "ISO week";
    case TimeFormat::year:
      return "year";
    case TimeFormat::custom:
      return "custom";
  }
  return "?";
}

std::string_view to_string(Frequency f) {
  switch (f) {
    case Frequency::none:
      return "none";
    case Frequency::hourly:
      return "hourly";
    case Frequency::daily:
      return "daily";
    case Frequency::weekly:
      return "weekly";
    case Frequency::monthly:
      return "monthly";
    case Frequency::quarterly:
      return "quarterly";
    case Frequency::annual:
      return "annual";
    case Frequency::other:
      return "other";
  }
  return "?";
}

int default_seasonal_period(Frequency f) {
  switch (f) {
    case Frequency::hourly:
      return 24;
    case Frequency::daily:
      return 7;
    case Frequency::weekly:
      return 52;
    case Frequency::monthly:
      return 12;
    case Frequency::quarterly:
      return 4;
    default:
      return 0;
  }
}

std::string TimeAnalysis::label() const {
  if (frequency != Frequency::other) return std::string(to_string(frequency));
  if (month_based) return fmt::format("every {} months", step);
  if (step % kDay == 0) return fmt::format("every {} days", step / kDay);
  return fmt::format("every {} seconds", step);
}

std::optional<TimeStamp> parse_time_stamp(std::string_view text, const std::string& custom_format) {
  if (text.empty()) return std::nullopt;
  if (!custom_format.empty()) return parse_custom(text, custom_format);
  return parse_auto(text);
}

TimeAnalysis analyse_time(const std::vector<std::string>& time, const std::string& custom_format,
                          const std::string& column, const std::vector<std::string>& where_rows,
                          const std::string& source) {
  TimeAnalysis a;
  const int n = static_cast<int>(time.size());
  if (n == 0 || time.front().empty()) {
    a.period.resize(n);
    for (int r = 0; r < n; ++r) a.period[r] = r;
    return a;
  }
  auto where = [&](int r) {
    if (r < static_cast<int>(where_rows.size())) return where_rows[r];
    return fmt::format("{}row {}", source.empty() ? "" : source + ": ", r + 1);
  };
  std::vector<TimeStamp> stamps;
  stamps.reserve(n);
  for (int r = 0; r < n; ++r) {
    if (time[r].empty())
      throw InputError(
          fmt::format("{}: time column '{}' is empty on this row; every row needs a "
                      "time stamp",
                      where(r), column));
    auto ts = parse_time_stamp(time[r], custom_format);
    if (!ts) {
      if (!custom_format.empty())
        throw InputError(fmt::format(
            "{}: time column '{}': '{}' does not match data.time_format '{}' (the column begins "
            "{}); correct the stamp or the format (e.g. '%d/%m/%Y' for 31/01/2024)",
            where(r), column, time[r], custom_format, sample_of(time)));
      throw InputError(fmt::format(
          "{}: time column '{}': '{}' is not a time stamp (the column begins {}); lagsieve reads "
          "2024-03-01, 2024-03-01T06:30[:00][Z|+01:00], 2024-03, 2024-Q1, 2024Q1, 2024-W09, "
          "2024 and integers; for anything else set data.time_format (e.g. '%d/%m/%Y')",
          where(r), column, time[r], sample_of(time)));
    }
    stamps.push_back(*ts);
  }
  // A column of 4-digit integers is a column of years.
  if (stamps.front().format == TimeFormat::integer &&
      std::all_of(time.begin(), time.end(),
                  [](const std::string& s) { return s.size() == 4 && all_digits(s); })) {
    for (auto& s : stamps) {
      s.format = TimeFormat::year;
      s.key = *day_key(static_cast<int>(s.key), 1, 1);
    }
  }
  a.format = stamps.front().format;
  for (int r = 1; r < n; ++r) {
    const auto& prev = stamps[r - 1];
    const auto& cur = stamps[r];
    if (cur.format != prev.format) {
      // The same period written twice in two forms (2024-01 and 2024-01-15) says more than
      // "mixed formats".
      const bool coarse = prev.format == TimeFormat::month || cur.format == TimeFormat::month;
      if (coarse && month_index(prev.key) == month_index(cur.key))
        throw InputError(fmt::format(
            "{}: time column '{}': '{}' falls in the same month as '{}' on {}; each period may "
            "appear once, so remove one row or write every stamp in one form",
            where(r), column, time[r], time[r - 1], where(r - 1)));
      throw InputError(fmt::format(
          "{}: time column '{}': '{}' is a {} stamp but '{}' on {} is a {} stamp; write every "
          "stamp in one form",
          where(r), column, time[r], to_string(cur.format), time[r - 1], where(r - 1),
          to_string(prev.format)));
    }
    if (cur.key == prev.key)
      throw InputError(fmt::format(
          "{}: time column '{}': time stamp {} repeats the one on {}{}; "
          "each time stamp may appear once",
          where(r), column, time[r], where(r - 1),
          cur.offset_minutes && prev.offset_minutes && *cur.offset_minutes != *prev.offset_minutes
              ? " (the same instant in another offset)"
              : ""));
    if (cur.key < prev.key)
      throw InputError(
          fmt::format("{}: time column '{}': time stamp {} comes before {} on {}; "
                      "sort the rows by time",
                      where(r), column, time[r], time[r - 1], where(r - 1)));
    if (cur.offset_minutes && prev.offset_minutes && *cur.offset_minutes != *prev.offset_minutes)
      a.offset_changes.push_back({r, *prev.offset_minutes, *cur.offset_minutes});
  }
  a.period.assign(n, 0);
  if (n < 2) {
    a.frequency = Frequency::none;
    return a;
  }

  std::vector<std::int64_t> raw(n);  // month index, or the key
  const int aligned = a.format == TimeFormat::date || a.format == TimeFormat::datetime ||
                              a.format == TimeFormat::custom
                          ? month_aligned(stamps)
                          : 0;
  a.month_end = aligned == 2;
  a.month_based = a.format == TimeFormat::month || a.format == TimeFormat::quarter ||
                  a.format == TimeFormat::year || aligned > 0;
  for (int r = 0; r < n; ++r) raw[r] = a.month_based ? month_index(stamps[r].key) : stamps[r].key;
  std::vector<std::int64_t> steps(n - 1);
  for (int r = 1; r < n; ++r) steps[r - 1] = raw[r] - raw[r - 1];
  a.step = mode_of(steps);
  if (a.format == TimeFormat::quarter) a.step = std::max<std::int64_t>(3, a.step);
  if (a.format == TimeFormat::year) a.step = std::max<std::int64_t>(12, a.step);
  for (int r = 1; r < n; ++r) {
    const auto d = steps[r - 1];
    if (d % a.step == 0 && (a.format != TimeFormat::integer || d == a.step)) continue;
    if (a.format == TimeFormat::integer)
      throw InputError(fmt::format(
          "{}: time column '{}': the integer index steps from {} to {} where most steps are {}; "
          "an irregular integer index carries no calendar, so a missing row cannot be told "
          "apart; number the rows evenly or use dates",
          where(r), column, time[r - 1], time[r], a.step));
    throw InputError(fmt::format(
        "{}: time column '{}': the step from {} to {} is not a whole number of the usual step "
        "({}), so the frequency cannot be inferred and missing periods cannot be placed; make "
        "the stamps regular (one per period) or use an integer index",
        where(r), column, time[r - 1], time[r],
        a.month_based ? fmt::format("{} months", a.step) : fmt::format("{} seconds", a.step)));
  }
  if (a.format == TimeFormat::integer) {
    for (int r = 0; r < n; ++r) a.period[r] = (raw[r] - raw[0]) / a.step;
    a.frequency = Frequency::none;
    return a;
  }
  for (int r = 0; r < n; ++r) a.period[r] = (raw[r] - raw[0]) / a.step;
  for (int r = 1; r < n; ++r)
    if (const auto d = a.period[r] - a.period[r - 1]; d > 1)
      a.gaps.push_back({r, static_cast<int>(d - 1)});
  if (a.month_based) {
    a.frequency = a.step == 1    ? Frequency::monthly
                  : a.step == 3  ? Frequency::quarterly
                  : a.step == 12 ? Frequency::annual
                                 : Frequency::other;
  } else {
    a.frequency = a.step == 3600    ? Frequency::hourly
                  : a.step == kDay  ? Frequency::daily
                  : a.step == kWeek ? Frequency::weekly
                                    : Frequency::other;
  }
  return a;
}

std::string stamp_of_period(const TimeAnalysis& a, std::int64_t period, const std::string& like,
                            const std::string& custom_format) {
  // `like` belongs to the column: its period number anchors the arithmetic.
  auto parsed = parse_time_stamp(like, custom_format);
  if (!parsed) return {};
  TimeFormat format = parsed->format;
  std::int64_t key = parsed->key;
  if (a.format == TimeFormat::year) {
    format = TimeFormat::year;
    key = *day_key(static_cast<int>(parsed->key), 1, 1);
    if (like.size() != 4) return {};
  }
  const Style st = style_of(like);
  if (format == TimeFormat::integer) {
    // Integer columns: the index continues by its step from `like`, whose period is unknown
    // here; callers pass the last stamp and a period relative to it.
    return std::to_string(key + period * a.step);
  }
  if (a.month_based) {
    const auto ymd = civil_of(key);
    const std::int64_t tod = key - floor_div(key, kDay) * kDay;
    const std::int64_t total = month_index(key) + period * a.step;
    const date::year y{static_cast<int>(floor_div(total, 12))};
    const date::month m{static_cast<unsigned>(total - floor_div(total, 12) * 12 + 1)};
    const date::year_month_day last{date::year_month_day_last{y, date::month_day_last{m}}};
    // Month ends stay month ends; another day is kept (clamped to a shorter month).
    const date::year_month_day target =
        a.month_end || ymd.day() > last.day() ? last : date::year_month_day{y, m, ymd.day()};
    const std::int64_t out =
        static_cast<std::int64_t>(date::sys_days{target}.time_since_epoch().count()) * kDay + tod;
    return write_stamp(format, out, st, custom_format);
  }
  return write_stamp(format, key + period * a.step, st, custom_format);
}

std::string infer_frequency(const std::vector<std::string>& time, const std::string& custom) {
  if (time.empty() || time.front().empty()) return "none";
  try {
    return analyse_time(time, custom, "time").label();
  } catch (const InputError&) {
    return "irregular";
  }
}

std::vector<std::string> next_time_stamps(const std::vector<std::string>& time, int k,
                                          const std::string& custom) {
  std::vector<std::string> out;
  if (k <= 0) return out;
  if (time.empty() || time.front().empty()) return std::vector<std::string>(k, "");
  TimeAnalysis a;
  try {
    a = analyse_time(time, custom, "time");
  } catch (const InputError&) {
    return std::vector<std::string>(k, "");
  }
  if (time.size() < 2) {
    // One stamp: no step to continue except for the forms that carry their period.
    a.month_based = a.format == TimeFormat::month || a.format == TimeFormat::quarter ||
                    a.format == TimeFormat::year;
    a.step = a.format == TimeFormat::month     ? 1
             : a.format == TimeFormat::quarter ? 3
             : a.format == TimeFormat::year    ? 12
             : a.format == TimeFormat::week    ? kWeek
             : a.format == TimeFormat::integer ? 1
                                               : kDay;
  }
  const std::string& like = time.back();
  out.reserve(k);
  for (int i = 1; i <= k; ++i) out.push_back(stamp_of_period(a, i, like, custom));
  return out;
}

}  // namespace lagsieve
