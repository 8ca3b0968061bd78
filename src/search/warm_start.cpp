#include "search/warm_start.h"

#include <cstdlib>

#include "model/likelihood.h"

namespace lagsieve {

namespace {

const InputTerm* find_term(const ModelSpec& spec, const std::string& name) {
  for (const auto& t : spec.inputs)
    if (t.name == name) return &t;
  return nullptr;
}

std::vector<double> take(const std::vector<double>& v, size_t& at, int count) {
  std::vector<double> out(v.begin() + static_cast<long>(at),
                          v.begin() + static_cast<long>(at) + count);
  at += static_cast<size_t>(count);
  return out;
}

std::vector<double> resized(std::vector<double> v, int size) {
  v.resize(static_cast<size_t>(size), 0.0);
  return v;
}

}  // namespace

int spec_distance(const ModelSpec& a, const ModelSpec& b) {
  int d = 0;
  for (const auto& t : a.inputs) {
    const InputTerm* u = find_term(b, t.name);
    if (!u) {
      d += 3;
      continue;
    }
    d += std::abs(t.order.delay - u->order.delay) +
         std::abs(t.order.numerator - u->order.numerator) +
         std::abs(t.order.denominator - u->order.denominator);
  }
  for (const auto& u : b.inputs)
    if (!find_term(a, u.name)) d += 3;
  d += std::abs(a.noise.p - b.noise.p) + std::abs(a.noise.q - b.noise.q) +
       std::abs(a.noise.seasonal_p - b.noise.seasonal_p) +
       std::abs(a.noise.seasonal_q - b.noise.seasonal_q);
  d += a.constant != b.constant ? 1 : 0;
  return d;
}

ModelParams transfer_params(const ModelSpec& to, const ModelSpec& from,
                            const std::vector<double>& nonlinear) {
  // Unpack `from` (deltas of each input in spec order, then phi, theta, Phi, Theta).
  size_t at = 0;
  std::vector<std::vector<double>> deltas;
  for (const auto& t : from.inputs) deltas.push_back(take(nonlinear, at, t.order.denominator));
  const auto phi = take(nonlinear, at, from.noise.p);
  const auto theta = take(nonlinear, at, from.noise.q);
  const auto sphi = take(nonlinear, at, from.noise.seasonal_p);
  const auto stheta = take(nonlinear, at, from.noise.seasonal_q);

  ModelParams p = zero_params(to);
  for (size_t i = 0; i < to.inputs.size(); ++i)
    for (size_t k = 0; k < from.inputs.size(); ++k)
      if (from.inputs[k].name == to.inputs[i].name)
        p.inputs[i].delta = resized(deltas[k], to.inputs[i].order.denominator);
  p.phi = resized(phi, to.noise.p);
  p.theta = resized(theta, to.noise.q);
  p.seasonal_phi = resized(sphi, to.noise.seasonal_p);
  p.seasonal_theta = resized(stheta, to.noise.seasonal_q);
  return p;
}

std::optional<ModelParams> nearest_start(const ModelSpec& spec,
                                         const std::vector<const CandidateRow*>& fitted) {
  if (nonlinear_names(spec).empty()) return std::nullopt;
  const CandidateRow* best = nullptr;
  int best_distance = 0;
  for (const CandidateRow* row : fitted) {
    if (row->nonlinear.empty() || !row->rankable()) continue;
    const int d = spec_distance(spec, row->spec);
    if (!best || d < best_distance || (d == best_distance && row->key < best->key)) {
      best = row;
      best_distance = d;
    }
  }
  if (!best) return std::nullopt;
  return transfer_params(spec, best->spec, best->nonlinear);
}

}  // namespace lagsieve
