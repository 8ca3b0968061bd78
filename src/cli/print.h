#pragma once
// Readable printouts shared by several commands.
#include <string>

#include "cli/common.h"
#include "core/series.h"
#include "model/fit.h"
#include "outliers/detect.h"

namespace lagsieve::cli {

// The series named by --series, or the first; InputError listing the choices otherwise.
const SeriesData& pick_series(const LoadedRun& run, const std::string& name);

// The fit summary: status, estimates, criteria, gains, residual checks, warnings.
void print_fit(const FitResult& fit, const SeriesData& data);

// The effects found by outlier detection: size, s.e., statistic, ambiguity, and the rules used.
void print_outliers(const OutlierFit& detected);

}  // namespace lagsieve::cli
