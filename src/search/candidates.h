#pragma once
// The candidate space of a search: which models a config allows, in a fixed order.
#include <optional>
#include <string>
#include <vector>

#include "core/config.h"
#include "core/spec.h"
#include "screen/screen.h"

namespace lagsieve {

// First differenced index inside every likelihood of the search: the largest delay + numerator
// lag the grid allows, so every candidate is scored on the same observations.
int common_start(const RunConfig& config);

// Per-input and noise ranges that define a grid (the config's, or narrowed by the screen).
struct CandidateGrid {
  struct InputRanges {
    std::string name;
    bool optional = false;
    bool allow_in = true;  // false: the screen found nothing and the input is optional
    IntRange delay, numerator, denominator;
  };
  std::vector<InputRanges> inputs;
  IntRange ar, ma, seasonal_ar, seasonal_ma;
  int period = 1;
  std::vector<bool> constant;  // {true}, {false} or {false, true}
  Differencing differencing;
  TargetTransform transform;
  FilterStart filter_start = FilterStart::estimated;  // fit.filter_start
  Estimation estimation = Estimation::ml;              // fit.estimation
};

CandidateGrid full_grid(const RunConfig& config);

// The grid narrowed around the screen's suggestions (guided strategy): delay within one of the
// suggestion, orders up to one above it, noise up to one above the suggested (p, q); an optional
// input without significant cross-correlation is only tried left out. Never widens the config.
CandidateGrid guided_grid(const RunConfig& config, const ScreenResult& screen);

// Every candidate of a grid, in a fixed order (inputs in config order, noise last).
std::vector<ModelSpec> enumerate(const CandidateGrid& grid);
long long grid_size(const CandidateGrid& grid);

// The model the screen suggests, clamped to the config's ranges: the stepwise start.
ModelSpec suggested_spec(const RunConfig& config, const ScreenResult& screen);

// Stepwise moves: one order up or down, one input in or out, inside the full grid.
std::vector<ModelSpec> neighbours(const ModelSpec& spec, const CandidateGrid& grid);

// A stable unique key of a spec (its label).
std::string candidate_key(const ModelSpec& spec);

}  // namespace lagsieve
