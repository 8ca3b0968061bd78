#include "search/candidates.h"

#include <algorithm>
#include <functional>

#include "io/config.h"
#include "model/spec_from_config.h"

namespace lagsieve {

int common_start(const RunConfig& config) {
  int start = 0;
  for (const auto& in : config.inputs) start = std::max(start, in.delay.max + in.numerator.max);
  return start;
}

CandidateGrid full_grid(const RunConfig& config) {
  CandidateGrid g;
  for (const auto& in : config.inputs)
    g.inputs.push_back({in.name, in.optional, true, in.delay, in.numerator, in.denominator});
  g.ar = config.noise.ar;
  g.ma = config.noise.ma;
  g.seasonal_ar = config.noise.seasonal_ar;
  g.seasonal_ma = config.noise.seasonal_ma;
  g.period = config.noise.period;
  switch (config.noise.constant) {
    case ConstantMode::yes:
      g.constant = {true};
      break;
    case ConstantMode::no:
      g.constant = {false};
      break;
    case ConstantMode::automatic:
      g.constant = {false, true};
      break;
  }
  g.differencing = config.differencing;
  g.transform = config.target.transform;
  g.filter_start = config.fit.filter_start;
  g.estimation = config.fit.estimation;
  return g;
}

namespace {

IntRange around(const IntRange& range, int lo, int hi) {
  IntRange r{std::max(range.min, lo), std::min(range.max, hi)};
  if (r.min > r.max)
    r = {std::clamp(lo, range.min, range.max), std::clamp(lo, range.min, range.max)};
  return r;
}

const InputScreen* find_screen(const ScreenResult& screen, const std::string& name) {
  for (const auto& s : screen.inputs)
    if (s.name == name) return &s;
  return nullptr;
}

}  // namespace

CandidateGrid guided_grid(const RunConfig& config, const ScreenResult& screen) {
  CandidateGrid g = full_grid(config);
  for (auto& in : g.inputs) {
    const InputScreen* s = find_screen(screen, in.name);
    if (!s) continue;
    if (!s->relevant && in.optional) {
      in.allow_in = false;
      continue;
    }
    in.delay = around(in.delay, s->suggested_delay - 1, s->suggested_delay + 1);
    in.numerator = around(in.numerator, 0, s->suggested_numerator + 1);
    in.denominator = around(in.denominator, 0, s->suggested_denominator + 1);
  }
  g.ar = around(g.ar, 0, screen.noise.p + 1);
  g.ma = around(g.ma, 0, screen.noise.q + 1);
  return g;
}

std::vector<ModelSpec> enumerate(const CandidateGrid& grid) {
  std::vector<ModelSpec> out;
  ModelSpec base;
  base.differencing = grid.differencing;
  base.transform = grid.transform;
  base.filter_start = grid.filter_start;
  base.estimation = grid.estimation;
  base.noise.period = grid.period;
  std::function<void(size_t, ModelSpec&)> recurse = [&](size_t i, ModelSpec& spec) {
    if (i == grid.inputs.size()) {
      for (int p = grid.ar.min; p <= grid.ar.max; ++p)
        for (int q = grid.ma.min; q <= grid.ma.max; ++q)
          for (int sp = grid.seasonal_ar.min; sp <= grid.seasonal_ar.max; ++sp)
            for (int sq = grid.seasonal_ma.min; sq <= grid.seasonal_ma.max; ++sq)
              for (bool c : grid.constant) {
                ModelSpec m = spec;
                m.noise = {p, q, sp, sq, grid.period};
                m.constant = c;
                out.push_back(std::move(m));
              }
      return;
    }
    const auto& in = grid.inputs[i];
    if (in.optional) recurse(i + 1, spec);
    if (!in.allow_in) return;
    for (int b = in.delay.min; b <= in.delay.max; ++b)
      for (int s = in.numerator.min; s <= in.numerator.max; ++s)
        for (int r = in.denominator.min; r <= in.denominator.max; ++r) {
          spec.inputs.push_back({in.name, {b, s, r}});
          recurse(i + 1, spec);
          spec.inputs.pop_back();
        }
  };
  recurse(0, base);
  return out;
}

long long grid_size(const CandidateGrid& grid) {
  auto span = [](const IntRange& r) { return static_cast<long long>(r.max) - r.min + 1; };
  long long n = static_cast<long long>(grid.constant.size());
  for (const IntRange* r : {&grid.ar, &grid.ma, &grid.seasonal_ar, &grid.seasonal_ma})
    n = saturating_product(n, span(*r));
  for (const auto& in : grid.inputs)
    n = saturating_product(
        n, (in.optional ? 1 : 0) +
               (in.allow_in ? span(in.delay) * span(in.numerator) * span(in.denominator) : 0));
  return n;
}

ModelSpec suggested_spec(const RunConfig& config, const ScreenResult& screen) {
  const CandidateGrid g = full_grid(config);
  ModelSpec spec;
  spec.differencing = g.differencing;
  spec.transform = g.transform;
  spec.filter_start = g.filter_start;
  spec.estimation = g.estimation;
  for (const auto& in : g.inputs) {
    const InputScreen* s = find_screen(screen, in.name);
    if (in.optional && s && !s->relevant) continue;
    InputOrder o;
    o.delay = std::clamp(s ? s->suggested_delay : in.delay.min, in.delay.min, in.delay.max);
    o.numerator = std::clamp(s ? s->suggested_numerator : 0, in.numerator.min, in.numerator.max);
    o.denominator =
        std::clamp(s ? s->suggested_denominator : 0, in.denominator.min, in.denominator.max);
    spec.inputs.push_back({in.name, o});
  }
  spec.noise = {std::clamp(screen.noise.p, g.ar.min, g.ar.max),
                std::clamp(screen.noise.q, g.ma.min, g.ma.max), g.seasonal_ar.min,
                g.seasonal_ma.min, g.period};
  spec.constant = g.constant.back();
  return spec;
}

std::vector<ModelSpec> neighbours(const ModelSpec& spec, const CandidateGrid& grid) {
  std::vector<ModelSpec> out;
  auto in_range = [](int v, const IntRange& r) { return v >= r.min && v <= r.max; };
  // Rebuild in config order so keys stay canonical.
  auto with_inputs = [&](const std::vector<std::optional<InputOrder>>& orders) {
    ModelSpec m = spec;
    m.inputs.clear();
    for (size_t i = 0; i < grid.inputs.size(); ++i)
      if (orders[i]) m.inputs.push_back({grid.inputs[i].name, *orders[i]});
    return m;
  };
  std::vector<std::optional<InputOrder>> current(grid.inputs.size());
  for (const auto& term : spec.inputs)
    for (size_t i = 0; i < grid.inputs.size(); ++i)
      if (grid.inputs[i].name == term.name) current[i] = term.order;
  for (size_t i = 0; i < grid.inputs.size(); ++i) {
    const auto& g = grid.inputs[i];
    auto orders = current;
    if (current[i]) {
      if (g.optional) {
        orders[i].reset();
        out.push_back(with_inputs(orders));
      }
      for (int step : {-1, 1}) {
        for (int field = 0; field < 3; ++field) {
          InputOrder o = *current[i];
          int& v = field == 0 ? o.delay : field == 1 ? o.numerator : o.denominator;
          const IntRange& r = field == 0 ? g.delay : field == 1 ? g.numerator : g.denominator;
          v += step;
          if (!in_range(v, r)) continue;
          orders = current;
          orders[i] = o;
          out.push_back(with_inputs(orders));
        }
      }
    } else if (g.allow_in) {
      orders[i] = InputOrder{g.delay.min, g.numerator.min, g.denominator.min};
      out.push_back(with_inputs(orders));
    }
  }
  for (int step : {-1, 1}) {
    const std::pair<int NoiseOrder::*, const IntRange*> fields[] = {
        {&NoiseOrder::p, &grid.ar},
        {&NoiseOrder::q, &grid.ma},
        {&NoiseOrder::seasonal_p, &grid.seasonal_ar},
        {&NoiseOrder::seasonal_q, &grid.seasonal_ma}};
    for (const auto& [member, range] : fields) {
      ModelSpec m = spec;
      m.noise.*member += step;
      if (in_range(m.noise.*member, *range)) out.push_back(std::move(m));
    }
  }
  if (grid.constant.size() > 1) {
    ModelSpec m = spec;
    m.constant = !m.constant;
    out.push_back(std::move(m));
  }
  return out;
}

std::string candidate_key(const ModelSpec& spec) { return model_label(spec); }

}  // namespace lagsieve
