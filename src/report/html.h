#pragma once
// A self-contained HTML page builder for run reports: one file with inline CSS (screen and
// print), inline SVG figures, tables with per-column number formatting and an optional
// click-to-sort behaviour from a small inline script. The page makes no network request: no
// external stylesheet, script, font or image.
//
// The page is plain data (HtmlPage -> sections -> blocks) so the report assembler can fill it
// from run results; render_html() turns it into a string. All text is escaped; HtmlFigure::svg
// is inserted as-is and must come from the svg.h builders.
#include <string>
#include <utility>
#include <variant>
#include <vector>

namespace lagsieve {

enum class NumberFormat {
  automatic,  // about 4 significant digits, no exponent between 1e-4 and 1e9
  fixed,      // exactly `decimals` decimals
  percent,    // share 0..1 shown as percent with `decimals` decimals
  p_value,    // `decimals` decimals; below 10^-decimals shown as "< 0.001"
};

struct TableColumn {
  std::string name;
  std::string unit;                 // shown after the name, e.g. "MWh"; empty for none
  NumberFormat format = NumberFormat::automatic;
  int decimals = 3;
};

// A cell: empty, text, whole number or real number. NaN reals show as an em dash.
using TableValue = std::variant<std::monostate, std::string, long long, double>;

struct HtmlTable {
  std::string caption;
  std::vector<TableColumn> columns;
  std::vector<std::vector<TableValue>> rows;  // short rows are padded with empty cells
  bool sortable = false;                      // header click sorts (numbers numerically)
  std::vector<int> highlighted_rows;          // e.g. the chosen model
  std::string note;                           // small print under the table
};

struct HtmlParagraph {
  std::string text;
};

enum class Tone { neutral, good, warning, bad };
struct HtmlNotice {
  Tone tone = Tone::neutral;
  std::string title;  // e.g. the verdict, in a few words
  std::string text;
};

struct HtmlKeyValues {
  std::vector<std::pair<std::string, std::string>> items;
};

struct HtmlFigure {
  std::string svg;      // a complete <svg> element from svg.h
  std::string caption;
};

struct HtmlFigureRow {  // figures side by side (wrapping on narrow screens)
  std::vector<HtmlFigure> figures;
};

using HtmlBlock =
    std::variant<HtmlParagraph, HtmlNotice, HtmlKeyValues, HtmlTable, HtmlFigure, HtmlFigureRow>;

struct HtmlSection {
  std::string heading;
  std::string intro;
  std::vector<HtmlBlock> blocks;
};

struct HtmlPage {
  std::string title;
  std::string subtitle;                    // e.g. config file and run time
  std::vector<HtmlSection> sections;
  bool table_of_contents = true;
  std::string footer;                      // e.g. "lagsieve 0.1.0"
};

// Cell text as the table shows it.
std::string format_table_value(const TableValue& value, const TableColumn& column);

std::string render_html(const HtmlPage& page);

}  // namespace lagsieve
