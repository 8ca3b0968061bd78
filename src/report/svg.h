#pragma once
// Self-contained SVG charts for reports and slide decks. Each chart is a plain struct of numbers
// and labels (filled by the caller from run results) and one function that returns a complete
// <svg> element as a string: no scripts, no external references, no element ids (so many charts
// can share one HTML page), text escaped.
//
// Conventions every chart follows:
//  - ChartFrame: the title says what to look for ("Bars outside the band mark candidate
//    delays"), the subtitle gives context, axis titles carry units.
//  - Colours from the Okabe-Ito palette (Okabe & Ito 2008), which stays distinguishable under
//    the common colour-vision deficiencies; dashes separate benchmarks/comparisons as well.
//  - Axis ranges are padded to "nice" tick values (1, 2, 5 x 10^k), so nothing is clipped.
//  - Plotted numbers are written back as data attributes at full precision (shortest
//    round-trip form; "NaN" for gaps), so tests and CSV-consistency checks can read them:
//      line series   <g class="series" data-series=NAME data-x="x1 x2 ..." data-values="y1 ...">
//      bands         <path class="band" data-band=NAME data-x=... data-lower=... data-upper=...>
//      markers       <circle class="point" data-series=NAME data-x=X data-value=Y>
//      bars          <rect class="bar" data-x=LAG data-value=V>
//      coverage      <circle class="point" data-series=NAME data-nominal=P data-value=C>
//    NaN values leave a gap in a line and draw no bar or marker.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace lagsieve {

// Okabe-Ito colours in the order series use them (blue, vermillion, bluish green, orange,
// reddish purple, sky blue, yellow, black); the index wraps around.
std::string_view palette_colour(int index);
inline constexpr std::string_view kInkColour = "#000000";  // history, reference lines

// The report's colour roles, the same in every chart (palette indices): what was observed is
// ink, what the model says is vermillion, its uncertainty a single orange hue (stepped by
// horizon in forecasts), the band with future inputs known a bluish-green outline, and events
// reddish-purple marks.
inline constexpr int kModelColour = 1;  // forecasts, fitted values
inline constexpr int kBandColour = 3;   // prediction intervals, +-2 sigma bands
inline constexpr int kKnownColour = 2;  // the interval with future inputs known
inline constexpr int kEventColour = 4;  // event dates, the largest residual

// Escapes & < > " ' for XML/HTML text and attribute values.
std::string escape_markup(std::string_view text);

// Shortest decimal form that reads back as the same double; "NaN", "Infinity", "-Infinity".
std::string format_exact(double value);

// Tick positions covering [lo, hi] with a step of 1, 2 or 5 x 10^k, aiming at `target` ticks.
// The first tick is <= lo and the last >= hi. lo == hi is widened to a unit range around it.
std::vector<double> nice_ticks(double lo, double hi, int target = 6);

struct ChartFrame {
  std::string title;     // what to look for, in a sentence
  std::string subtitle;  // optional context: data, model, period
  std::string x_title;   // with units, e.g. "Lag (days)"
  std::string y_title;   // with units, e.g. "Heat demand (MWh)"
  int width = 720;       // pixels of the viewBox; the HTML page scales it down when needed
  int height = 380;
};

enum class LineStyle { solid, dashed, dotted };

struct LineSeries {
  std::string name;
  std::vector<double> x;
  std::vector<double> y;  // NaN leaves a gap
  int colour = -1;        // palette index; -1 takes the series' position in the chart
  bool ink = false;       // draw in black instead of a palette colour (e.g. history)
  LineStyle style = LineStyle::solid;
  bool markers = false;  // a dot per point (also carries data-value per point)
  bool connect = true;   // false: markers only (a scatter), no line
};

enum class BandStyle { filled, outline };

struct Band {
  std::string name;
  std::vector<double> x;
  std::vector<double> lower;
  std::vector<double> upper;
  int colour = 0;                       // palette index
  double opacity = 0.25;                // fill opacity when filled
  BandStyle style = BandStyle::filled;  // outline: solid edges only, for a second band family
  bool stepped = false;  // each x covers [x - 1/2, x + 1/2] (forecast horizons), not a ramp
};

