#include "report/svg.h"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <iterator>
#include <limits>

namespace lagsieve {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::array<std::string_view, 8> kPalette = {"#0072B2", "#D55E00", "#009E73", "#E69F00",
                                                      "#CC79A7", "#56B4E9", "#F0E442", "#000000"};
constexpr std::string_view kFont =
    "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif";
constexpr std::string_view kMuted = "#555555";
constexpr std::string_view kGrid = "#e3e3e3";
constexpr std::string_view kAxis = "#333333";
constexpr double kCharWidth = 6.6;  // average glyph width at 12 px, for layout estimates
constexpr double kTitleCharWidth = 9.0;

// Pixel coordinates: two decimals are far below what a screen or printer resolves.
std::string px(double v) { return fmt::format("{:.2f}", v); }

std::string join_exact(const std::vector<double>& v) {
  std::string s;
  for (size_t i = 0; i < v.size(); ++i) {
    if (i) s += ' ';
    s += format_exact(v[i]);
  }
  return s;
}

std::string_view dash_array(LineStyle style) {
  switch (style) {
    case LineStyle::dashed:
      return "7 4";
    case LineStyle::dotted:
      return "2 3";
    case LineStyle::solid:
      break;
  }
  return "";
}

// Linear map from data to pixels.
struct Scale {
  double d0 = 0.0, d1 = 1.0, p0 = 0.0, p1 = 1.0;
  double operator()(double v) const { return p0 + (v - d0) * (p1 - p0) / (d1 - d0); }
};

struct Range {
  double lo = std::numeric_limits<double>::infinity();
  double hi = -std::numeric_limits<double>::infinity();
  void add(double v) {
    if (!std::isfinite(v)) return;
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
  void add(const std::vector<double>& v) {
    for (double x : v) add(x);
  }
  bool empty() const { return lo > hi; }
};

// Tick label text: as many decimals as the step needs, never "-0".
enum class TickFormat { plain, percent };
std::string tick_label(double v, double step, TickFormat format) {
  if (format == TickFormat::percent) {
    v *= 100.0;
    step *= 100.0;
  }
  if (std::fabs(v) < step * 1e-9) v = 0.0;
  std::string s;
  const double mag = std::max(std::fabs(v), step);
  if (mag >= 1e7 || step < 1e-6) {
    s = fmt::format("{:.3g}", v);
  } else {
    const int decimals = std::max(0, static_cast<int>(-std::floor(std::log10(step) + 1e-9)));
    s = fmt::format("{:.{}f}", v, decimals);
  }
  if (format == TickFormat::percent) s += '%';
  return s;
}

std::vector<std::string> wrap_words(const std::string& text, size_t max_chars, size_t max_lines) {
  std::vector<std::string> lines;
  std::string line;
  size_t pos = 0;
  while (pos < text.size()) {
    size_t end = text.find(' ', pos);
    if (end == std::string::npos) end = text.size();
    const std::string word = text.substr(pos, end - pos);
    pos = end + 1;
    if (word.empty()) continue;
    if (!line.empty() && line.size() + 1 + word.size() > max_chars) {
      lines.push_back(line);
      line.clear();
    }
    line += (line.empty() ? "" : " ") + word;
  }
  if (!line.empty()) lines.push_back(line);
  if (lines.size() > max_lines) {
    lines.resize(max_lines);
    lines.back() += " ...";
  }
  return lines;
}

enum class SwatchKind { line, fill, outline, bar, point };
struct LegendEntry {
  std::string name;
  std::string colour;
  SwatchKind kind = SwatchKind::line;
  LineStyle style = LineStyle::solid;
  double opacity = 1.0;
};

// Title, subtitle, legend, grid, axes and axis titles around a plot box; charts add their marks
// between begin() and end().
class Canvas {
 public:
  Canvas(const ChartFrame& frame, std::vector<LegendEntry> legend) : frame_(frame) {
    width_ = std::max(frame.width, 240);
    height_ = std::max(frame.height, 180);
    title_lines_ = wrap_words(frame.title, static_cast<size_t>((width_ - 24) / kTitleCharWidth), 2);
    subtitle_lines_ =
        wrap_words(frame.subtitle, static_cast<size_t>((width_ - 24) / kCharWidth), 2);
    legend_ = std::move(legend);
  }

  // Lays out the plot box once the y tick labels are known (their width sets the left margin).
  void layout(const std::vector<std::string>& y_labels) {
    size_t longest = 1;
    for (const auto& l : y_labels) longest = std::max(longest, l.size());
    left_ = 12.0 + (frame_.y_title.empty() ? 0.0 : 20.0) + 8.0 +
            kCharWidth * static_cast<double>(longest);
    right_ = width_ - 18.0;
    double y = 10.0;
    y += 20.0 * static_cast<double>(title_lines_.size());
    y += 16.0 * static_cast<double>(subtitle_lines_.size());
    legend_top_ = y + 6.0;
    y = legend_top_ + 18.0 * legend_rows();
    top_ = y + 10.0;
    bottom_ = height_ - (frame_.x_title.empty() ? 30.0 : 48.0);
  }

  double left() const { return left_; }
  double right() const { return right_; }
  double top() const { return top_; }
  double bottom() const { return bottom_; }

