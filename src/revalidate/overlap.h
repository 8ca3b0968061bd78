#pragma once
// Lining a later data file up with the training rows a model file holds (TrainingRows), so a
// re-validation can take any file that overlaps them: the whole history again, or a rolling
// extract that starts after the training start.
//
// The file's first time stamp is looked up among the training stamps (or the training start
// among the file's, when the file starts earlier; the earlier rows are left out). From there on
// every overlapping row must carry the same stamp (else a row was added or removed: refused) and
// the same values in the target and in every input the training rows hold. Two differences are
// not revisions:
//  - a value that was missing at training (a ragged edge, or a gap left out of the likelihood)
//    and is in the file now: a late value, used as data;
//  - a value that was filled by interpolation at training: the file may now hold the observed
//    value, which replaces the interpolation.
// Anything else is a revision, named with its row (1-based, in the file and among the training
// rows), stamp, column, and old and new value.
//
// The merged series is the training rows the file no longer holds, then the file: the deployed
// model, the re-fit and the challengers all see the full history, as if the file had started at
// the training start. Events are regenerated over the merged stamps from the config.
#include <string>
#include <vector>

#include "core/config.h"
#include "core/series.h"
#include "forecast/fitted_model.h"

namespace lagsieve {

struct Revision {
  int file_row = 0;      // 1-based row of the data file (after inserted gaps)
  int training_row = 0;  // 1-based row among the training rows
  std::string time;
  std::string column;
  double old_value = 0.0;  // at training
  double new_value = 0.0;  // in the file (NaN: missing now)
};

// "row 5 of new.csv (training row 125, 1979-05): 'drivers' was 1413 when the model was trained,
// 1420 now".
std::string describe(const Revision& r, const std::string& file);

struct Overlap {
  int first_training_row = 0;  // 1-based training row the file's first kept row lies on
  int dropped_leading = 0;     // file rows before the training start, left out
  int prepended = 0;           // training rows put back in front of the file
  int overlap_rows = 0;        // rows held by both
  int late_values = 0;         // target values missing at training and observed now
  int refilled = 0;            // cells filled at training whose file value differs now
  int revision_count = 0;
  std::vector<Revision> revisions;  // the first few (at most 5), in row order
  SeriesData merged;                // the prepended training rows, then the file's rows
};

// Throws InputError naming the file when the file's stamps do not meet the training stamps, a
// stamp in the overlap differs from the training row's (a row added or removed), an input the
// training rows hold is not in the data, or an input the training rows lack would need values
// before the file's start.
Overlap line_up(const TrainingRows& training, const SeriesData& data, const RunConfig& config,
                const std::string& file);

}  // namespace lagsieve