// A labelled vertical mark at a position of the x axis (an event date, the largest residual).
struct XMark {
  double at = 0.0;
  std::string label;
  int colour = kEventColour;
};

struct AxisTick {
  double at = 0.0;
  std::string label;
};

struct LineChart {
  ChartFrame frame;
  std::vector<Band> bands;         // drawn first, in order (put the widest first)
  std::vector<LineSeries> series;  // drawn over the bands
  std::vector<AxisTick> x_ticks;   // empty: nice numeric ticks; else exactly these (e.g. dates)
  std::optional<double> x_rule;    // a vertical rule, e.g. at the forecast origin
  std::string x_rule_label;
  std::vector<XMark> marks;     // drawn under the series, labels along the top edge
  bool include_zero = false;    // force y = 0 into the range
  std::optional<double> x_min;  // widen the x range (e.g. half a step of padding)
  std::optional<double> x_max;
};
std::string line_chart_svg(const LineChart& chart);

// Forecast fan: history, point forecast and nested inner/outer bands, stepped by horizon. The
// first band set is filled in one orange hue (outer light, inner darker); a second set (e.g.
// "inputs known" beside "inputs forecast") is drawn as bluish-green outlines so the extra width
// from uncertain inputs is visible. Optional: the model's fitted values over the last stretch
// of history, and event marks.
struct FanBands {
  std::string label;  // e.g. "inputs forecast"
  std::vector<double> inner_lower, inner_upper;
  std::vector<double> outer_lower, outer_upper;
};
struct FanChartData {
  ChartFrame frame;
  std::vector<double> history_x, history;
  std::vector<double> forecast_x, forecast;
  double inner_level = 0.80;
  double outer_level = 0.95;
  std::vector<FanBands> bands;           // 0, 1 or 2 sets over forecast_x
  std::vector<double> actual_x, actual;  // optional realised values after the origin
  std::vector<double> fitted_x, fitted;  // optional one-step fitted values before the origin
  std::vector<XMark> marks;              // e.g. event dates
  std::vector<AxisTick> x_ticks;
};
LineChart fan_chart(const FanChartData& data);
std::string fan_chart_svg(const FanChartData& data);

// Bars by lag with a symmetric significance band +-band (cross-correlations, residual ACF).
// Bars beyond the band are drawn in a stronger colour.
struct BarChart {
  ChartFrame frame;
  std::vector<double> x;       // lags
  std::vector<double> values;  // NaN draws no bar
  std::vector<double> band;    // empty: no band; one value: constant; else one per lag
  std::string band_label = "approx. 95% band";
  std::optional<double> y_min;  // fixed range, e.g. -1 and 1 for correlations
  std::optional<double> y_max;
};
std::string bar_chart_svg(const BarChart& chart);

// One line per model of an error measure by forecast horizon; benchmarks dashed.
struct HorizonSeries {
  std::string name;
  std::vector<double> values;  // one per HorizonChart::horizons entry; NaN leaves a gap
  bool benchmark = false;
};
struct HorizonChart {
  ChartFrame frame;
  std::vector<int> horizons;
  std::vector<HorizonSeries> series;
  bool include_zero = true;
};
LineChart horizon_line_chart(const HorizonChart& chart);
std::string horizon_chart_svg(const HorizonChart& chart);

// Empirical against nominal interval coverage: the diagonal is perfect calibration; points below
// it are over-confident intervals. With counts, a grey bar at each nominal level shows the
// range p +- 1.96 sqrt(p (1 - p) / n) that sampling alone explains (n from the first series
// with a count: models backtested together share their origins).
struct CoverageSeries {
  std::string name;
  std::vector<double> empirical;  // one per nominal level, as shares 0..1
  int count = 0;                  // forecasts behind each share; 0 = no sampling bar
};
struct CoverageChart {
  ChartFrame frame;
  std::vector<double> nominal;  // as shares, e.g. {0.8, 0.95}
  std::vector<CoverageSeries> series;
};
std::string coverage_chart_svg(const CoverageChart& chart);

}  // namespace lagsieve