  void begin(std::string& out, std::string_view kind) const {
    fmt::format_to(
        std::back_inserter(out),
        "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart chart-{}\" width=\"{}\" "
        "height=\"{}\" viewBox=\"0 0 {} {}\" role=\"img\" font-family=\"{}\" "
        "font-size=\"12\">\n",
        kind, width_, height_, width_, height_, kFont);
    fmt::format_to(std::back_inserter(out), "<title>{}</title>\n", escape_markup(frame_.title));
    if (!frame_.subtitle.empty())
      fmt::format_to(std::back_inserter(out), "<desc>{}</desc>\n", escape_markup(frame_.subtitle));
    fmt::format_to(std::back_inserter(out),
                   "<rect class=\"background\" x=\"0\" y=\"0\" width=\"{}\" height=\"{}\" "
                   "fill=\"#ffffff\"/>\n",
                   width_, height_);
    double y = 10.0;
    for (const auto& line : title_lines_) {
      y += 20.0;
      fmt::format_to(std::back_inserter(out),
                     "<text class=\"chart-title\" x=\"12\" y=\"{}\" font-size=\"15\" "
                     "font-weight=\"600\" fill=\"#1a1a1a\">{}</text>\n",
                     px(y - 4.0), escape_markup(line));
    }
    for (const auto& line : subtitle_lines_) {
      y += 16.0;
      fmt::format_to(std::back_inserter(out),
                     "<text class=\"chart-subtitle\" x=\"12\" y=\"{}\" fill=\"{}\">{}</text>\n",
                     px(y - 3.0), kMuted, escape_markup(line));
    }
    draw_legend(out);
  }

  void grid_and_axes(std::string& out, const std::vector<double>& x_at,
                     const std::vector<std::string>& x_labels, const std::vector<double>& y_at,
                     const std::vector<std::string>& y_labels, const Scale& xs,
                     const Scale& ys) const {
    out += "<g class=\"grid\" stroke=\"";
    out += kGrid;
    out += "\" stroke-width=\"1\">\n";
    for (double v : y_at)
      fmt::format_to(std::back_inserter(out), "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\"/>\n",
                     px(left_), px(ys(v)), px(right_), px(ys(v)));
    out += "</g>\n<g class=\"axes\" fill=\"";
    out += kAxis;
    out += "\">\n";
    fmt::format_to(std::back_inserter(out),
                   "<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\" stroke=\"{3}\"/>\n"
                   "<line x1=\"{0}\" y1=\"{4}\" x2=\"{0}\" y2=\"{1}\" stroke=\"{3}\"/>\n",
                   px(left_), px(bottom_), px(right_), kAxis, px(top_));
    for (size_t i = 0; i < y_at.size(); ++i)
      fmt::format_to(std::back_inserter(out),
                     "<text x=\"{}\" y=\"{}\" text-anchor=\"end\">{}</text>\n", px(left_ - 6.0),
                     px(ys(y_at[i]) + 4.0), escape_markup(y_labels[i]));
    for (size_t i = 0; i < x_at.size(); ++i) {
      const double x = xs(x_at[i]);
      // A label centred on a tick near an edge would be cut: align it to end there instead.
      const double half = 0.5 * kCharWidth * static_cast<double>(x_labels[i].size());
      const char* anchor = x + half > width_ - 2.0 ? "end" : x - half < 2.0 ? "start" : "middle";
      fmt::format_to(std::back_inserter(out),
                     "<line x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\" stroke=\"{3}\"/>\n"
                     "<text x=\"{0}\" y=\"{4}\" text-anchor=\"{6}\">{5}</text>\n",
                     px(x), px(bottom_), px(bottom_ + 4.0), kAxis, px(bottom_ + 17.0),
                     escape_markup(x_labels[i]), anchor);
    }
    if (!frame_.x_title.empty())
      fmt::format_to(std::back_inserter(out),
                     "<text class=\"axis-title\" x=\"{}\" y=\"{}\" text-anchor=\"middle\" "
                     "fill=\"{}\">{}</text>\n",
                     px(0.5 * (left_ + right_)), px(bottom_ + 38.0), kMuted,
                     escape_markup(frame_.x_title));
    if (!frame_.y_title.empty()) {
      const double cx = 16.0;
      const double cy = 0.5 * (top_ + bottom_);
      fmt::format_to(std::back_inserter(out),
                     "<text class=\"axis-title\" x=\"{0}\" y=\"{1}\" text-anchor=\"middle\" "
                     "fill=\"{2}\" transform=\"rotate(-90 {0} {1})\">{3}</text>\n",
                     px(cx), px(cy), kMuted, escape_markup(frame_.y_title));
    }
    out += "</g>\n";
  }

  void no_data(std::string& out) const {
    fmt::format_to(std::back_inserter(out),
                   "<text class=\"no-data\" x=\"{}\" y=\"{}\" text-anchor=\"middle\" fill=\"{}\">"
                   "No data to plot</text>\n",
                   px(0.5 * (left_ + right_)), px(0.5 * (top_ + bottom_)), kMuted);
  }

  static void end(std::string& out) { out += "</svg>\n"; }

