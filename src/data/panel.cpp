#include "data/panel.h"

#include <fmt/format.h>

#include <algorithm>
#include <cstdint>
#include <memory>
#include <map>
#include <set>

#include "core/error.h"
#include "core/names.h"

namespace lagsieve {

void name_parts(std::vector<PanelPart>& parts) {
  std::vector<std::string> keys;
  for (const auto& p : parts) keys.push_back(p.key);
  const auto names = safe_series_names(keys);
  for (size_t i = 0; i < parts.size(); ++i) parts[i].name = names[i];
}

std::vector<PanelPart> split_by_key(CsvTable&& table, const std::string& key_column,
                                    const std::string& config_key) {
  const int kc = table.column_index(key_column);
  if (kc < 0) {
    const auto guess = closest_match(key_column, table.header);
    throw InputError(fmt::format("{}: column '{}' ({}) is not in the header{}", table.source,
                                 key_column, config_key,
                                 guess.empty() ? "" : fmt::format("; did you mean '{}'?", guess)));
  }
  std::map<std::string, size_t> index;  // sorted keys -> part
  std::vector<PanelPart> parts;
  for (int r = 0; r < table.row_count(); ++r) {
    const std::string& key = table.rows[r][kc];
    if (key.empty())
      throw InputError(
          fmt::format("{}: {} column '{}' is empty; every row needs the name of its series",
                      table.where(r), config_key, key_column));
    auto [it, added] = index.try_emplace(key, parts.size());
    if (added) {
      PanelPart part;
      part.key = key;
      part.table.source = table.source;
      part.table.header = table.header;
      parts.push_back(std::move(part));
    }
    ++parts[it->second].rows;
    auto& t = parts[it->second].table;
    t.rows.push_back(std::move(table.rows[r]));
    t.lines.push_back(table.lines[r]);
  }
  table.rows.clear();
  table.lines.clear();
  std::vector<PanelPart> sorted;
  sorted.reserve(parts.size());
  for (const auto& [key, i] : index) sorted.push_back(std::move(parts[i]));
  name_parts(sorted);
  return sorted;
}

namespace {

[[noreturn]] void missing_key_column(const std::string& source, const std::vector<std::string>& header,
                                     const std::string& key_column, const std::string& config_key) {
  const auto guess = closest_match(key_column, header);
  throw InputError(fmt::format("{}: column '{}' ({}) is not in the header{}", source, key_column,
                               config_key,
                               guess.empty() ? "" : fmt::format("; did you mean '{}'?", guess)));
}

}  // namespace

std::vector<PanelPart> index_panel(const std::filesystem::path& file, const std::string& key_column,
                                   const std::string& config_key) {
  std::map<std::string, size_t> index;  // sorted keys -> part
  std::vector<PanelPart> parts;
  int kc = -1;
  size_t previous = SIZE_MAX;  // part of the previous row
  const CsvScan scan = scan_csv(file, [&](const CsvScan& so_far, const auto& cells,
                                          const CsvSpan& span) {
    if (kc < 0) {
      kc = static_cast<int>(std::find(so_far.header.begin(), so_far.header.end(), key_column) -
                            so_far.header.begin());
      if (kc >= static_cast<int>(so_far.header.size()))
        missing_key_column(so_far.source, so_far.header, key_column, config_key);
    }
    const std::string& key = cells[static_cast<size_t>(kc)];
    if (key.empty())
      throw InputError(
          fmt::format("{}:{}: {} column '{}' is empty; every row needs the name of its series",
                      so_far.source, span.line, config_key, key_column));
    auto [it, added] = index.try_emplace(key, parts.size());
    if (added) {
      PanelPart part;
      part.key = key;
      parts.push_back(std::move(part));
    }
    PanelPart& part = parts[it->second];
    ++part.rows;
    // Rows that follow each other in the file (blank lines between them included) share a span.
    if (previous == it->second && !part.spans.empty())
      part.spans.back().length = span.offset + span.length - part.spans.back().offset;
    else
      part.spans.push_back(span);
    previous = it->second;
  });
  if (kc < 0 && std::find(scan.header.begin(), scan.header.end(), key_column) == scan.header.end())
    missing_key_column(scan.source, scan.header, key_column, config_key);
  auto shared = std::make_shared<PanelFile>(PanelFile{file, key_column, scan});
  std::vector<PanelPart> sorted;
  sorted.reserve(parts.size());
  for (const auto& [key, i] : index) {
    parts[i].file = shared;
    sorted.push_back(std::move(parts[i]));
  }
  name_parts(sorted);
  return sorted;
}

CsvTable part_table(const PanelPart& part) {
  if (!part.file) return part.table;
  CsvTable t;
  t.source = part.file->scan.source;
  t.header = part.file->scan.header;
  read_csv_spans(part.file->path, part.spans, t);
  const int kc = t.column_index(part.file->key_column);
  bool same = t.row_count() == part.rows && kc >= 0;
  for (int r = 0; same && r < t.row_count(); ++r) same = t.rows[r][kc] == part.key;
  if (!same)
    throw InputError(fmt::format(
        "{}: the file changed while the run was reading it (the rows of series '{}' moved); run "
        "again on a file that stays as it is",
        part.file->path.string(), part.key));
  return t;
}

namespace {

std::uint32_t key_hash(const std::string& key) {
  // FNV-1a over the key: stable across runs and platforms.
  std::uint64_t h = 1469598103934665603ULL;
  for (const unsigned char c : key) h = (h ^ c) * 1099511628211ULL;
  return static_cast<std::uint32_t>(h ^ (h >> 32));
}

std::string folded(const std::string& name) {
  std::string out = name;
  for (char& c : out)
    if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
  return out;
}

}  // namespace

std::vector<std::string> safe_series_names(const std::vector<std::string>& keys) {
  std::vector<std::string> names;
  names.reserve(keys.size());
  std::map<std::string, int> count;
  for (const auto& k : keys) ++count[folded(names.emplace_back(safe_series_name(k)))];
  for (size_t i = 0; i < keys.size(); ++i)
    if (count[folded(names[i])] > 1 && names[i].find('~') == std::string::npos)
      names[i] += fmt::format("~{:08x}", key_hash(keys[i]));
  std::set<std::string> used;
  for (auto& name : names) {
    std::string candidate = name;
    for (int k = 2; !used.insert(folded(candidate)).second; ++k)
      candidate = fmt::format("{}-{}", name, k);
    name = candidate;
  }
  return names;
}

std::string safe_series_name(const std::string& key) {
  constexpr size_t kMaxLength = 80;
  std::string out;
  bool changed = key.empty() || key.front() == '.' || key.size() > kMaxLength;
  for (const char c : key.substr(0, kMaxLength)) {
    const bool keep = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
                      c == '.' || c == '-' || c == '_';
    out += keep ? c : '_';
    changed = changed || !keep;
  }
  if (!changed) return out;
  return fmt::format("{}{}~{:08x}", out.empty() || out.front() == '.' ? "_" : "", out,
                     key_hash(key));
}

}  // namespace lagsieve
