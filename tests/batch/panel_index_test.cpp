// Reading a long-format file without holding its cells: the block scan finds the records
// parse_csv finds (quoted line breaks, a byte-order mark, CRLF, blank lines, records cut by a
// block end), each series' rows are read back from their byte spans with their file lines, and
// file names of series never meet, even where case is ignored.
#include <gtest/gtest.h>

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <filesystem>
#include <fstream>
#include <random>
#include <set>

#include "batch/panel_report.h"
#include "core/error.h"
#include "data/panel.h"
#include "io/csv.h"
#include "io/csv_scan.h"

namespace lagsieve {
namespace {

namespace fs = std::filesystem;

fs::path write_file(const std::string& name, const std::string& text) {
  const fs::path file = fs::temp_directory_path() / ("lagsieve_panel_index_" + name);
  std::ofstream(file, std::ios::binary) << text;
  return file;
}

// Awkward on purpose: BOM, CRLF and LF mixed, blank lines, quoted commas, quotes and line breaks.
const std::string kAwkward =
    "\xEF\xBB\xBFk,t,note\r\n"
    "b,1,plain\r\n"
    "a,1,\"two\nlines\"\n"
    "\n"
    "b,2,\"com,ma\"\n"
    "\"a\",2,\"say \"\"hi\"\"\"\r\n"
    "a,3,last";

TEST(CsvScan, FindsTheRecordsParseCsvFindsAtAnyBlockSize) {
  const fs::path file = write_file("awkward.csv", kAwkward);
  const CsvTable whole = parse_csv(kAwkward, file.string());
  for (size_t block : {16u, 17u, 23u, 64u, 1u << 20}) {
    std::vector<std::vector<std::string>> rows;
    std::vector<CsvSpan> spans;
    const CsvScan scan = scan_csv(
        file,
        [&](const CsvScan&, const std::vector<std::string>& cells, const CsvSpan& span) {
          rows.push_back(cells);
          spans.push_back(span);
        },
        block);
    EXPECT_EQ(scan.header, whole.header) << block;
    EXPECT_EQ(rows, whole.rows) << block;
    ASSERT_EQ(spans.size(), whole.lines.size());
    for (size_t r = 0; r < spans.size(); ++r) EXPECT_EQ(spans[r].line, whole.lines[r]) << r;
    EXPECT_EQ(scan.bytes, kAwkward.size());
    // Each record read back from its span alone is the same row, on the same line.
    CsvTable back;
    back.source = file.string();
    back.header = scan.header;
    read_csv_spans(file, spans, back);
    EXPECT_EQ(back.rows, whole.rows) << block;
    EXPECT_EQ(back.lines, whole.lines) << block;
  }
}

TEST(CsvScan, ErrorsNameTheFileLineAsParseCsvDoes) {
  const std::string bad = "k,t\na,1\nb,2,3\n";
  const fs::path file = write_file("bad.csv", bad);
  std::string scan_error, parse_error;
  try {
    scan_csv(file, [](const CsvScan&, const auto&, const CsvSpan&) {}, 16);
  } catch (const InputError& e) {
    scan_error = e.what();
  }
  try {
    parse_csv(bad, file.string());
  } catch (const InputError& e) {
    parse_error = e.what();
  }
  EXPECT_FALSE(scan_error.empty());
  EXPECT_EQ(scan_error, parse_error);
  EXPECT_NE(scan_error.find(":3:"), std::string::npos) << scan_error;
}

TEST(PanelIndex, ReadsEachSeriesAsSplitByKeyDoesFromItsSpans) {
  const fs::path file = write_file("panel.csv", kAwkward);
  const auto indexed = index_panel(file, "k", "data.series_key");
  const auto split = split_by_key(parse_csv(kAwkward, file.string()), "k", "data.series_key");
  ASSERT_EQ(indexed.size(), split.size());
  for (size_t i = 0; i < split.size(); ++i) {
    EXPECT_EQ(indexed[i].key, split[i].key);
    EXPECT_EQ(indexed[i].rows, split[i].table.row_count());
    EXPECT_TRUE(indexed[i].table.rows.empty());  // no cells held
    const CsvTable t = part_table(indexed[i]);
    EXPECT_EQ(t.rows, split[i].table.rows) << indexed[i].key;
    EXPECT_EQ(t.lines, split[i].table.lines) << indexed[i].key;
  }
  // b's rows are lines 2 and 5: two spans; interleaving costs a span per run of rows.
  EXPECT_EQ(indexed[1].spans.size(), 2u);
  // The same data fingerprint as the whole text's.
  EXPECT_EQ(indexed[0].file->scan.fingerprint, "fnv1a64:" + [] {
    std::uint64_t h = 1469598103934665603ULL;
    for (unsigned char c : kAwkward) h = (h ^ c) * 1099511628211ULL;
    return fmt::format("{:016x}", h);
  }());
}

TEST(PanelIndex, RowsOfASortedFileAreOneSpanPerSeries) {
  std::string csv = "zone,t,y\n";
  for (int z = 0; z < 50; ++z)
    for (int t = 0; t < 40; ++t) csv += fmt::format("z{:02d},{},{}\n", z, t, z + t);
  const auto parts = index_panel(write_file("sorted.csv", csv), "zone", "data.series_key");
  ASSERT_EQ(parts.size(), 50u);
  for (const auto& p : parts) {
    EXPECT_EQ(p.spans.size(), 1u) << p.key;
    EXPECT_EQ(p.rows, 40);
  }
}

TEST(PanelIndex, AFileChangedAfterIndexingIsAClearError) {
  const fs::path file = write_file("changing.csv", "k,t,y\na,1,1\na,2,2\nb,1,3\nb,2,4\n");
  const auto parts = index_panel(file, "k", "data.series_key");
  std::ofstream(file, std::ios::binary) << "k,t,y\nb,1,1\nb,2,2\na,1,3\na,2,4\n";
  try {
    part_table(parts[0]);
    FAIL() << "rows of another series were read as a's";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("changed while the run was reading it"),
              std::string::npos)
        << e.what();
  }
}

TEST(PanelIndex, MissingKeyColumnAndEmptyKeyNameTheFileAndLine) {
  const fs::path file = write_file("keys.csv", "zone,t,y\na,1,1\n,2,2\n");
  EXPECT_THROW(index_panel(file, "zones", "data.series_key"), InputError);
  try {
    index_panel(file, "zone", "data.series_key");
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("keys.csv:3:"), std::string::npos) << e.what();
  }
}