 private:
  double entry_width(const LegendEntry& e) const {
    return 24.0 + kCharWidth * static_cast<double>(e.name.size()) + 16.0;
  }

  int legend_rows() const {
    if (legend_.empty()) return 0;
    int rows = 1;
    double x = 12.0;
    for (const auto& e : legend_) {
      const double w = entry_width(e);
      if (x + w > width_ - 12.0 && x > 12.0) {
        ++rows;
        x = 12.0;
      }
      x += w;
    }
    return rows;
  }

  void draw_legend(std::string& out) const {
    if (legend_.empty()) return;
    out += "<g class=\"legend\">\n";
    double x = 12.0;
    double y = legend_top_ + 9.0;
    for (const auto& e : legend_) {
      const double w = entry_width(e);
      if (x + w > width_ - 12.0 && x > 12.0) {
        x = 12.0;
        y += 18.0;
      }
      switch (e.kind) {
        case SwatchKind::line: {
          const auto dash = dash_array(e.style);
          fmt::format_to(std::back_inserter(out),
                         "<line x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"{}\" "
                         "stroke-width=\"2.5\"{}/>\n",
                         px(x), px(y), px(x + 18.0), px(y), e.colour,
                         dash.empty() ? "" : fmt::format(" stroke-dasharray=\"{}\"", dash));
          break;
        }
        case SwatchKind::fill:
        case SwatchKind::bar:
          fmt::format_to(std::back_inserter(out),
                         "<rect x=\"{}\" y=\"{}\" width=\"18\" height=\"10\" fill=\"{}\" "
                         "fill-opacity=\"{}\"/>\n",
                         px(x), px(y - 5.0), e.colour, px(e.opacity));
          break;
        case SwatchKind::outline:
          fmt::format_to(std::back_inserter(out),
                         "<rect x=\"{}\" y=\"{}\" width=\"18\" height=\"10\" fill=\"none\" "
                         "stroke=\"{}\" stroke-width=\"2\"/>\n",
                         px(x), px(y - 5.0), e.colour);
          break;
        case SwatchKind::point:
          fmt::format_to(std::back_inserter(out),
                         "<circle cx=\"{}\" cy=\"{}\" r=\"4\" fill=\"{}\"/>\n", px(x + 9.0), px(y),
                         e.colour);
          break;
      }
      fmt::format_to(std::back_inserter(out), "<text x=\"{}\" y=\"{}\">{}</text>\n", px(x + 24.0),
                     px(y + 4.0), escape_markup(e.name));
      x += w;
    }
    out += "</g>\n";
  }

