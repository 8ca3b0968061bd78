#include "report/html.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <iterator>

#include "report/svg.h"

namespace lagsieve {
namespace {

// Prints well: no backgrounds needed for meaning, sections kept whole, navigation hidden.
constexpr std::string_view kCss = R"(
:root { --ink: #1a1a1a; --muted: #5a5a5a; --rule: #d6d6d6; --accent: #0072B2; }
* { box-sizing: border-box; }
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif;
       color: var(--ink); background: #ffffff; max-width: 1120px; margin: 0 auto; padding: 24px 28px;
       line-height: 1.45; font-size: 15px; }
header h1 { font-size: 1.65em; margin: 0 0 4px; }
header .subtitle { color: var(--muted); margin: 0; }
nav.toc { margin: 16px 0 0; font-size: 0.92em; }
nav.toc ol { margin: 4px 0; padding-left: 1.4em; columns: 2; }
nav.toc a { color: var(--accent); text-decoration: none; }
section { margin-top: 28px; padding-top: 10px; border-top: 1px solid var(--rule); }
section h2 { font-size: 1.25em; margin: 4px 0 8px; }
p.intro { color: var(--muted); margin: 0 0 10px; }
table { border-collapse: collapse; margin: 8px 0 4px; font-size: 0.9em; }
caption { text-align: left; font-weight: 600; padding-bottom: 4px; }
th, td { padding: 4px 10px; border-bottom: 1px solid var(--rule); text-align: left; vertical-align: top; }
thead th { border-bottom: 2px solid var(--ink); white-space: nowrap; }
th .unit { color: var(--muted); font-weight: normal; }
td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; }
tr.highlight td { background: #e8f1f8; font-weight: 600; }
table.sortable thead th { cursor: pointer; }
table.sortable thead th[aria-sort="ascending"]::after { content: " \25B2"; font-size: 0.75em; }
table.sortable thead th[aria-sort="descending"]::after { content: " \25BC"; font-size: 0.75em; }
p.table-note { color: var(--muted); font-size: 0.85em; margin: 2px 0 12px; }
.table-wrap { overflow-x: auto; }
figure { margin: 12px 0; }
figcaption { color: var(--muted); font-size: 0.88em; margin-top: 4px; }
figure svg { max-width: 100%; height: auto; display: block; }
.figure-row { display: flex; flex-wrap: wrap; gap: 18px; }
.figure-row figure { flex: 1 1 440px; min-width: 0; }
.notice { border-left: 5px solid var(--rule); background: #f6f6f6; padding: 8px 14px; margin: 10px 0; }
.notice strong { display: block; }
.tone-neutral { border-left-color: #56B4E9; }
.tone-good { border-left-color: #009E73; }
.tone-warning { border-left-color: #E69F00; }
.tone-bad { border-left-color: #D55E00; }
dl.kv { display: grid; grid-template-columns: max-content 1fr; gap: 2px 18px; margin: 8px 0; }
dl.kv dt { color: var(--muted); }
dl.kv dd { margin: 0; }
footer { margin-top: 32px; color: var(--muted); font-size: 0.85em; border-top: 1px solid var(--rule); padding-top: 8px; }
@media print {
  body { max-width: none; padding: 0; font-size: 10pt; }
  nav.toc { display: none; }
  section { break-inside: auto; border-top: none; }
  section h2 { break-after: avoid; }
  figure, table, .notice, dl.kv { break-inside: avoid; }
  table.sortable thead th::after { content: none !important; }
  tr.highlight td { background: none; }
  .table-wrap { overflow: visible; }
  a { color: inherit; text-decoration: none; }
}
)";

// Click (or Enter/Space) on a header sorts the body rows; cells with data-sort compare as numbers,
// NaN last in either direction; others compare as text.
constexpr std::string_view kSortScript = R"(
(function () {
  function cellKey(cell) {
    var raw = cell ? cell.getAttribute('data-sort') : null;
    if (raw !== null) return { num: true, v: parseFloat(raw) };
    return { num: false, v: cell ? cell.textContent.trim().toLowerCase() : '' };
  }
  function sortBy(table, heads, th, col) {
    var ascending = th.getAttribute('aria-sort') !== 'ascending';
    Array.prototype.forEach.call(heads, function (h) { h.removeAttribute('aria-sort'); });
    th.setAttribute('aria-sort', ascending ? 'ascending' : 'descending');
    var body = table.tBodies[0];
    var rows = Array.prototype.slice.call(body.rows);
    rows.sort(function (r1, r2) {
      var a = cellKey(r1.cells[col]);
      var b = cellKey(r2.cells[col]);
      if (a.num && b.num) {
        var aNaN = isNaN(a.v);
        var bNaN = isNaN(b.v);
        if (aNaN || bNaN) return aNaN === bNaN ? 0 : (aNaN ? 1 : -1);
        return ascending ? a.v - b.v : b.v - a.v;
      }
      var c = String(a.v).localeCompare(String(b.v));
      return ascending ? c : -c;
    });
    rows.forEach(function (r) { body.appendChild(r); });
  }
  Array.prototype.forEach.call(document.querySelectorAll('table.sortable'), function (table) {
    if (!table.tHead || !table.tBodies.length) return;
    var heads = table.tHead.rows[0].cells;
    Array.prototype.forEach.call(heads, function (th, col) {
      th.tabIndex = 0;
      th.addEventListener('click', function () { sortBy(table, heads, th, col); });
      th.addEventListener('keydown', function (e) {
        if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); sortBy(table, heads, th, col); }
      });
    });
  });
})();
)";

std::string_view tone_class(Tone t) {
  switch (t) {
    case Tone::good: return "tone-good";
    case Tone::warning: return "tone-warning";
    case Tone::bad: return "tone-bad";
    case Tone::neutral: break;
  }
  return "tone-neutral";
}

std::string format_automatic(double v) {
  if (v == 0.0) return "0";
  const double a = std::fabs(v);
  if (a < 1e-4 || a >= 1e9) return fmt::format("{:.3e}", v);
  const int magnitude = static_cast<int>(std::floor(std::log10(a)));
  const int decimals = std::clamp(3 - magnitude, 0, 6);
  return fmt::format("{:.{}f}", v, decimals);
}

bool is_numeric(const TableValue& v) {
  return std::holds_alternative<double>(v) || std::holds_alternative<long long>(v);
}

struct Writer {
  std::string out;
  template <typename... Args>
  void put(fmt::format_string<Args...> f, Args&&... args) {
    fmt::format_to(std::back_inserter(out), f, std::forward<Args>(args)...);
  }
};

void write_table(Writer& w, const HtmlTable& t) {
  // A column is right-aligned when every non-empty cell in it is a number.
  std::vector<bool> numeric(t.columns.size(), true);
  for (const auto& row : t.rows)
    for (size_t c = 0; c < t.columns.size() && c < row.size(); ++c)
      if (!std::holds_alternative<std::monostate>(row[c]) && !is_numeric(row[c]))
        numeric[c] = false;
  w.put("<div class=\"table-wrap\">\n<table{}>\n", t.sortable ? " class=\"sortable\"" : "");
  if (!t.caption.empty()) w.put("<caption>{}</caption>\n", escape_markup(t.caption));
  w.out += "<thead><tr>";
  for (size_t c = 0; c < t.columns.size(); ++c) {
    const TableColumn& col = t.columns[c];
    w.put("<th scope=\"col\"{}>{}", numeric[c] ? " class=\"num\"" : "", escape_markup(col.name));
    if (!col.unit.empty()) w.put(" <span class=\"unit\">({})</span>", escape_markup(col.unit));
    w.out += "</th>";
  }
  w.out += "</tr></thead>\n<tbody>\n";
  for (size_t r = 0; r < t.rows.size(); ++r) {
    const bool hi = std::find(t.highlighted_rows.begin(), t.highlighted_rows.end(),
                              static_cast<int>(r)) != t.highlighted_rows.end();
    w.out += hi ? "<tr class=\"highlight\">" : "<tr>";
    for (size_t c = 0; c < t.columns.size(); ++c) {
      const TableValue v = c < t.rows[r].size() ? t.rows[r][c] : TableValue{};
      std::string sort_key;
      if (const double* d = std::get_if<double>(&v)) sort_key = format_exact(*d);
      if (const long long* i = std::get_if<long long>(&v)) sort_key = std::to_string(*i);
      if (numeric[c] && std::holds_alternative<std::monostate>(v)) sort_key = "NaN";
      w.put("<td{}{}>{}</td>", numeric[c] ? " class=\"num\"" : "",
            sort_key.empty() ? "" : fmt::format(" data-sort=\"{}\"", sort_key),
            escape_markup(format_table_value(v, t.columns[c])));
    }
    w.out += "</tr>\n";
  }
  w.out += "</tbody>\n</table>\n</div>\n";
  if (!t.note.empty()) w.put("<p class=\"table-note\">{}</p>\n", escape_markup(t.note));
}

void write_figure(Writer& w, const HtmlFigure& f) {
  w.out += "<figure>\n";
  w.out += f.svg;
  if (!f.svg.empty() && f.svg.back() != '\n') w.out += '\n';
  if (!f.caption.empty()) w.put("<figcaption>{}</figcaption>\n", escape_markup(f.caption));
  w.out += "</figure>\n";
}

void write_block(Writer& w, const HtmlBlock& block) {
  if (const auto* p = std::get_if<HtmlParagraph>(&block)) {
    w.put("<p>{}</p>\n", escape_markup(p->text));
  } else if (const auto* n = std::get_if<HtmlNotice>(&block)) {
    w.put("<div class=\"notice {}\">", tone_class(n->tone));
    if (!n->title.empty()) w.put("<strong>{}</strong>", escape_markup(n->title));
    if (!n->text.empty()) w.put("<span>{}</span>", escape_markup(n->text));
    w.out += "</div>\n";
  } else if (const auto* kv = std::get_if<HtmlKeyValues>(&block)) {
    w.out += "<dl class=\"kv\">\n";
    for (const auto& [k, v] : kv->items)
      w.put("<dt>{}</dt><dd>{}</dd>\n", escape_markup(k), escape_markup(v));
    w.out += "</dl>\n";
  } else if (const auto* t = std::get_if<HtmlTable>(&block)) {
    write_table(w, *t);
  } else if (const auto* f = std::get_if<HtmlFigure>(&block)) {
    write_figure(w, *f);
  } else if (const auto* row = std::get_if<HtmlFigureRow>(&block)) {
    w.out += "<div class=\"figure-row\">\n";
    for (const HtmlFigure& fig : row->figures) write_figure(w, fig);
    w.out += "</div>\n";
  }
}

}  // namespace

std::string format_table_value(const TableValue& value, const TableColumn& column) {
  if (std::holds_alternative<std::monostate>(value)) return "";
  if (const auto* s = std::get_if<std::string>(&value)) return *s;
  if (const auto* i = std::get_if<long long>(&value)) return std::to_string(*i);
  const double v = std::get<double>(value);
  if (std::isnan(v)) return "\u2014";  // em dash
  if (std::isinf(v)) return v > 0 ? "\u221e" : "\u2212\u221e";
  const int decimals = std::clamp(column.decimals, 0, 12);
  switch (column.format) {
    case NumberFormat::fixed: return fmt::format("{:.{}f}", v, decimals);
    case NumberFormat::percent: return fmt::format("{:.{}f}%", 100.0 * v, decimals);
    case NumberFormat::p_value: {
      const double floor = std::pow(10.0, -decimals);
      if (v < floor) return fmt::format("< {:.{}f}", floor, decimals);
      return fmt::format("{:.{}f}", v, decimals);
    }
    case NumberFormat::automatic: break;
  }
  return format_automatic(v);
}

std::string render_html(const HtmlPage& page) {
  Writer w;
  bool any_sortable = false;
  for (const HtmlSection& s : page.sections)
    for (const HtmlBlock& b : s.blocks)
      if (const auto* t = std::get_if<HtmlTable>(&b); t && t->sortable) any_sortable = true;

  w.out += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n";
  w.out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n";
  w.put("<title>{}</title>\n<style>{}</style>\n</head>\n<body>\n", escape_markup(page.title), kCss);
  w.put("<header>\n<h1>{}</h1>\n", escape_markup(page.title));
  if (!page.subtitle.empty()) w.put("<p class=\"subtitle\">{}</p>\n", escape_markup(page.subtitle));
  if (page.table_of_contents && page.sections.size() > 1) {
    w.out += "<nav class=\"toc\" aria-label=\"Contents\"><ol>\n";
    for (size_t i = 0; i < page.sections.size(); ++i)
      w.put("<li><a href=\"#section-{}\">{}</a></li>\n", i + 1,
            escape_markup(page.sections[i].heading));
    w.out += "</ol></nav>\n";
  }
  w.out += "</header>\n<main>\n";
  for (size_t i = 0; i < page.sections.size(); ++i) {
    const HtmlSection& s = page.sections[i];
    w.put("<section id=\"section-{}\">\n<h2>{}</h2>\n", i + 1, escape_markup(s.heading));
    if (!s.intro.empty()) w.put("<p class=\"intro\">{}</p>\n", escape_markup(s.intro));
    for (const HtmlBlock& b : s.blocks) write_block(w, b);
    w.out += "</section>\n";
  }
  w.out += "</main>\n";
  if (!page.footer.empty()) w.put("<footer>{}</footer>\n", escape_markup(page.footer));
  if (any_sortable) w.put("<script>{}</script>\n", kSortScript);
  w.out += "</body>\n</html>\n";
  return w.out;
}

}  // namespace lagsieve
