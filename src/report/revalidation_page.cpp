#include "report/revalidation_page.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/error.h"
#include "report/svg.h"

namespace lagsieve {

namespace {

using nlohmann::json;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Field access with messages that name the file and the field.
struct Fields {
  std::string file;
  [[noreturn]] void fail(const std::string& path, const std::string& what) const {
    throw InputError(
        fmt::format("{}: field '{}' {}; re-run `lagsieve revalidate`", file, path, what));
  }
  const json& object(const json& j, const char* key) const {
    static const json empty = json::object();
    if (!j.contains(key) || j[key].is_null()) return empty;
    if (!j[key].is_object()) fail(key, "is not an object");
    return j[key];
  }
  double number(const json& j, const char* key, const std::string& path) const {
    if (!j.is_object() || !j.contains(key) || j[key].is_null()) return kNaN;
    if (!j[key].is_number()) fail(path + key, "is not a number");
    return j[key].get<double>();
  }
  int integer(const json& j, const char* key, const std::string& path) const {
    const double v = number(j, key, path);
    return std::isfinite(v) ? static_cast<int>(v) : 0;
  }
  std::string text(const json& j, const char* key, const std::string& path) const {
    if (!j.is_object() || !j.contains(key) || j[key].is_null()) return "";
    if (!j[key].is_string()) fail(path + key, "is not text");
    return j[key].get<std::string>();
  }
  bool flag(const json& j, const char* key) const {
    return j.is_object() && j.contains(key) && j[key].is_boolean() && j[key].get<bool>();
  }
  std::vector<double> numbers(const json& j, const char* key, const std::string& path) const {
    std::vector<double> out;
    if (!j.is_object() || !j.contains(key) || j[key].is_null()) return out;
    if (!j[key].is_array()) fail(path + key, "is not a list");
    for (const auto& v : j[key]) out.push_back(v.is_number() ? v.get<double>() : kNaN);
    return out;
  }
  std::vector<std::string> texts(const json& j, const char* key, const std::string& path) const {
    std::vector<std::string> out;
    if (!j.is_object() || !j.contains(key) || j[key].is_null()) return out;
    if (!j[key].is_array()) fail(path + key, "is not a list");
    for (const auto& v : j[key]) out.push_back(v.is_string() ? v.get<std::string>() : v.dump());
    return out;
  }
  const json& list(const json& j, const char* key, const std::string& path) const {
    static const json empty = json::array();
    if (!j.is_object() || !j.contains(key) || j[key].is_null()) return empty;
    if (!j[key].is_array()) fail(path + key, "is not a list");
    return j[key];
  }
};

TableValue num(double v) { return TableValue{v}; }
TableValue whole(int v) { return TableValue{static_cast<long long>(v)}; }
TableValue text(std::string v) { return TableValue{std::move(v)}; }
std::string pct(double level) { return fmt::format("{:g}%", 100.0 * level); }
std::string short_num(double v) {
  return std::isfinite(v) ? fmt::format("{:.3g}", v) : "not available";
}

HtmlSection verdict(const Fields& f, const json& doc) {
  HtmlSection s;
  s.heading = "Verdict";
  const std::string v = f.text(doc, "verdict", "");
  if (v.empty()) f.fail("verdict", "is missing");
  Tone tone = Tone::neutral;
  std::string meaning;
  if (v == "keep") {
    tone = Tone::good;
    meaning = "The deployed model still holds on the new rows: keep it.";
  } else if (v == "refit") {
    tone = Tone::warning;
    meaning =
        "Keep the model's structure but re-estimate it on all rows (refit_model.json is that "
        "re-fit).";
  } else if (v == "replace") {
    tone = Tone::bad;
    meaning =
        "A challenger forecasts the new rows better, even against a re-fit: replace the model "
        "(challenger_model.json).";
  }
  const std::string model = f.text(doc, "deployed_model", "");
  const std::string series = f.text(doc, "series", "");
  s.intro = fmt::format(
      "Re-validation of the deployed model{} for '{}' on the rows that arrived after its "
      "training data.",
      model.empty() ? "" : " " + model, series);
  s.blocks.push_back(HtmlNotice{tone, fmt::format("Verdict: {}", v), meaning});
  HtmlTable why;
  why.caption = "Why";
  why.columns = {{"", "", NumberFormat::automatic, 0}, {"Reason", "", NumberFormat::automatic, 3}};
  for (const auto& r : f.texts(doc, "reasons", ""))
    why.rows.push_back({whole(static_cast<int>(why.rows.size()) + 1), text(r)});
  if (!why.rows.empty()) s.blocks.push_back(std::move(why));

  const json& h = f.object(doc, "history");
  const json& d = f.object(doc, "decision");
  HtmlKeyValues kv;
  const std::string first = f.text(h, "training_first_time", "history."),
                    last = f.text(h, "training_last_time", "history.");
  kv.items.emplace_back("Training rows",
                        fmt::format("{}{}", f.integer(h, "training_rows", "history."),
                                    first.empty() ? "" : fmt::format(" ({} to {})", first, last)));
  const std::string nf = f.text(h, "new_first_time", "history."),
                    nl = f.text(h, "new_last_time", "history.");
  kv.items.emplace_back("New rows",
                        fmt::format("{}{}", f.integer(h, "new_rows", "history."),
                                    nf.empty() ? "" : fmt::format(" ({} to {})", nf, nl)));
  kv.items.emplace_back("Data file", f.text(h, "data_file", "history."));
  std::string check = f.text(h, "checked", "history.");
  if (f.integer(h, "training_rows_prepended", "history.") > 0)
    check += fmt::format(
        "; the file starts at training row {}, rows 1 to {} were taken from the model file",
        f.integer(h, "first_training_row_in_file", "history."),
        f.integer(h, "training_rows_prepended", "history."));
  if (!check.empty()) kv.items.emplace_back("History checked", check);
  if (f.integer(h, "late_values", "history.") > 0)
    kv.items.emplace_back(
        "Late values",
        fmt::format("{} target values missing at training are in now (scored as new)",
                    f.integer(h, "late_values", "history.")));
  if (f.flag(h, "history_revised"))
    kv.items.emplace_back("Revised history",
                          fmt::format("{} values differ from the training data (allowed)",
                                      f.integer(h, "revised_values", "history.")));
  if (d.is_object() && !d.empty())
    kv.items.emplace_back(
        "Decision rule",
        fmt::format("{} tests can move the verdict, each at level {:.4f} (family level {:g}, "
                    "Bonferroni); a parameter drifts beyond {:g} standard errors",
                    f.integer(d, "tests", "decision."), f.number(d, "level_per_test", "decision."),
                    f.number(d, "alpha", "decision."),
                    f.number(d, "drift_threshold_se", "decision.")));
  s.blocks.push_back(std::move(kv));
  for (const auto& r : f.texts(h, "revisions", "history."))
    s.blocks.push_back(HtmlNotice{Tone::warning, "Revised value", r});
  return s;
}

HtmlSection performance(const Fields& f, const json& doc) {
  HtmlSection s;
  s.heading = "Accuracy on the new rows";
  const json& p = f.object(doc, "performance");
  const json& rows = f.list(p, "by_horizon", "performance.");
  const int origins = f.integer(p, "origins", "performance.");
  const std::string baseline = f.text(p, "baseline", "performance.");
  std::string sentence = fmt::format(
      "The deployed model, unchanged, forecast the new rows from {} origin{} (first forecast at "
      "row {}).",
      origins, origins == 1 ? "" : "s", f.integer(p, "first_scored_row", "performance."));
  if (!rows.empty()) {
    const json& r1 = rows.front();
    const double now = f.number(r1, "mase", "performance.by_horizon[0].");
    const double then = f.number(r1, "mase_training", "performance.by_horizon[0].");
    if (std::isfinite(now) && std::isfinite(then))
      sentence += fmt::format(
          " One step ahead its scaled error (MASE) is {:.3f}, against {:.3f} at training time "
          "({:.2f} times).",
          now, then, now / then);
  }
  if (baseline == "none")
    sentence += " No training-time accuracy was available to compare with.";
  else if (!baseline.empty())
    sentence += fmt::format(" Training-time accuracy: {}.", baseline);
  s.intro = sentence;
  const std::string chart = new_period_chart_svg(doc, f.text(doc, "series", ""));
  if (!chart.empty())
    s.blocks.push_back(HtmlFigure{
        chart,
        "One-step forecasts of the deployed model from each new origin, with their "
        "intervals; dots are the actual values (vermillion outside the widest interval)."});
  std::vector<double> levels;
  if (!rows.empty())
    for (const auto& [k, v] : rows.front().items())
      if (k.rfind("coverage_", 0) == 0 && k.find("_training") == std::string::npos)
        levels.push_back(std::stod(k.substr(9)) / 100.0);
  HtmlTable t;
  t.caption = "Accuracy by horizon: now and at training time";
  t.columns = {{"Steps", "", NumberFormat::automatic, 0},
               {"Forecasts", "", NumberFormat::automatic, 0},
               {"MAE", "target units", NumberFormat::automatic, 3},
               {"MASE now", "", NumberFormat::fixed, 3},
               {"MASE then", "", NumberFormat::fixed, 3},
               {"Ratio", "", NumberFormat::fixed, 2}};
  for (double l : levels)
    t.columns.push_back({fmt::format("In {}", pct(l)), "now / then", NumberFormat::automatic, 0});
  t.columns.push_back({"p worse", "", NumberFormat::p_value, 3});
  std::vector<std::string> notes;
  for (size_t i = 0; i < rows.size(); ++i) {
    const json& r = rows[i];
    const std::string path = fmt::format("performance.by_horizon[{}].", i);
    std::vector<TableValue> row = {
        whole(f.integer(r, "horizon", path)),    whole(f.integer(r, "count", path)),
        num(f.number(r, "mae", path)),           num(f.number(r, "mase", path)),
        num(f.number(r, "mase_training", path)), num(f.number(r, "mase_ratio", path))};
    for (double l : levels) {
      const std::string key = "coverage_" + fmt::format("{:g}", 100.0 * l);
      const double now = f.number(r, key.c_str(), path);
      const double then = f.number(r, (key + "_training").c_str(), path);
      row.push_back(text(
          fmt::format("{} / {}", std::isfinite(now) ? fmt::format("{:.0f}%", 100 * now) : "\u2014",
                      std::isfinite(then) ? fmt::format("{:.0f}%", 100 * then) : "\u2014")));
    }
    const double stat = f.number(r, "statistic", path);
    row.push_back(std::isfinite(stat) ? num(f.number(r, "p_value", path)) : text("not tested"));
    const std::string note = f.text(r, "note", path);
    if (!std::isfinite(stat) && !note.empty() &&
        std::find(notes.begin(), notes.end(), note) == notes.end())
      notes.push_back(note);
    if (f.flag(r, "degraded")) t.highlighted_rows.push_back(static_cast<int>(i));
    t.rows.push_back(std::move(row));
  }
  t.note =
      "Steps: steps ahead. MAE: mean absolute error. MASE: the absolute error scaled by the "
      "in-sample seasonal naive error (1 = as good as repeating last season); then = the "
      "training-time backtest. In 80%: share of actual values inside the 80% interval. p worse: "
      "one-sided test that the new rows' error exceeds the training-time one.";
  if (!notes.empty()) {
    t.note += " Not tested: ";
    for (size_t i = 0; i < notes.size(); ++i) t.note += (i ? "; " : "") + notes[i];
    t.note += ".";
  }
  if (!t.rows.empty()) s.blocks.push_back(std::move(t));
  return s;
}

HtmlSection drift(const Fields& f, const json& doc) {
  HtmlSection s;
  s.heading = "Parameter drift";
  const json& d = f.object(doc, "drift");
  const json& ps = f.list(d, "parameters", "drift.");
  const double threshold = f.number(d, "threshold_se", "drift.");
  int flagged = 0;
  for (const auto& p : ps) flagged += f.flag(p, "flagged") ? 1 : 0;
  s.intro = fmt::format(
      "The deployed structure re-fitted on all rows (fit status {}): {} of {} parameter{} moved "
      "more than {:g} of "
      "its original standard errors.",
      f.text(d, "refit_status", "drift."), flagged, ps.size(), ps.size() == 1 ? "" : "s",
      threshold);
  HtmlTable t;
  t.caption = "Estimates: deployed and re-fitted";
  t.columns = {{"Parameter", "", NumberFormat::automatic, 0},
               {"Deployed", "", NumberFormat::automatic, 4},
               {"Std. error", "", NumberFormat::automatic, 3},
               {"Re-fitted", "", NumberFormat::automatic, 4},
               {"Change", "", NumberFormat::automatic, 3},
               {"Change", "std. errors", NumberFormat::fixed, 2},
               {"Beyond threshold", "", NumberFormat::automatic, 0}};
  for (size_t i = 0; i < ps.size(); ++i) {
    const json& p = ps[i];
    const std::string path = fmt::format("drift.parameters[{}].", i);
    t.rows.push_back({text(f.text(p, "parameter", path)), num(f.number(p, "deployed", path)),
                      num(f.number(p, "deployed_se", path)), num(f.number(p, "refit", path)),
                      num(f.number(p, "change", path)), num(f.number(p, "change_in_se", path)),
                      text(f.flag(p, "flagged") ? "yes" : "no")});
    if (f.flag(p, "flagged")) t.highlighted_rows.push_back(static_cast<int>(i));
  }
  t.note =
      "The re-fit shares the training rows, so with nothing changed a parameter moves by about "
      "sqrt(1 - training rows / all rows) standard errors; the threshold lies far in that tail.";
  if (!t.rows.empty()) s.blocks.push_back(std::move(t));
  const std::string msg = f.text(d, "refit_message", "drift.");
  if (!msg.empty()) s.blocks.push_back(HtmlParagraph{"Re-fit: " + msg});
  return s;
}

HtmlSection residuals(const Fields& f, const json& doc) {
  HtmlSection s;
  s.heading = "Residuals of the new rows";
  const json& r = f.object(doc, "residuals");
  const std::string p = "residuals.";
  const int n = f.integer(r, "new_residuals", p);
  const double ratio = f.number(r, "variance_ratio", p);
  s.intro = fmt::format(
      "The deployed model's one-step errors on the {} new row{}: their mean is {}, their variance "
      "{} times the "
      "fitted one.",
      n, n == 1 ? "" : "s", short_num(f.number(r, "mean", p)), short_num(ratio));
  HtmlTable t;
  t.caption = "Checks of the one-step errors";
  t.columns = {{"Check", "", NumberFormat::automatic, 0},
               {"Value", "", NumberFormat::automatic, 3},
               {"Statistic", "", NumberFormat::automatic, 3},
               {"p", "", NumberFormat::p_value, 3},
               {"What it would mean", "", NumberFormat::automatic, 0}};
  const double q = f.number(r, "ljung_box_statistic", p);
  t.rows.push_back(
      {text(fmt::format("Autocorrelation (Ljung-Box, {} lags, {} df)",
                        f.integer(r, "ljung_box_lag", p), f.integer(r, "ljung_box_df", p))),
       TableValue{}, num(q),
       std::isfinite(q) ? num(f.number(r, "ljung_box_p", p))
                        : text("not tested: too few errors for the lags"),
       text("the model misses dynamics of the new rows")});
  const double mt = f.number(r, "mean_t", p);
  t.rows.push_back(
      {text("Mean shift (t)"), num(f.number(r, "mean", p)), num(mt),
       std::isfinite(mt) ? num(f.number(r, "mean_p", p)) : text("not tested: needs 2 errors"),
       text("the level moved")});
  t.rows.push_back({text("Variance change (ratio to fitted)"), num(ratio), num(ratio),
                    std::isfinite(ratio) ? num(f.number(r, "variance_p", p))
                                         : text("not tested: needs 2 errors"),
                    text("the noise grew or shrank")});
  const json& cov = f.list(r, "coverage_horizon_1", p);
  for (size_t i = 0; i < cov.size(); ++i) {
    const std::string cp = fmt::format("{}coverage_horizon_1[{}].", p, i);
    const double level = f.number(cov[i], "level", cp);
    t.rows.push_back({text(fmt::format("Inside the one-step {} interval", pct(level))),
                      text(fmt::format("{} of {}", f.integer(cov[i], "inside", cp),
                                       f.integer(cov[i], "count", cp))),
                      num(f.number(cov[i], "observed", cp)), num(f.number(cov[i], "p_value", cp)),
                      text("intervals too narrow or too wide (shown, not part of the verdict)")});
  }
  s.blocks.push_back(std::move(t));
  return s;
}

HtmlSection challengers(const Fields& f, const json& doc) {
  HtmlSection s;
  s.heading = "Challengers";
  const json& c = f.object(doc, "challengers");
  const std::string p = "challengers.";
  const std::string best = f.text(c, "best_challenger", p);
  const int rank = f.integer(c, "deployed_rank", p);
  std::string intro = fmt::format(
      "A fresh search on all rows fitted {} candidates, ranked by {}; the deployed structure "
      "ranks {}.",
      f.integer(c, "candidates", p), f.text(c, "ranked_by", p),
      rank > 0 ? std::to_string(rank) : "outside the comparison");
  if (!best.empty())
    intro += fmt::format(
        " On the new rows the best challenger, {}, scores {} against {} for the deployed model as "
        "it is and {} for its re-fit (lower is better).",
        best, short_num(f.number(c, "score_challenger", p)),
        short_num(f.number(c, "score_deployed", p)),
        short_num(f.number(c, "score_deployed_refit", p)));
  s.intro = intro;
  HtmlTable t;
  t.caption = "Is the challenger better? Diebold-Mariano, squared error, one-sided";
  t.columns = {{"Steps ahead", "", NumberFormat::automatic, 0},
               {"Paired forecasts", "", NumberFormat::automatic, 0},
               {"Statistic vs deployed", "", NumberFormat::fixed, 2},
               {"p vs deployed", "", NumberFormat::p_value, 3},
               {"Statistic vs re-fit", "", NumberFormat::fixed, 2},
               {"p vs re-fit", "", NumberFormat::p_value, 3}};
  const json& rows = f.list(c, "comparisons", p);
  for (size_t i = 0; i < rows.size(); ++i) {
    const std::string rp = fmt::format("{}comparisons[{}].", p, i);
    const double vr = f.number(rows[i], "dm_vs_refit", rp);
    t.rows.push_back(
        {whole(f.integer(rows[i], "horizon", rp)), whole(f.integer(rows[i], "n", rp)),
         num(f.number(rows[i], "dm_vs_deployed", rp)), num(f.number(rows[i], "p_vs_deployed", rp)),
         num(vr),
         std::isfinite(vr) ? num(f.number(rows[i], "p_vs_refit", rp)) : text("not tested")});
  }
  const json& untested = f.list(c, "untested_horizons", p);
  for (size_t i = 0; i < untested.size(); ++i) {
    const std::string up = fmt::format("{}untested_horizons[{}].", p, i);
    t.rows.push_back({whole(f.integer(untested[i], "horizon", up)),
                      whole(f.integer(untested[i], "pairs", up)), TableValue{}, text("not tested"),
                      TableValue{}, text("not tested")});
  }
  std::sort(t.rows.begin(), t.rows.end(), [](const auto& a, const auto& b) {
    return std::get<long long>(a[0]) < std::get<long long>(b[0]);
  });
  if (!untested.empty())
    t.note = fmt::format(
        "Not tested at {} of {} horizons: {}. The test needs h + 3 paired forecasts because its "
        "long-run variance uses h - 1 autocovariances; later re-validations with more new rows "
        "test more horizons.",
        untested.size(), rows.size() + untested.size(),
        f.text(untested.front(), "reason", p + "untested_horizons[0]."));
  if (!best.empty() && !t.rows.empty()) s.blocks.push_back(std::move(t));
  const std::string note = f.text(c, "note", p);
  if (!note.empty()) s.blocks.push_back(HtmlParagraph{"Note: " + note + "."});
  return s;
}

// ---- the chart ------------------------------------------------------------------------------

std::string px(double v) { return fmt::format("{:.1f}", v); }

}  // namespace

std::string new_period_chart_svg(const json& doc, const std::string& target_label) {
  if (!doc.contains("new_period") || !doc["new_period"].is_object()) return "";
  const Fields f{"revalidation.json"};
  const json& v = doc["new_period"];
  const std::string p = "new_period.";
  const auto rows = f.numbers(v, "rows", p);
  if (rows.empty()) return "";
  const auto time = f.texts(v, "time", p);
  const auto actual = f.numbers(v, "actual", p);
  const auto forecast = f.numbers(v, "forecast", p);
  const auto levels = f.numbers(v, "levels", p);
  std::vector<std::vector<double>> lower, upper;
  for (size_t l = 0; l < levels.size(); ++l) {
    lower.push_back(v.contains("lower") && v["lower"].size() > l
                        ? f.numbers(json{{"x", v["lower"][l]}}, "x", p)
                        : std::vector<double>{});
    upper.push_back(v.contains("upper") && v["upper"].size() > l
                        ? f.numbers(json{{"x", v["upper"][l]}}, "x", p)
                        : std::vector<double>{});
  }
  const auto ctx_rows = f.numbers(v, "context_rows", p);
  const auto ctx_time = f.texts(v, "context_time", p);
  const auto ctx = f.numbers(v, "context_actual", p);

  // Ranges.
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  auto take = [&](const std::vector<double>& xs) {
    for (double x : xs)
      if (std::isfinite(x)) lo = std::min(lo, x), hi = std::max(hi, x);
  };
  take(actual), take(forecast), take(ctx);
  for (size_t l = 0; l < levels.size(); ++l) take(lower[l]), take(upper[l]);
  if (!std::isfinite(lo)) return "";
  const auto yt = nice_ticks(lo, hi, 5);
  const double y0 = yt.front(), y1 = yt.back();
  const double x0 = ctx_rows.empty() ? rows.front() - 0.5 : ctx_rows.front() - 0.5;
  const double x1 = rows.back() + 0.5;
  const int width = 960, height = 380;
  const double left = 70, right = 24, top = 58, bottom = 52;
  const double pw = width - left - right, ph = height - top - bottom;
  auto X = [&](double x) { return left + (x - x0) / (x1 - x0) * pw; };
  auto Y = [&](double y) { return top + (y1 - y) / (y1 - y0) * ph; };
  const double slot = pw / (x1 - x0);  // pixels per row
  const std::string font =
      "system-ui, -apple-system, 'Segoe UI', Roboto, Helvetica, Arial, sans-serif";
  std::string out = fmt::format(
      "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"chart chart-new-period\" width=\"{0}\" "
      "height=\"{1}\" "
      "viewBox=\"0 0 {0} {1}\" role=\"img\" font-family=\"{2}\" font-size=\"12\">\n",
      width, height, font);
  const std::string title = "Did the new rows fall inside the deployed model's intervals?";
  out += fmt::format("<title>{}</title>\n", escape_markup(title));
  out += fmt::format("<rect width=\"{}\" height=\"{}\" fill=\"#ffffff\"/>\n", width, height);
  out += fmt::format(
      "<text x=\"12\" y=\"22\" font-size=\"15\" font-weight=\"600\" fill=\"#1a1a1a\">{}</text>\n",
      escape_markup(title));
  std::string sub = "One-step forecasts from each new origin";
  for (size_t l = 0; l < levels.size(); ++l) sub += (l ? ", " : " with ") + pct(levels[l]);
  if (!levels.empty()) sub += " intervals";
  out += fmt::format("<text x=\"12\" y=\"40\" fill=\"#555555\">{}</text>\n", escape_markup(sub));
  // The new period on a tinted ground, so where scoring starts is plain without a rule.
  out += fmt::format(
      "<rect class=\"new-period\" x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" "
      "fill=\"#f3f0e8\"/>\n",
      px(X(rows.front() - 0.5)), px(top), px(X(x1) - X(rows.front() - 0.5)), px(ph));
  for (double t : yt)
    out += fmt::format(
        "<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\" stroke=\"#e4e4e4\"/>\n"
        "<text x=\"{3}\" y=\"{4}\" text-anchor=\"end\" fill=\"#333333\">{5}</text>\n",
        px(left), px(Y(t)), px(left + pw), px(left - 6), px(Y(t) + 4),
        escape_markup(fmt::format("{:g}", t)));
  // x labels: about eight, from the stamps.
  std::vector<double> all_rows = ctx_rows;
  std::vector<std::string> all_time = ctx_time;
  all_rows.insert(all_rows.end(), rows.begin(), rows.end());
  all_time.insert(all_time.end(), time.begin(), time.end());
  const size_t every = std::max<size_t>(1, (all_rows.size() + 7) / 8);
  for (size_t i = 0; i < all_rows.size(); i += every) {
    const std::string label = i < all_time.size() && !all_time[i].empty()
                                  ? all_time[i]
                                  : fmt::format("{:g}", all_rows[i]);
    out +=
        fmt::format("<text x=\"{}\" y=\"{}\" text-anchor=\"middle\" fill=\"#333333\">{}</text>\n",
                    px(X(all_rows[i])), px(top + ph + 18), escape_markup(label));
  }
  out += fmt::format("<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\" stroke=\"#666666\"/>\n",
                     px(left), px(top + ph), px(left + pw));
  out +=
      fmt::format("<text x=\"{}\" y=\"{}\" text-anchor=\"middle\" fill=\"#333333\">Period</text>\n",
                  px(left + pw / 2), px(height - 8));
  out += fmt::format(
      "<text x=\"16\" y=\"{0}\" text-anchor=\"middle\" fill=\"#333333\" transform=\"rotate(-90 16 "
      "{0})\">{1}</text>\n",
      px(top + ph / 2), escape_markup(target_label.empty() ? "Target" : target_label));
  // History: a thin grey line with the exact values as data attributes.
  std::string path, xs, ys;
  bool pen = false;
  for (size_t i = 0; i < ctx.size(); ++i) {
    xs += (i ? " " : "") + format_exact(ctx_rows[i]);
    ys += (i ? " " : "") + format_exact(ctx[i]);
    if (!std::isfinite(ctx[i])) {
      pen = false;
      continue;
    }
    path += fmt::format("{}{} {}", pen ? " L" : " M", px(X(ctx_rows[i])), px(Y(ctx[i])));
    pen = true;
  }
  if (!path.empty())
    out += fmt::format(
        "<g class=\"series\" data-series=\"history\" data-x=\"{}\" data-values=\"{}\"><path "
        "d=\"{}\" "
        "fill=\"none\" stroke=\"#8a8a8a\" stroke-width=\"1.5\"/></g>\n",
        xs, ys, path);
  // Intervals as capsules, widest (lightest, narrowest stroke) first.
  const double cap = std::clamp(slot * 0.5, 4.0, 22.0);
  std::vector<size_t> order(levels.size());
  for (size_t l = 0; l < order.size(); ++l) order[l] = l;
  std::sort(order.begin(), order.end(), [&](size_t a, size_t b) { return levels[a] > levels[b]; });
  const std::string sky = std::string(palette_colour(5)), blue = std::string(palette_colour(0));
  for (size_t k = 0; k < order.size(); ++k) {
    const size_t l = order[k];
    const double w = cap * (k == 0 ? 1.0 : 0.55);
    std::string lx, ll, lu;
    out += fmt::format("<g class=\"band\" data-band=\"{}\" data-x=\"", pct(levels[l]));
    for (size_t i = 0; i < rows.size(); ++i) out += (i ? " " : "") + format_exact(rows[i]);
    out += "\" data-lower=\"";
    for (size_t i = 0; i < rows.size(); ++i)
      out += (i ? " " : "") + format_exact(i < lower[l].size() ? lower[l][i] : kNaN);
    out += "\" data-upper=\"";
    for (size_t i = 0; i < rows.size(); ++i)
      out += (i ? " " : "") + format_exact(i < upper[l].size() ? upper[l][i] : kNaN);
    out += "\">\n";
    for (size_t i = 0; i < rows.size(); ++i) {
      if (i >= lower[l].size() || i >= upper[l].size() || !std::isfinite(lower[l][i]) ||
          !std::isfinite(upper[l][i]))
        continue;
      const double top_y = Y(upper[l][i]), bot_y = Y(lower[l][i]);
      out += fmt::format(
          "<rect x=\"{}\" y=\"{}\" width=\"{}\" height=\"{}\" rx=\"{}\" fill=\"{}\" "
          "fill-opacity=\"{}\"/>\n",
          px(X(rows[i]) - w / 2), px(top_y), px(w), px(std::max(1.0, bot_y - top_y)), px(w / 2),
          k == 0 ? sky : blue, k == 0 ? "0.35" : "0.45");
    }
    out += "</g>\n";
  }
  // Forecasts: open diamonds; actuals: dots, vermillion outside the widest interval.
  const size_t widest = order.empty() ? 0 : order.front();
  const std::string vermillion = std::string(palette_colour(1));
  out += "<g class=\"series\" data-series=\"forecast\" data-x=\"";
  for (size_t i = 0; i < rows.size(); ++i) out += (i ? " " : "") + format_exact(rows[i]);
  out += "\" data-values=\"";
  for (size_t i = 0; i < rows.size(); ++i)
    out += (i ? " " : "") + format_exact(i < forecast.size() ? forecast[i] : kNaN);
  out += "\">\n";
  const double d = std::clamp(slot * 0.22, 3.5, 7.0);
  for (size_t i = 0; i < rows.size() && i < forecast.size(); ++i) {
    if (!std::isfinite(forecast[i])) continue;
    const double cx = X(rows[i]), cy = Y(forecast[i]);
    out += fmt::format(
        "<path d=\"M {} {} L {} {} L {} {} L {} {} Z\" fill=\"#ffffff\" stroke=\"{}\" "
        "stroke-width=\"1.8\"/>\n",
        px(cx), px(cy - d), px(cx + d), px(cy), px(cx), px(cy + d), px(cx - d), px(cy), blue);
  }
  out += "</g>\n";
  for (size_t i = 0; i < rows.size() && i < actual.size(); ++i) {
    if (!std::isfinite(actual[i])) continue;
    const bool outside = !levels.empty() && i < lower[widest].size() && i < upper[widest].size() &&
                         (actual[i] < lower[widest][i] || actual[i] > upper[widest][i]);
    out += fmt::format(
        "<circle class=\"point\" data-series=\"actual\" data-x=\"{}\" data-value=\"{}\" cx=\"{}\" "
        "cy=\"{}\" "
        "r=\"4.5\" fill=\"{}\"/>\n",
        format_exact(rows[i]), format_exact(actual[i]), px(X(rows[i])), px(Y(actual[i])),
        outside ? vermillion : std::string(kInkColour));
  }
  // Legend, top right.
  const double lx = width - 330, ly = 18;
  out += fmt::format(
      "<g class=\"legend\" font-size=\"11\" fill=\"#333333\">"
      "<line x1=\"{0}\" y1=\"{1}\" x2=\"{2}\" y2=\"{1}\" stroke=\"#8a8a8a\" stroke-width=\"1.5\"/>"
      "<text x=\"{3}\" y=\"{4}\">history</text>"
      "<circle cx=\"{5}\" cy=\"{1}\" r=\"4\" fill=\"#000000\"/><text x=\"{6}\" "
      "y=\"{4}\">actual</text>"
      "<path d=\"M {7} {8} L {9} {1} L {7} {10} L {11} {1} Z\" fill=\"#ffffff\" stroke=\"{12}\" "
      "stroke-width=\"1.6\"/>"
      "<text x=\"{13}\" y=\"{4}\">forecast</text>"
      "<rect x=\"{14}\" y=\"{15}\" width=\"8\" height=\"16\" rx=\"4\" fill=\"{16}\" "
      "fill-opacity=\"0.5\"/>"
      "<text x=\"{17}\" y=\"{4}\">interval</text></g>\n",
      px(lx), px(ly), px(lx + 18), px(lx + 22), px(ly + 4), px(lx + 76), px(lx + 84), px(lx + 140),
      px(ly - 4), px(lx + 144), px(ly + 4), px(lx + 136), blue, px(lx + 150), px(lx + 212),
      px(ly - 8), sky, px(lx + 224));
  out += "</svg>\n";
  return out;
}

// Effects found in the new rows alone (revalidate/new_effects.h): each one advises a refit.
HtmlSection new_effects(const Fields& f, const json& doc) {
  HtmlSection s;
  s.heading = "New effects in the new rows";
  const json& e = f.object(doc, "new_effects");
  const std::string p = "new_effects.";
  const json& found = f.list(e, "effects", p);
  const std::string note = f.text(e, "note", p);
  s.intro = fmt::format(
      "Outliers, level shifts and temporary changes searched for in the {} tested new row{}, from "
      "the deployed model's errors, at the critical |statistic| {} ({}). {}",
      f.integer(e, "tested_rows", p), f.integer(e, "tested_rows", p) == 1 ? "" : "s",
      short_num(f.number(e, "critical", p)), f.text(e, "critical_rule", p),
      found.empty() ? (note.empty() ? "None was found." : note)
                    : fmt::format("{} found; each is a reason to refit.", found.size()));
  if (found.empty()) return s;
  HtmlTable t;
  t.caption = "Effects found after the training rows";
  t.columns = {{"Type", "", NumberFormat::automatic, 0},
               {"Time", "", NumberFormat::automatic, 0},
               {"Row", "", NumberFormat::automatic, 0},
               {"Size", "target units", NumberFormat::automatic, 3},
               {"Std. error", "", NumberFormat::automatic, 3},
               {"Statistic", "", NumberFormat::automatic, 2},
               {"Could also be", "", NumberFormat::automatic, 0}};
  for (size_t i = 0; i < found.size(); ++i) {
    const std::string ep = fmt::format("{}effects[{}].", p, i);
    std::string also;
    for (const auto& a : f.texts(found[i], "ambiguous_with", ep))
      also += (also.empty() ? "" : ", ") + a;
    t.rows.push_back({text(f.text(found[i], "type", ep)), text(f.text(found[i], "time", ep)),
                      whole(f.integer(found[i], "row", ep)), num(f.number(found[i], "size", ep)),
                      num(f.number(found[i], "std_error", ep)),
                      num(f.number(found[i], "statistic", ep)), text(also.empty() ? "-" : also)});
  }
  s.blocks.push_back(std::move(t));
  return s;
}

std::vector<HtmlSection> revalidation_sections(const json& doc, const std::string& file) {
  const Fields f{file};
  if (!doc.is_object()) f.fail("(top level)", "is not an object");
  std::vector<HtmlSection> out;
  out.push_back(verdict(f, doc));
  if (doc.contains("performance")) out.push_back(performance(f, doc));
  if (doc.contains("drift")) out.push_back(drift(f, doc));
  if (doc.contains("residuals")) out.push_back(residuals(f, doc));
  if (doc.contains("new_effects") && doc["new_effects"].is_object() &&
      doc["new_effects"].value("run", false))
    out.push_back(new_effects(f, doc));
  if (doc.contains("challengers")) out.push_back(challengers(f, doc));
  return out;
}

}  // namespace lagsieve