  ChartFrame frame_;
  int width_ = 720;
  int height_ = 380;
  std::vector<std::string> title_lines_;
  std::vector<std::string> subtitle_lines_;
  std::vector<LegendEntry> legend_;
  double left_ = 60.0, right_ = 700.0, top_ = 60.0, bottom_ = 330.0, legend_top_ = 40.0;
};

std::vector<std::string> tick_labels(const std::vector<double>& ticks, TickFormat format) {
  const double step = ticks.size() > 1 ? ticks[1] - ticks[0] : 1.0;
  std::vector<std::string> labels;
  for (double t : ticks) labels.push_back(tick_label(t, step, format));
  return labels;
}

// "M x y L x y ..." over finite points, starting a new subpath after each gap.
std::string polyline_path(const std::vector<double>& x, const std::vector<double>& y,
                          const Scale& xs, const Scale& ys) {
  std::string d;
  bool pen_down = false;
  const size_t n = std::min(x.size(), y.size());
  for (size_t i = 0; i < n; ++i) {
    if (!std::isfinite(x[i]) || !std::isfinite(y[i])) {
      pen_down = false;
      continue;
    }
    fmt::format_to(std::back_inserter(d), "{}{} {} ", pen_down ? "L" : "M", px(xs(x[i])),
                   px(ys(y[i])));
    pen_down = true;
  }
  if (!d.empty()) d.pop_back();
  return d;
}

// Closed polygons (upper edge forward, lower edge back) over each run of finite points.
std::string band_path(const Band& b, const Scale& xs, const Scale& ys, bool closed) {
  std::string d;
  const size_t n = std::min({b.x.size(), b.lower.size(), b.upper.size()});
  size_t i = 0;
  while (i < n) {
    const auto ok = [&](size_t k) {
      return std::isfinite(b.x[k]) && std::isfinite(b.lower[k]) && std::isfinite(b.upper[k]);
    };
    if (!ok(i)) {
      ++i;
      continue;
    }
    size_t j = i;
    while (j < n && ok(j)) ++j;
    if (b.stepped) {  // each point covers [x - 1/2, x + 1/2]
      const auto edge = [&](size_t k, double side) { return px(xs(b.x[k] + side)); };
      for (size_t k = i; k < j; ++k)
        fmt::format_to(std::back_inserter(d), "{}{} {} L{} {} ", k == i ? "M" : "L", edge(k, -0.5),
                       px(ys(b.upper[k])), edge(k, 0.5), px(ys(b.upper[k])));
      for (size_t k = j; k-- > i;)
        fmt::format_to(std::back_inserter(d), "{}{} {} L{} {} ",
                       (k == j - 1 && !closed) ? "M" : "L", edge(k, 0.5), px(ys(b.lower[k])),
                       edge(k, -0.5), px(ys(b.lower[k])));
      if (closed) d += "Z ";
      i = j;
      continue;
    }
    for (size_t k = i; k < j; ++k)
      fmt::format_to(std::back_inserter(d), "{}{} {} ", k == i ? "M" : "L", px(xs(b.x[k])),
                     px(ys(b.upper[k])));
    for (size_t k = j; k-- > i;)
      fmt::format_to(std::back_inserter(d), "{}{} {} ", (k == j - 1 && !closed) ? "M" : "L",
                     px(xs(b.x[k])), px(ys(b.lower[k])));
    if (closed) d += "Z ";
    i = j;
  }
  if (!d.empty()) d.pop_back();
  return d;
}

std::string series_colour(const LineSeries& s, size_t position) {
  if (s.ink) return std::string(kInkColour);
  return std::string(palette_colour(s.colour >= 0 ? s.colour : static_cast<int>(position)));
}

// x ticks strictly inside the data range (lines then start at the axis, not at a padded tick).
std::vector<double> inner_ticks(double lo, double hi, int target) {
  std::vector<double> ticks;
  for (double t : nice_ticks(lo, hi, target))
    if (t >= lo - 1e-9 * (hi - lo) && t <= hi + 1e-9 * (hi - lo)) ticks.push_back(t);
  return ticks;
}

}  // namespace

std::string_view palette_colour(int index) {
  const int n = static_cast<int>(kPalette.size());
  return kPalette[static_cast<size_t>(((index % n) + n) % n)];
}

std::string escape_markup(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

std::string format_exact(double value) {
  if (std::isnan(value)) return "NaN";
  if (std::isinf(value)) return value > 0 ? "Infinity" : "-Infinity";
  return fmt::format("{}", value);
}

std::vector<double> nice_ticks(double lo, double hi, int target) {
  if (!std::isfinite(lo) || !std::isfinite(hi)) return {};
  if (lo > hi) std::swap(lo, hi);
  if (hi - lo <= 1e-12 * std::max(std::fabs(lo), std::fabs(hi))) {
    const double pad = lo == 0.0 ? 1.0 : 0.1 * std::fabs(lo);
    lo -= pad;
    hi += pad;
  }
  target = std::max(target, 2);
  const double raw = (hi - lo) / (target - 1);
  const int exponent = static_cast<int>(std::floor(std::log10(raw)));
  const double power = std::pow(10.0, exponent);
  const double f = raw / power;
  const double mantissa = f < 1.5 ? 1.0 : f < 3.0 ? 2.0 : f < 7.0 ? 5.0 : 10.0;
  const double step = mantissa * power;
  const double first = std::floor(lo / step + 1e-9);
  const double last = std::ceil(hi / step - 1e-9);
  // Tick k is k * mantissa * 10^exponent; dividing an exact integer by an exact power of ten
  // gives the double nearest the decimal value (0.6, not 0.6000000000000001).
  const double inverse_power = exponent < 0 ? std::pow(10.0, -exponent) : 0.0;
  std::vector<double> ticks;
  for (double k = first; k <= last + 0.5; k += 1.0)
    ticks.push_back(exponent < 0 ? (k * mantissa) / inverse_power : k * step);
  return ticks;
}

std::string line_chart_svg(const LineChart& chart) {
  std::vector<LegendEntry> legend;
  for (const Band& b : chart.bands)
    legend.push_back({b.name, std::string(palette_colour(b.colour)),
                      b.style == BandStyle::filled ? SwatchKind::fill : SwatchKind::outline,
                      LineStyle::solid, std::max(b.opacity, 0.15)});
  for (size_t i = 0; i < chart.series.size(); ++i) {
    const LineSeries& s = chart.series[i];
    legend.push_back({s.name, series_colour(s, i), s.connect ? SwatchKind::line : SwatchKind::point,
                      s.style, 1.0});
  }
  Canvas canvas(chart.frame, legend);

  Range xr;
  Range yr;
  for (const Band& b : chart.bands) {
    xr.add(b.x);
    if (b.stepped && !b.x.empty()) {
      xr.add(b.x.front() - 0.5);
      xr.add(b.x.back() + 0.5);
    }
    yr.add(b.lower);
    yr.add(b.upper);
  }
  for (const LineSeries& s : chart.series) {
    xr.add(s.x);
    yr.add(s.y);
  }
  if (chart.x_rule) xr.add(*chart.x_rule);
  for (const AxisTick& t : chart.x_ticks) xr.add(t.at);
  if (chart.x_min && !xr.empty()) xr.lo = std::min(xr.lo, *chart.x_min);
  if (chart.x_max && !xr.empty()) xr.hi = std::max(xr.hi, *chart.x_max);
  const bool has_data = !xr.empty() && !yr.empty();
  if (chart.include_zero) yr.add(0.0);
  if (xr.empty()) xr = {0.0, 1.0};
  if (yr.empty()) yr = {0.0, 1.0};
  if (xr.hi == xr.lo) {
    xr.lo -= 0.5;
    xr.hi += 0.5;
  }

  const std::vector<double> y_ticks = nice_ticks(yr.lo, yr.hi, 6);
  const std::vector<std::string> y_labels = tick_labels(y_ticks, TickFormat::plain);
  canvas.layout(y_labels);
  std::vector<double> x_at;
  std::vector<std::string> x_labels;
  if (chart.x_ticks.empty()) {
    x_at = inner_ticks(xr.lo, xr.hi,
                       std::max(3, static_cast<int>((canvas.right() - canvas.left()) / 90.0)));
    const double step = x_at.size() > 1 ? x_at[1] - x_at[0] : 1.0;
    for (double v : x_at) x_labels.push_back(tick_label(v, step, TickFormat::plain));
  } else {
    for (const AxisTick& t : chart.x_ticks) {
      x_at.push_back(t.at);
      x_labels.push_back(t.label);
    }
  }
  const Scale xs{xr.lo, xr.hi, canvas.left(), canvas.right()};
  const Scale ys{y_ticks.front(), y_ticks.back(), canvas.bottom(), canvas.top()};

  std::string out;
  canvas.begin(out, "line");
  canvas.grid_and_axes(out, x_at, x_labels, y_ticks, y_labels, xs, ys);
  if (!has_data) {
    canvas.no_data(out);
    Canvas::end(out);
    return out;
  }
  if (chart.include_zero || (y_ticks.front() < 0.0 && y_ticks.back() > 0.0))
    fmt::format_to(
        std::back_inserter(out),
        "<line class=\"zero\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"#999999\"/>\n",
        px(canvas.left()), px(ys(0.0)), px(canvas.right()), px(ys(0.0)));
  out += "<g class=\"plot\">\n";
  for (const Band& b : chart.bands) {
    const std::string colour(palette_colour(b.colour));
    const bool filled = b.style == BandStyle::filled;
    fmt::format_to(
        std::back_inserter(out),
        "<path class=\"band\" data-band=\"{}\" data-x=\"{}\" data-lower=\"{}\" "
        "data-upper=\"{}\" d=\"{}\" {}/>\n",
        escape_markup(b.name), join_exact(b.x), join_exact(b.lower), join_exact(b.upper),
        band_path(b, xs, ys, filled),
        filled
            ? fmt::format("fill=\"{}\" fill-opacity=\"{}\" stroke=\"none\"", colour, px(b.opacity))
            : fmt::format("fill=\"none\" stroke=\"{}\" stroke-width=\"1.75\"", colour));
  }
  for (size_t m = 0; m < chart.marks.size(); ++m) {
    const XMark& mark = chart.marks[m];
    if (!std::isfinite(mark.at) || mark.at < xr.lo || mark.at > xr.hi) continue;
    const double x = xs(mark.at);
    const std::string colour(palette_colour(mark.colour));
    // Labels alternate between two rows so neighbouring marks do not overprint.
    const double label_y = canvas.top() + (m % 2 == 0 ? 11.0 : 24.0);
    const bool right_half = x > 0.5 * (canvas.left() + canvas.right());
    fmt::format_to(std::back_inserter(out),
                   "<g class=\"mark\" data-x=\"{0}\" data-label=\"{1}\"><line x1=\"{2}\" "
                   "y1=\"{3}\" x2=\"{2}\" y2=\"{4}\" stroke=\"{5}\" stroke-width=\"1.25\" "
                   "stroke-dasharray=\"1 3\" stroke-linecap=\"round\"/>"
                   "<path d=\"M{6} {4} L{2} {7} L{8} {4} Z\" fill=\"{5}\"/>"
                   "<text x=\"{9}\" y=\"{10}\" fill=\"{5}\" font-size=\"11\" "
                   "text-anchor=\"{11}\">{1}</text></g>\n",
                   format_exact(mark.at), escape_markup(mark.label), px(x), px(canvas.top()),
                   px(canvas.bottom()), colour, px(x - 4.0), px(canvas.bottom() - 6.0), px(x + 4.0),
                   px(right_half ? x - 4.0 : x + 4.0), px(label_y), right_half ? "end" : "start");
  }
  if (chart.x_rule) {
    const double x = xs(*chart.x_rule);
    fmt::format_to(
        std::back_inserter(out),
        "<line class=\"rule\" x1=\"{0}\" y1=\"{1}\" x2=\"{0}\" y2=\"{2}\" stroke=\"{3}\" "
        "stroke-dasharray=\"3 3\" data-x=\"{4}\"/>\n",
        px(x), px(canvas.top()), px(canvas.bottom()), kMuted, format_exact(*chart.x_rule));
    if (!chart.x_rule_label.empty())
      fmt::format_to(std::back_inserter(out),
                     "<text x=\"{}\" y=\"{}\" fill=\"{}\" text-anchor=\"end\">{}</text>\n",
                     px(x - 4.0), px(canvas.top() + 12.0), kMuted,
                     escape_markup(chart.x_rule_label));
  }
  for (size_t i = 0; i < chart.series.size(); ++i) {
    const LineSeries& s = chart.series[i];
    const std::string colour = series_colour(s, i);
    const auto dash = dash_array(s.style);
    fmt::format_to(std::back_inserter(out),
                   "<g class=\"series\" data-series=\"{}\" data-x=\"{}\" data-values=\"{}\">\n"
                   "<path d=\"{}\" fill=\"none\" stroke=\"{}\" stroke-width=\"{}\" "
                   "stroke-linejoin=\"round\"{}/>\n",
                   escape_markup(s.name), join_exact(s.x), join_exact(s.y),
                   s.connect ? polyline_path(s.x, s.y, xs, ys) : std::string(), colour,
                   s.ink ? "1.5" : "2",
                   dash.empty() ? "" : fmt::format(" stroke-dasharray=\"{}\"", dash));
    if (s.markers) {
      for (size_t k = 0; k < std::min(s.x.size(), s.y.size()); ++k) {
        if (!std::isfinite(s.x[k]) || !std::isfinite(s.y[k])) continue;
        fmt::format_to(std::back_inserter(out),
                       "<circle class=\"point\" data-series=\"{}\" data-x=\"{}\" "
                       "data-value=\"{}\" cx=\"{}\" cy=\"{}\" r=\"{}\" fill=\"{}\"/>\n",
                       escape_markup(s.name), format_exact(s.x[k]), format_exact(s.y[k]),
                       px(xs(s.x[k])), px(ys(s.y[k])), s.connect ? "3.5" : "2.5", colour);
      }
    }
    out += "</g>\n";
  }
  out += "</g>\n";
  Canvas::end(out);
  return out;
}

LineChart fan_chart(const FanChartData& data) {
  LineChart chart;
  chart.frame = data.frame;
  chart.x_ticks = data.x_ticks;
  chart.marks = data.marks;
  const auto pct = [](double level) { return fmt::format("{:g}%", 100.0 * level); };
  for (size_t k = 0; k < data.bands.size(); ++k) {
    const FanBands& fb = data.bands[k];
    const bool first = k == 0;
    const int colour = first ? kBandColour : kKnownColour;
    const auto name = [&](double level) {
      return fb.label.empty() ? pct(level) : fmt::format("{} ({})", pct(level), fb.label);
    };
    Band outer{name(data.outer_level),
               data.forecast_x,
               fb.outer_lower,
               fb.outer_upper,
               colour,
               0.22,
               first ? BandStyle::filled : BandStyle::outline,
               true};
    Band inner{name(data.inner_level),
               data.forecast_x,
               fb.inner_lower,
               fb.inner_upper,
               colour,
               0.5,
               first ? BandStyle::filled : BandStyle::outline,
               true};
    chart.bands.push_back(std::move(outer));
    chart.bands.push_back(std::move(inner));
  }
  LineSeries history{"History", data.history_x, data.history, -1, true, LineStyle::solid, false};
  chart.series.push_back(std::move(history));
  if (!data.fitted.empty()) {
    LineSeries fitted{"Fitted (one step)", data.fitted_x, data.fitted, kModelColour, false,
                      LineStyle::dotted,   false};
    chart.series.push_back(std::move(fitted));
  }
  if (!data.actual.empty()) {
    LineSeries actual{"Actual", data.actual_x, data.actual, -1, true, LineStyle::dotted, true};
    chart.series.push_back(std::move(actual));
  }
  LineSeries forecast{"Forecast", data.forecast_x,  data.forecast, kModelColour,
                      false,      LineStyle::solid, true};
  chart.series.push_back(std::move(forecast));
  if (!data.history_x.empty()) {
    chart.x_rule = data.history_x.back();
    chart.x_rule_label = "forecast origin";
  }
  return chart;
}

std::string fan_chart_svg(const FanChartData& data) { return line_chart_svg(fan_chart(data)); }

std::string bar_chart_svg(const BarChart& chart) {
  // The report's roles (svg.h): the band in the uncertainty hue, bars beyond it in ink.
  const std::string inside_colour(palette_colour(5));  // sky blue
  const std::string outside_colour(kInkColour);
  const bool has_band = !chart.band.empty();
  std::vector<LegendEntry> legend;
  if (has_band) {
    legend.push_back({"within band", inside_colour, SwatchKind::bar, LineStyle::solid, 1.0});
    legend.push_back({"beyond band", outside_colour, SwatchKind::bar, LineStyle::solid, 1.0});
    legend.push_back({chart.band_label, std::string(palette_colour(kBandColour)),
                      SwatchKind::line, LineStyle::solid, 1.0});
  }
  Canvas canvas(chart.frame, legend);
  const size_t n = std::min(chart.x.size(), chart.values.size());
  const auto band_at = [&](size_t i) {
    if (chart.band.empty()) return kNaN;
    return chart.band.size() == 1 ? chart.band[0] : (i < chart.band.size() ? chart.band[i] : kNaN);
  };

  Range xr;
  Range yr;
  yr.add(0.0);
  bool has_data = false;
  double spacing = std::numeric_limits<double>::infinity();
  for (size_t i = 0; i < n; ++i) {
    if (!std::isfinite(chart.x[i])) continue;
    xr.add(chart.x[i]);
    if (i > 0 && std::isfinite(chart.x[i - 1]))
      spacing = std::min(spacing, std::fabs(chart.x[i] - chart.x[i - 1]));
    if (std::isfinite(chart.values[i])) has_data = true;
    yr.add(chart.values[i]);
    yr.add(band_at(i));
    yr.add(-band_at(i));
  }
  if (!std::isfinite(spacing) || spacing <= 0.0) spacing = 1.0;
  if (xr.empty()) xr = {0.0, 1.0};
  if (chart.y_min) yr.lo = std::min(yr.lo, *chart.y_min);
  if (chart.y_max) yr.hi = std::max(yr.hi, *chart.y_max);

  const std::vector<double> y_ticks = nice_ticks(yr.lo, yr.hi, 6);
  const std::vector<std::string> y_labels = tick_labels(y_ticks, TickFormat::plain);
  canvas.layout(y_labels);
  const double x_lo = xr.lo - 0.6 * spacing;
  const double x_hi = xr.hi + 0.6 * spacing;
  const Scale xs{x_lo, x_hi, canvas.left(), canvas.right()};
  const Scale ys{y_ticks.front(), y_ticks.back(), canvas.bottom(), canvas.top()};
  std::vector<double> x_at = inner_ticks(
      xr.lo, xr.hi, std::max(3, static_cast<int>((canvas.right() - canvas.left()) / 60.0)));
  // Lags are whole numbers: never put a tick between two of them.
  if (x_at.size() > 1 && x_at[1] - x_at[0] < spacing) {
    x_at.clear();
    for (size_t i = 0; i < n; ++i)
      if (std::isfinite(chart.x[i])) x_at.push_back(chart.x[i]);
  }
  const double step = x_at.size() > 1 ? x_at[1] - x_at[0] : 1.0;
  std::vector<std::string> x_labels;
  for (double v : x_at) x_labels.push_back(tick_label(v, step, TickFormat::plain));

  std::string out;
  canvas.begin(out, "bar");
  canvas.grid_and_axes(out, x_at, x_labels, y_ticks, y_labels, xs, ys);
  if (!has_data) {
    canvas.no_data(out);
    Canvas::end(out);
    return out;
  }
  const double bar_width = std::max(1.0, 0.6 * (xs(spacing) - xs(0.0)));
  out += "<g class=\"plot\">\n";
  for (size_t i = 0; i < n; ++i) {
    const double v = chart.values[i];
    if (!std::isfinite(chart.x[i]) || !std::isfinite(v)) continue;
    const double b = band_at(i);
    const bool beyond = std::isfinite(b) && std::fabs(v) > b;
    const double y0 = ys(0.0);
    const double y1 = ys(v);
    fmt::format_to(std::back_inserter(out),
                   "<rect class=\"bar{}\" data-x=\"{}\" data-value=\"{}\"{} x=\"{}\" y=\"{}\" "
                   "width=\"{}\" height=\"{}\" fill=\"{}\"/>\n",
                   beyond ? " beyond" : "", format_exact(chart.x[i]), format_exact(v),
                   std::isfinite(b) ? fmt::format(" data-band=\"{}\"", format_exact(b)) : "",
                   px(xs(chart.x[i]) - 0.5 * bar_width), px(std::min(y0, y1)), px(bar_width),
                   px(std::fabs(y1 - y0)), has_band && !beyond ? inside_colour : outside_colour);
  }
  fmt::format_to(std::back_inserter(out),
                 "<line class=\"zero\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"{}\"/>\n",
                 px(canvas.left()), px(ys(0.0)), px(canvas.right()), px(ys(0.0)), kAxis);
  if (has_band) {
    // The band as a step line over each lag's slot (constant bands give a straight line).
    for (const double sign : {1.0, -1.0}) {
      std::string d;
      for (size_t i = 0; i < n; ++i) {
        const double b = band_at(i);
        if (!std::isfinite(b) || !std::isfinite(chart.x[i])) continue;
        const double xa = xs(chart.x[i] - 0.5 * spacing);
        const double xb = xs(chart.x[i] + 0.5 * spacing);
        fmt::format_to(std::back_inserter(d), "{}{} {} L{} {} ", d.empty() ? "M" : "L", px(xa),
                       px(ys(sign * b)), px(xb), px(ys(sign * b)));
      }
      if (!d.empty()) d.pop_back();
      fmt::format_to(std::back_inserter(out),
                     "<path class=\"band-line\" d=\"{}\" fill=\"none\" stroke=\"{}\" "
                     "stroke-width=\"2\"/>\n",
                     d, palette_colour(kBandColour));
    }
  }
  out += "</g>\n";
  Canvas::end(out);
  return out;
}

LineChart horizon_line_chart(const HorizonChart& chart) {
  LineChart lc;
  lc.frame = chart.frame;
  lc.include_zero = chart.include_zero;
  std::vector<double> x;
  for (int h : chart.horizons) x.push_back(h);
  for (size_t i = 0; i < chart.series.size(); ++i) {
    const HorizonSeries& s = chart.series[i];
    LineSeries ls;
    ls.name = s.name;
    ls.x = x;
    ls.y = s.values;
    ls.y.resize(x.size(), kNaN);
    ls.colour = static_cast<int>(i);
    ls.style = s.benchmark ? LineStyle::dashed : LineStyle::solid;
    ls.markers = true;
    lc.series.push_back(std::move(ls));
  }
  // Half a step of room on each side keeps the end markers off the axes.
  if (!chart.horizons.empty()) {
    const auto [lo, hi] = std::minmax_element(chart.horizons.begin(), chart.horizons.end());
    lc.x_min = *lo - 0.5;
    lc.x_max = *hi + 0.5;
  }
  // Every horizon labelled while they fit; otherwise the nice numeric ticks.
  if (!chart.horizons.empty() && chart.horizons.size() <= 24)
    for (int h : chart.horizons) lc.x_ticks.push_back({static_cast<double>(h), std::to_string(h)});
  return lc;
}

std::string horizon_chart_svg(const HorizonChart& chart) {
  return line_chart_svg(horizon_line_chart(chart));
}

std::string coverage_chart_svg(const CoverageChart& chart) {
  std::vector<LegendEntry> legend;
  legend.push_back(
      {"nominal = empirical", std::string(kInkColour), SwatchKind::line, LineStyle::dashed, 1.0});
  int count = 0;
  for (const CoverageSeries& s : chart.series)
    if (count == 0 && s.count > 0) count = s.count;
  if (count > 0)
    legend.push_back({fmt::format("sampling range, n = {}", count), "#bbbbbb", SwatchKind::bar,
                      LineStyle::solid, 1.0});
  for (size_t i = 0; i < chart.series.size(); ++i)
    legend.push_back({chart.series[i].name, std::string(palette_colour(static_cast<int>(i))),
                      SwatchKind::point, LineStyle::solid, 1.0});
  Canvas canvas(chart.frame, legend);

  const auto sampling_half_width = [count](double p) {
    return count > 0 ? 1.96 * std::sqrt(p * (1.0 - p) / count) : 0.0;
  };
  Range r;
  r.add(1.0);
  for (double p : chart.nominal) {
    r.add(p);
    r.add(p - sampling_half_width(p));
  }
  bool has_data = false;
  for (const CoverageSeries& s : chart.series)
    for (double v : s.empirical) {
      r.add(v);
      if (std::isfinite(v)) has_data = true;
    }
  const double lo = std::max(0.0, r.lo - 0.02);
  const std::vector<double> ticks = nice_ticks(lo, 1.0, 6);
  const std::vector<std::string> labels = tick_labels(ticks, TickFormat::percent);
  canvas.layout(labels);
  const Scale xs{ticks.front(), ticks.back(), canvas.left(), canvas.right()};
  const Scale ys{ticks.front(), ticks.back(), canvas.bottom(), canvas.top()};

  std::string out;
  canvas.begin(out, "coverage");
  canvas.grid_and_axes(out, ticks, labels, ticks, labels, xs, ys);
  if (!has_data || chart.nominal.empty()) {
    canvas.no_data(out);
    Canvas::end(out);
    return out;
  }
  out += "<g class=\"plot\">\n";
  fmt::format_to(std::back_inserter(out),
                 "<line class=\"diagonal\" x1=\"{}\" y1=\"{}\" x2=\"{}\" y2=\"{}\" stroke=\"{}\" "
                 "stroke-dasharray=\"7 4\"/>\n",
                 px(xs(ticks.front())), px(ys(ticks.front())), px(xs(ticks.back())),
                 px(ys(ticks.back())), kInkColour);
  if (count > 0)
    for (double p : chart.nominal) {
      const double hw = sampling_half_width(p);
      fmt::format_to(std::back_inserter(out),
                     "<rect class=\"sampling\" data-nominal=\"{}\" data-lower=\"{}\" "
                     "data-upper=\"{}\" x=\"{}\" y=\"{}\" width=\"14\" height=\"{}\" "
                     "fill=\"#bbbbbb\" fill-opacity=\"0.6\"/>\n",
                     format_exact(p), format_exact(p - hw), format_exact(p + hw), px(xs(p) - 7.0),
                     px(ys(p + hw)), px(ys(p - hw) - ys(p + hw)));
    }
  const double k = static_cast<double>(chart.series.size());
  for (size_t i = 0; i < chart.series.size(); ++i) {
    const CoverageSeries& s = chart.series[i];
    const std::string colour(palette_colour(static_cast<int>(i)));
    // Side-by-side offsets keep models with equal coverage visible.
    const double offset = (static_cast<double>(i) - 0.5 * (k - 1.0)) * 9.0;
    fmt::format_to(std::back_inserter(out), "<g class=\"series\" data-series=\"{}\">\n",
                   escape_markup(s.name));
    for (size_t l = 0; l < std::min(s.empirical.size(), chart.nominal.size()); ++l) {
      if (!std::isfinite(s.empirical[l])) continue;
      fmt::format_to(std::back_inserter(out),
                     "<circle class=\"point\" data-series=\"{}\" data-nominal=\"{}\" "
                     "data-value=\"{}\" cx=\"{}\" cy=\"{}\" r=\"5\" fill=\"{}\" stroke=\"#ffffff\" "
                     "stroke-width=\"1\"/>\n",
                     escape_markup(s.name), format_exact(chart.nominal[l]),
                     format_exact(s.empirical[l]), px(xs(chart.nominal[l]) + offset),
                     px(ys(s.empirical[l])), colour);
    }
    out += "</g>\n";
  }
  out += "</g>\n";
  Canvas::end(out);
  return out;
}

}  // namespace lagsieve
