#include "data/time_index.h"

#include <fmt/format.h>

#include <charconv>

namespace lagsieve {
namespace {

constexpr std::int64_t kDay = 86400;

// Days since 1970-01-01 of a proleptic Gregorian date (H. Hinnant's civil-date algorithm).
std::int64_t days_from_civil(std::int64_t y, unsigned m, unsigned d) {
  y -= m <= 2 ? 1 : 0;
  const std::int64_t era = (y >= 0 ? y : y - 399) / 400;
  const auto yoe = static_cast<unsigned>(y - era * 400);
  const unsigned doy = (153 * (m > 2 ? m - 3 : m + 9) + 2) / 5 + d - 1;
  const unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
  return era * 146097 + static_cast<std::int64_t>(doe) - 719468;
}

struct Civil {
  std::int64_t y;
  unsigned m;
  unsigned d;
};

Civil civil_from_days(std::int64_t z) {
  z += 719468;
  const std::int64_t era = (z >= 0 ? z : z - 146096) / 146097;
  const auto doe = static_cast<unsigned>(z - era * 146097);
  const unsigned yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
  const std::int64_t y = static_cast<std::int64_t>(yoe) + era * 400;
  const unsigned doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
  const unsigned mp = (5 * doy + 2) / 153;
  const unsigned d = doy - (153 * mp + 2) / 5 + 1;
  const unsigned m = mp < 10 ? mp + 3 : mp - 9;
  return {y + (m <= 2 ? 1 : 0), m, d};
}

bool leap(std::int64_t y) { return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0; }

unsigned month_length(std::int64_t y, unsigned m) {
  static constexpr unsigned kLen[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  return m == 2 && leap(y) ? 29 : kLen[m - 1];
}

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

// How a stamp is written, so continued stamps look like the data.
struct Layout {
  TimeFormat format = TimeFormat::integer;
  char separator = ' ';
  bool seconds = false;
};

Layout layout_of(std::string_view s) {
  Layout l;
  if (s.size() >= 10 && s[4] == '-') {
    l.format = s.size() > 10 ? TimeFormat::datetime : TimeFormat::date;
    if (s.size() > 10) l.separator = s[10];
    l.seconds = s.size() >= 19;
  }
  return l;
}

std::string format_stamp(std::int64_t key, const Layout& l) {
  if (l.format == TimeFormat::integer) return std::to_string(key);
  const std::int64_t days = key >= 0 ? key / kDay : -((-key + kDay - 1) / kDay);
  const std::int64_t secs = key - days * kDay;
  const Civil c = civil_from_days(days);
  if (l.format == TimeFormat::date) return fmt::format("{:04d}-{:02d}-{:02d}", c.y, c.m, c.d);
  const auto hh = secs / 3600, mm = (secs / 60) % 60, ss = secs % 60;
  if (l.seconds)
    return fmt::format("{:04d}-{:02d}-{:02d}{}{:02d}:{:02d}:{:02d}", c.y, c.m, c.d, l.separator,
                       hh, mm, ss);
  return fmt::format("{:04d}-{:02d}-{:02d}{}{:02d}:{:02d}", c.y, c.m, c.d, l.separator, hh, mm);
}

// Calendar steps in months between consecutive stamps, when every stamp is a date on the same
// day of the month (or every stamp is a month end); 0 otherwise.
int month_step(const std::vector<TimeStamp>& stamps) {
  if (stamps.size() < 2) return 0;
  int step = 0;
  bool same_day = true, month_end = true;
  for (size_t i = 0; i < stamps.size(); ++i) {
    if (stamps[i].key % kDay != 0) return 0;
    const Civil c = civil_from_days(stamps[i].key / kDay);
    const Civil c0 = civil_from_days(stamps[0].key / kDay);
    same_day = same_day && c.d == c0.d;
    month_end = month_end && c.d == month_length(c.y, c.m);
    if (i == 0) continue;
    const Civil p = civil_from_days(stamps[i - 1].key / kDay);
    const auto months = (c.y - p.y) * 12 + (static_cast<std::int64_t>(c.m) - p.m);
    if (months <= 0 || (step != 0 && months != step)) return 0;
    step = static_cast<int>(months);
  }
  return same_day || month_end ? step : 0;
}

std::vector<TimeStamp> parse_all(const std::vector<std::string>& time) {
  std::vector<TimeStamp> out;
  out.reserve(time.size());
  for (const auto& t : time) {
    auto s = parse_time_stamp(t);
    if (!s) return {};
    out.push_back(*s);
  }
  return out;
}

// The common step when all steps are equal, else 0.
std::int64_t fixed_step(const std::vector<TimeStamp>& stamps) {
  if (stamps.size() < 2) return 0;
  const std::int64_t step = stamps[1].key - stamps[0].key;
  for (size_t i = 2; i < stamps.size(); ++i)
    if (stamps[i].key - stamps[i - 1].key != step) return 0;
  return step;
}

}  // namespace

std::optional<TimeStamp> parse_time_stamp(std::string_view s) {
  if (s.empty()) return std::nullopt;
  if (s.size() >= 10 && s[4] == '-' && s[7] == '-') {
    int y = 0, m = 0, d = 0;
    if (!digits(s, 0, 4, y) || !digits(s, 5, 2, m) || !digits(s, 8, 2, d)) return std::nullopt;
    if (m < 1 || m > 12 || d < 1 || d > static_cast<int>(month_length(y, static_cast<unsigned>(m))))
      return std::nullopt;
    TimeStamp ts;
    ts.format = TimeFormat::date;
    ts.key = days_from_civil(y, static_cast<unsigned>(m), static_cast<unsigned>(d)) * kDay;
    if (s.size() == 10) return ts;
    int hh = 0, mm = 0, ss = 0;
    if (s.size() != 16 && s.size() != 19) return std::nullopt;
    if ((s[10] != ' ' && s[10] != 'T') || s[13] != ':') return std::nullopt;
    if (!digits(s, 11, 2, hh) || !digits(s, 14, 2, mm)) return std::nullopt;
    if (s.size() == 19 && (s[16] != ':' || !digits(s, 17, 2, ss))) return std::nullopt;
    if (hh > 23 || mm > 59 || ss > 59) return std::nullopt;
    ts.format = TimeFormat::datetime;
    ts.key += hh * 3600 + mm * 60 + ss;
    return ts;
  }
  std::int64_t v = 0;
  const char* begin = s.data();
  const char* end = s.data() + s.size();
  if (*begin == '+') ++begin;
  const auto [p, ec] = std::from_chars(begin, end, v);
  if (ec != std::errc() || p != end || begin == end) return std::nullopt;
  return TimeStamp{TimeFormat::integer, v};
}

std::string infer_frequency(const std::vector<std::string>& time) {
  if (time.empty() || time.front().empty()) return "integer";
  const auto stamps = parse_all(time);
  if (stamps.empty()) return "irregular";
  if (stamps.front().format == TimeFormat::integer)
    return stamps.size() < 2 || fixed_step(stamps) > 0 ? "integer" : "irregular";
  const std::int64_t step = fixed_step(stamps);
  if (step == kDay) return "daily";
  if (step == 7 * kDay) return "weekly";
  if (step == 3600) return "hourly";
  switch (month_step(stamps)) {
    case 1: return "monthly";
    case 3: return "quarterly";
    case 12: return "yearly";
    default: break;
  }
  if (step > 0) return fmt::format("every {} seconds", step);
  return "irregular";
}

std::vector<std::string> next_time_stamps(const std::vector<std::string>& time, int k) {
  std::vector<std::string> out;
  if (k <= 0) return out;
  out.reserve(static_cast<size_t>(k));
  if (time.empty() || time.front().empty()) return std::vector<std::string>(k, "");
  const auto stamps = parse_all(time);
  if (stamps.empty()) return std::vector<std::string>(k, "");
  const Layout layout = layout_of(time.back());
  const std::int64_t last = stamps.back().key;
  if (const int months = layout.format == TimeFormat::integer ? 0 : month_step(stamps)) {
    const Civil c = civil_from_days(last / kDay);
    const bool month_end = c.d == month_length(c.y, c.m) && month_length(c.y, c.m) < 31;
    const Civil first = civil_from_days(stamps.front().key / kDay);
    const unsigned want_day = month_end && first.d != c.d ? 31 : c.d;
    for (int i = 1; i <= k; ++i) {
      const std::int64_t total = c.y * 12 + (c.m - 1) + static_cast<std::int64_t>(i) * months;
      const std::int64_t y = total / 12;
      const auto m = static_cast<unsigned>(total % 12 + 1);
      const unsigned d = std::min(want_day, month_length(y, m));
      out.push_back(format_stamp(days_from_civil(y, m, d) * kDay, layout));
    }
    return out;
  }
  std::int64_t step = stamps.size() >= 2 ? stamps.back().key - stamps[stamps.size() - 2].key : 1;
  if (const auto fixed = fixed_step(stamps); fixed > 0) step = fixed;
  if (step <= 0) step = layout.format == TimeFormat::integer ? 1 : kDay;
  for (int i = 1; i <= k; ++i) out.push_back(format_stamp(last + i * step, layout));
  return out;
}

}  // namespace lagsieve
