// benchtau: whether a circuit that stops does so by less than the family's spread.
#pragma once

#include <string_view>

#include "src/core/circuit.h"

namespace benchtau {

// A circuit that does not oscillate, but only by a margin within the
// part-to-part spread of the figure that decides it: on another timer of the
// same family it may run. The mirror of CyclePrediction::marginal, which is
// for circuits that run.
struct StopMargin {
  bool marginal = false;
  double short_V = 0.0;              // by how much the deciding comparison fails (> 0)
  std::string_view deciding_figure;  // e.g. "output high level"
  std::string_view what;             // the comparison, e.g. "the charging target ..."
};

// For the two stops a threshold margin decides (the charge short of the upper
// threshold, the discharge short of the lower one); any other stop (held in
// reset, no timing path, thresholds crossed), or a circuit that runs, is
// never marginal here.
StopMargin stop_margin(const Circuit& circuit, const CyclePrediction& prediction);

}  // namespace benchtau
