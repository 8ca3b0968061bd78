#pragma once
// Readable printouts shared by several commands.
#include <string>

#include "cli/common.h"
#include "core/series.h"
#include "model/fit.h"

namespace lagsieve::cli {

// The series named by --series, or the first; InputError listing the choices otherwise.
const SeriesData& pick_series(const LoadedRun& run, const std::string& name);

// The fit summary: status, estimates, criteria, gains, residual checks, warnings.
void print_fit(const FitResult& fit, const SeriesData& data);

}  // namespace lagsieve::cli
