#include "revalidate/overlap.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

#include "core/error.h"
#include "data/events.h"

namespace lagsieve {

namespace {

// Equal as read: the same text gives the same double, but a file re-exported with fewer digits
// (15 significant, as spreadsheets write) may differ in the last bits.
bool same_value(double a, double b) {
  if (std::isnan(a) || std::isnan(b)) return std::isnan(a) && std::isnan(b);
  return a == b || std::abs(a - b) <= 1e-12 * std::max(std::abs(a), std::abs(b));
}

std::string value_text(double v) {
  return std::isnan(v) ? std::string("missing") : fmt::format("{}", v);
}

// Row of the file where the training rows start (>= 0: the file starts earlier by that many
// rows), or minus the training row where the file starts (< 0), or nullopt when neither stamp is
// found.
struct Alignment {
  int dropped = 0;       // file rows before the training start
  int training_row = 0;  // 0-based training row of the file's first kept row
};

Alignment align(const TrainingRows& training, const SeriesData& data, const std::string& file) {
  if (training.time.empty() || data.time.empty() || training.time.front().empty() ||
      data.time.front().empty())
    return {};  // no time column: the file must start where the training data did
  const auto& first = data.time.front();
  const auto in_training = std::find(training.time.begin(), training.time.end(), first);
  if (in_training != training.time.end())
    return {0, static_cast<int>(in_training - training.time.begin())};
  const auto in_file = std::find(data.time.begin(), data.time.end(), training.time.front());
  if (in_file != data.time.end()) return {static_cast<int>(in_file - data.time.begin()), 0};
  throw InputError(fmt::format(
      "{}: its rows ({} to {}) do not overlap the model's training rows ({} to {}); re-validation "
      "needs a file that holds at least the last training row, so the two can be lined up and "
      "checked. Extend the extract back to {}",
      file, data.time.front(), data.time.back(), training.time.front(), training.time.back(),
      training.time.back()));
}

}  // namespace

std::string describe(const Revision& r, const std::string& file) {
  return fmt::format(
      "row {} of {} (training row {}{}): '{}' was {} when the model was trained, {} now",
      r.file_row, file, r.training_row, r.time.empty() ? "" : ", " + r.time, r.column,
      value_text(r.old_value), value_text(r.new_value));
}

Overlap line_up(const TrainingRows& training, const SeriesData& data, const RunConfig& config,
                const std::string& file) {
  const Alignment a = align(training, data, file);
  Overlap out;
  out.dropped_leading = a.dropped;
  out.first_training_row = a.training_row + 1;
  out.prepended = a.training_row;
  const SeriesData kept = a.dropped > 0 ? slice_rows(data, a.dropped, data.rows()) : data;
  const int n_train = training.rows();
  out.overlap_rows = std::min(n_train - a.training_row, kept.rows());

  // Which training column each data column is (-1: not held), the target first.
  std::vector<int> input_column(kept.inputs.size(), -1);
  for (size_t i = 0; i < kept.input_names.size(); ++i)
    for (size_t c = 1; c < training.columns.size(); ++c)
      if (training.columns[c] == kept.input_names[i]) input_column[i] = static_cast<int>(c);
  for (size_t c = 1; c < training.columns.size(); ++c)
    if (kept.input_index(training.columns[c]) < 0)
      throw InputError(fmt::format(
          "{}: input '{}' was part of the data the model was trained on but the config does not "
          "load it; add it back to the config's inputs",
          file, training.columns[c]));

  auto note = [&](int i, const std::string& column, double old_value, double new_value) {
    ++out.revision_count;
    if (out.revisions.size() < 5)
      out.revisions.push_back({i + 1 + a.dropped, a.training_row + i + 1,
                               kept.time.empty() ? "" : kept.time[i], column, old_value,
                               new_value});
  };
  for (int i = 0; i < out.overlap_rows; ++i) {
    const int t = a.training_row + i;
    if (!kept.time.empty() && !training.time[t].empty() && kept.time[i] != training.time[t])
      throw InputError(fmt::format(
          "{}: row {} is stamped '{}' where training row {} was '{}': a row was added or removed "
          "inside the training period; restore the file's rows as they were",
          file, i + 1 + a.dropped, kept.time[i], t + 1, training.time[t]));
    // The target: missing or filled at training is no revision; observed then must match now.
    const double old_y = training.values[0][t];
    if (std::isnan(old_y)) {
      out.late_values += kept.observed(i) ? 1 : 0;
    } else if (training.was_filled(0, t)) {
      out.refilled += same_value(old_y, kept.target[i]) ? 0 : 1;
    } else if (!kept.observed(i) || !same_value(old_y, kept.target[i])) {
      note(i, kept.target_name, old_y, kept.observed(i) ? kept.target[i] : std::nan(""));
    }
    for (size_t k = 0; k < kept.inputs.size(); ++k) {
      const int c = input_column[k];
      if (c < 0) continue;
      const double old_x = training.values[c][t];
      const double new_x = kept.inputs[k][i];
      if (same_value(old_x, new_x)) continue;
      if (training.was_filled(c, t)) {
        ++out.refilled;
        continue;
      }
      note(i, kept.input_names[k], old_x, kept.input_was_filled(k, i) ? std::nan("") : new_x);
    }
  }

  // The merged rows: the training rows before the file's first, then the file's.
  if (a.training_row == 0) {
    out.merged = kept;
    return out;
  }
  const int p = a.training_row;
  SeriesData m = kept;
  auto front = [p](const std::vector<double>& v) {
    return std::vector<double>(v.begin(), v.begin() + p);
  };
  m.time.assign(training.time.begin(), training.time.begin() + p);
  m.time.insert(m.time.end(), kept.time.begin(), kept.time.end());
  m.target = front(training.values[0]);
  m.target.insert(m.target.end(), kept.target.begin(), kept.target.end());
  if (!kept.target_filled.empty() || !training.filled[0].empty()) {
    std::vector<unsigned char> f(static_cast<size_t>(p), 0);
    for (int t = 0; t < p; ++t) f[t] = training.was_filled(0, t) ? 1 : 0;
    for (int i = 0; i < kept.rows(); ++i)
      f.push_back(!kept.target_filled.empty() && kept.target_filled[i]);
    m.target_filled = std::move(f);
  }
  m.input_filled.assign(kept.inputs.size(), {});
  for (size_t k = 0; k < kept.inputs.size(); ++k) {
    const std::string& name = kept.input_names[k];
    const int c = input_column[k];
    if (c >= 0) {
      m.inputs[k] = front(training.values[c]);
      m.inputs[k].insert(m.inputs[k].end(), kept.inputs[k].begin(), kept.inputs[k].end());
      std::vector<unsigned char> f;
      for (int t = 0; t < p; ++t) f.push_back(training.was_filled(c, t) ? 1 : 0);
      for (int i = 0; i < kept.rows(); ++i) f.push_back(kept.input_was_filled(k, i) ? 1 : 0);
      if (std::find(f.begin(), f.end(), 1) != f.end()) m.input_filled[k] = std::move(f);
      continue;
    }
    const auto ic = std::find_if(config.inputs.begin(), config.inputs.end(),
                                 [&](const InputConfig& x) { return x.name == name; });
    if (ic == config.inputs.end() || !ic->is_event)
      throw InputError(fmt::format(
          "{}: input '{}' is not among the training rows the model file holds, so its values "
          "before the file's first row ({}) are unknown; use a file that starts at the training "
          "start ({}), or leave the input out",
          file, name, kept.time.empty() ? "row 1" : kept.time.front(), training.time.front()));
    m.inputs[k] = event_column(*ic, m.time, static_cast<int>(m.time.size()),
                               config.config_file.string(), kept.time_format);
  }
  out.merged = std::move(m);
  return out;
}

}  // namespace lagsieve
