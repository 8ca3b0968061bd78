#include "data/panel.h"

#include <fmt/format.h>

#include <algorithm>
#include <cstdint>
#include <map>

#include "core/error.h"
#include "core/names.h"

namespace lagsieve {

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
    auto& t = parts[it->second].table;
    t.rows.push_back(std::move(table.rows[r]));
    t.lines.push_back(table.lines[r]);
  }
  table.rows.clear();
  table.lines.clear();
  std::vector<PanelPart> sorted;
  sorted.reserve(parts.size());
  for (const auto& [key, i] : index) sorted.push_back(std::move(parts[i]));
  return sorted;
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
  // FNV-1a over the key: stable across runs and platforms.
  std::uint64_t h = 1469598103934665603ULL;
  for (const unsigned char c : key) h = (h ^ c) * 1099511628211ULL;
  return fmt::format("{}{}~{:08x}", out.empty() || out.front() == '.' ? "_" : "", out,
                     static_cast<std::uint32_t>(h ^ (h >> 32)));
}

}  // namespace lagsieve
