#pragma once
// Warm starts of a staged search: each candidate starts from the estimates of its nearest fitted
// neighbour (fewest order steps apart), mapped onto its own shape.
#include <optional>
#include <vector>

#include "core/spec.h"
#include "model/params.h"
#include "search/search.h"

namespace lagsieve {

// Order steps between two specs: |delta b| + |delta s| + |delta r| per input in both, 3 for an
// input in one only, |delta| of each noise order, 1 for a different constant.
int spec_distance(const ModelSpec& a, const ModelSpec& b);

// The neighbour's nonlinear estimates (pack_nonlinear order of `from`) on the shape of `to`:
// deltas of the inputs both have and every ARMA polynomial truncated or padded with zeros; the
// linear parameters are zero (the fit concentrates them out).
ModelParams transfer_params(const ModelSpec& to, const ModelSpec& from,
                            const std::vector<double>& nonlinear);

// The start of `spec` from the nearest usable row with estimates (ties: the smaller key), or
// none when no row has any or the spec has no nonlinear parameter.
std::optional<ModelParams> nearest_start(const ModelSpec& spec,
                                         const std::vector<const CandidateRow*>& fitted);

}  // namespace lagsieve
