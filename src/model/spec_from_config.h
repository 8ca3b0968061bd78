#pragma once
// From the run configuration to model specs: the single model of `fit`, readable labels.
#include <string>

#include "core/config.h"
#include "core/spec.h"

namespace lagsieve {

// The one model a config describes when every range is collapsed to one value. Optional inputs
// are included; `constant: auto` means a constant. Throws InputError naming the key of the first
// range that is not a single value.
ModelSpec single_spec(const RunConfig& config);

// A short readable label, e.g. "temp[b2 s1 r1] + wind[b0] ~ (1,1)(0,1)7 +c".
std::string model_label(const ModelSpec& spec);

// How the transfer-function filters of `spec` start, in a sentence with the number of start
// states counted in k; "" when no input has a denominator.
std::string filter_start_note(const ModelSpec& spec);

}  // namespace lagsieve