TEST(SeriesNames, NeverMeetEvenWhereCaseIsIgnored) {
  const std::vector<std::string> keys = {"North", "north", "a b", "a_b", "a/b", "x", "x~1", "NORTH"};
  const auto names = safe_series_names(keys);
  std::set<std::string> folded;
  for (const auto& n : names) {
    std::string f = n;
    std::transform(f.begin(), f.end(), f.begin(), [](unsigned char c) { return std::tolower(c); });
    EXPECT_TRUE(folded.insert(f).second) << n;
    EXPECT_EQ(n.find('/'), std::string::npos) << n;
  }
  EXPECT_EQ(names[5], "x");    // a safe name that meets no other stays as it is
  EXPECT_EQ(names[3], "a_b");  // "a b" became a_b~hash, so the key a_b keeps its name
  EXPECT_EQ(names, safe_series_names(keys));
}

// Whatever order series finish in, the series kept while running include every final page.
TEST(PageKeeper, KeepsEveryFinalPageInAnyFinishingOrder) {
  std::vector<SeriesSummary> rows;
  std::mt19937 rng(17);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int i = 0; i < 300; ++i) {
    SeriesSummary s;
    s.series = fmt::format("s{:03d}", i);
    s.status = i % 37 == 0 ? SeriesStatus::bad_data : SeriesStatus::ok;
    s.backtest_score = i % 11 == 0 ? 2.0 : u(rng);  // ties among the worst
    s.ljung_box_p = u(rng);
    rows.push_back(s);
  }
  PanelReportOptions options;
  options.worst = 6;
  options.sample = 4;
  std::vector<std::string> keys;
  for (const auto& r : rows) keys.push_back(r.series);
  const auto sample = sample_keys(keys, options.sample);
  const auto pages = series_with_pages(rows, options, &sample);
  EXPECT_GE(pages.size(), 10u);
  EXPECT_LE(pages.size(), 16u);
  for (int trial = 0; trial < 5; ++trial) {
    std::vector<size_t> order(rows.size());
    for (size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::shuffle(order.begin(), order.end(), rng);
    PageKeeper keeper(options, sample);
    std::set<size_t> kept;
    for (size_t i : order)
      if (keeper.keep(rows[i])) kept.insert(i);
    for (size_t p : pages) EXPECT_TRUE(kept.contains(p)) << rows[p].series << " trial " << trial;
    EXPECT_LT(kept.size(), 120u);  // far fewer folders written than series
  }
}

}  // namespace
}  // namespace lagsieve
