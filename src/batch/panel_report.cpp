#include "batch/panel_report.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <iterator>
#include <map>
#include <numeric>
#include <set>

#include "core/names.h"
#include "io/atomic_file.h"
#include "report/html.h"
#include "report/report.h"

namespace lagsieve {
namespace {

// Indices of finished series with a finite value, worst first (larger `worse` = worse).
std::vector<size_t> worst_by(const std::vector<SeriesSummary>& rows, int count,
                             double (*badness)(const SeriesSummary&)) {
  std::vector<size_t> idx;
  for (size_t i = 0; i < rows.size(); ++i)
    if (rows[i].status == SeriesStatus::ok && std::isfinite(badness(rows[i]))) idx.push_back(i);
  std::stable_sort(idx.begin(), idx.end(),
                   [&](size_t a, size_t b) { return badness(rows[a]) > badness(rows[b]); });
  if (static_cast<int>(idx.size()) > count) idx.resize(static_cast<size_t>(count));
  return idx;
}

TableColumn column(std::string name, NumberFormat format = NumberFormat::automatic,
                   int decimals = 3) {
  TableColumn c;
  c.name = std::move(name);
  c.format = format;
  c.decimals = decimals;
  return c;
}

HtmlTable table(std::string caption, std::vector<TableColumn> columns, bool sortable,
                std::string note = "") {
  HtmlTable t;
  t.caption = std::move(caption);
  t.columns = std::move(columns);
  t.sortable = sortable;
  t.note = std::move(note);
  return t;
}

double by_score(const SeriesSummary& s) { return s.backtest_score; }
double by_residuals(const SeriesSummary& s) { return -s.ljung_box_p; }  // smallest p worst

std::string page_of(const SeriesSummary& s, const std::set<size_t>& pages, size_t i) {
  return pages.contains(i) && !s.folder.empty() ? s.folder + "/report.html" : "";
}

}  // namespace

std::vector<std::string> sample_keys(const std::vector<std::string>& keys, int count) {
  std::vector<std::string> out;
  const size_t n = std::min(keys.size(), static_cast<size_t>(std::max(count, 0)));
  for (size_t k = 0; k < n; ++k) out.push_back(keys[k * keys.size() / n]);
  return out;
}

std::vector<size_t> series_with_pages(const std::vector<SeriesSummary>& rows,
                                      const PanelReportOptions& options,
                                      const std::vector<std::string>* sample) {
  std::set<size_t> pages;
  for (size_t i : worst_by(rows, options.worst, by_score)) pages.insert(i);
  for (size_t i : worst_by(rows, options.worst, by_residuals)) pages.insert(i);
  std::vector<std::string> keys;
  if (!sample) {
    for (const auto& r : rows) keys.push_back(r.series);
    keys = sample_keys(keys, options.sample);
  }
  const std::set<std::string> chosen(sample ? sample->begin() : keys.begin(),
                                     sample ? sample->end() : keys.end());
  for (size_t i = 0; i < rows.size(); ++i)
    if (rows[i].status == SeriesStatus::ok && chosen.contains(rows[i].series)) pages.insert(i);
  return {pages.begin(), pages.end()};
}

PageKeeper::PageKeeper(PanelReportOptions options, std::vector<std::string> sample)
    : options_(options), sample_(sample.begin(), sample.end()) {}

bool PageKeeper::enter(std::set<Entry, Worse>& worst, double badness, const std::string& key) {
  if (!std::isfinite(badness) || options_.worst <= 0) return false;
  const auto [it, added] = worst.insert({badness, key});
  if (!added) return true;
  if (static_cast<int>(worst.size()) > options_.worst) {
    const auto last = std::prev(worst.end());
    const bool evicted_self = last == it;
    worst.erase(last);
    return !evicted_self;
  }
  return true;
}

bool PageKeeper::keep(const SeriesSummary& s) {
  if (s.status != SeriesStatus::ok) return false;
  std::lock_guard lock(mutex_);
  const bool a = enter(by_score_, by_score(s), s.series);
  const bool b = enter(by_residuals_, by_residuals(s), s.series);
  return a || b || sample_.contains(s.series);
}

std::vector<std::string> write_panel_report(const std::filesystem::path& folder,
                                            const std::vector<SeriesSummary>& rows,
                                            const RunConfig& config,
                                            const PanelReportOptions& options,
                                            const std::vector<std::string>* sample) {
  const auto with_pages = series_with_pages(rows, options, sample);
  const std::set<size_t> pages(with_pages.begin(), with_pages.end());
  HtmlPage page;
  page.title = fmt::format("Panel report: {} series", rows.size());
  page.subtitle = fmt::format("{} · series key '{}' · target '{}'", config.config_file.string(),
                              config.data.series_key, config.target.columns.front());
  page.footer = "lagsieve";

  // Series by status, and every series that did not finish.
  std::map<std::string, int> counts;
  for (const auto status : {SeriesStatus::ok, SeriesStatus::no_usable_candidate,
                            SeriesStatus::bad_data, SeriesStatus::failed})
    counts[to_string(status)] = 0;
  for (const auto& s : rows) ++counts[to_string(s.status)];
  HtmlSection status{"Series by status", "", {}};
  HtmlKeyValues kv;
  for (const auto& [name, n] : counts) kv.items.emplace_back(name, std::to_string(n));
  status.blocks.push_back(kv);
  HtmlTable failed =
      table("Series without a model", {column("series"), column("status"), column("reason")}, true);
  for (const auto& s : rows)
    if (s.status != SeriesStatus::ok)
      failed.rows.push_back({s.series, std::string(to_string(s.status)), s.reason});
  if (!failed.rows.empty()) status.blocks.push_back(failed);
  page.sections.push_back(status);

  // How many series use each input, and at which delay and orders.
  HtmlSection inputs{"Inputs chosen across series",
                     "Per input: the series whose chosen model includes it, and the distribution of "
                     "its delay b and orders r, s over those series.",
                     {}};
  HtmlTable use =
      table("",
            {column("input"), column("series using it"), column("share", NumberFormat::percent, 0),
             column("delay b"), column("r (denominator)"), column("s (numerator)")},
            false);
  const int finished = counts["ok"];
  for (size_t k = 0; k < config.inputs.size(); ++k) {
    std::map<int, int> b, r, s;
    long long n = 0;
    for (const auto& row : rows)
      if (row.status == SeriesStatus::ok && k < row.inputs.size() && row.inputs[k].included) {
        ++n;
        ++b[row.inputs[k].delay];
        ++r[row.inputs[k].denominator];
        ++s[row.inputs[k].numerator];
      }
    const auto text = [](const std::map<int, int>& m) {
      std::string out;
      for (const auto& [v, c] : m) out += fmt::format("{}{}: {}", out.empty() ? "" : ", ", v, c);
      return out;
    };
    use.rows.push_back({config.inputs[k].name, n,
                        finished > 0 ? static_cast<double>(n) / finished : std::nan(""), text(b),
                        text(r), text(s)});
  }
  inputs.blocks.push_back(use);
  page.sections.push_back(inputs);

  // Accuracy against the best model without inputs.
  int backtested = 0, beats = 0, better = 0, worse = 0;
  for (const auto& s : rows) {
    if (s.status != SeriesStatus::ok || !std::isfinite(s.backtest_score) ||
        !std::isfinite(s.benchmark_score))
      continue;
    ++backtested;
    if (s.beats_benchmark(options.level))
      ++beats;
    else if (s.backtest_score < s.benchmark_score)
      ++better;
    else
      ++worse;
  }
  HtmlSection accuracy{"Accuracy against the no-input benchmark", "", {}};
  if (backtested == 0) {
    accuracy.blocks.push_back(
        HtmlParagraph{"No series was backtested (no `backtest` section, "
                      "or --no-backtest)."});
  } else {
    accuracy.blocks.push_back(HtmlKeyValues{
        {{"series backtested", std::to_string(backtested)},
         {fmt::format("better, significantly (Diebold-Mariano p < {})", options.level),
          std::to_string(beats)},
         {"better, not significantly", std::to_string(better)},
         {"not better", std::to_string(worse)}}});
  }
  page.sections.push_back(accuracy);

  const auto worst_table = [&](const std::string& caption, const std::vector<size_t>& idx) {
    HtmlTable t = table(
        caption,
        {column("series"), column("chosen"), column("backtest " + config.backtest.score),
         column("no-input benchmark"), column("DM p", NumberFormat::p_value),
         column("Ljung-Box p", NumberFormat::p_value), column("page")},
        true, "Pages are in the run folder; only the series listed here and a sample have one.");
    for (size_t i : idx) {
      const auto& s = rows[i];
      t.rows.push_back({s.series, s.chosen, s.backtest_score, s.benchmark_score, s.benchmark_p,
                        s.ljung_box_p, page_of(s, pages, i)});
    }
    return t;
  };
  HtmlSection worst{"Worst series", "", {}};
  if (backtested > 0)
    worst.blocks.push_back(
        worst_table("By backtest score", worst_by(rows, options.worst, by_score)));
  worst.blocks.push_back(worst_table("By residual tests (smallest Ljung-Box p)",
                                     worst_by(rows, options.worst, by_residuals)));
  page.sections.push_back(worst);

  // The other series with a page (the sample spread over the keys), so every page is linked.
  std::set<size_t> listed;
  for (size_t i : worst_by(rows, options.worst, by_score)) listed.insert(i);
  for (size_t i : worst_by(rows, options.worst, by_residuals)) listed.insert(i);
  HtmlTable others = worst_table("A sample of the other series", {});
  for (size_t i : with_pages) {
    if (listed.contains(i)) continue;
    const auto& s = rows[i];
    others.rows.push_back({s.series, s.chosen, s.backtest_score, s.benchmark_score, s.benchmark_p,
                           s.ljung_box_p, page_of(s, pages, i)});
  }
  if (!others.rows.empty()) {
    HtmlSection sampled{"Sample", "", {}};
    sampled.blocks.push_back(others);
    page.sections.push_back(sampled);
  }

  write_file_atomic(folder / "report.html", render_html(page));
  std::vector<std::string> written;
  for (size_t i : with_pages) {
    if (rows[i].folder.empty() || !std::filesystem::is_directory(folder / rows[i].folder)) continue;
    ReportOptions ro;
    ro.write_charts = false;
    ro.folder_name = rows[i].series;
    write_report(folder / rows[i].folder, ro);
    written.push_back(rows[i].series);
  }
  return written;
}

}  // namespace lagsieve
