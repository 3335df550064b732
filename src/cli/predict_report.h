// benchtau: the `predict` command's two outputs: a terminal table and JSON.
#pragma once

#include <string>
#include <vector>

#include "src/core/circuit.h"
#include "src/core/design.h"
#include "src/core/findings.h"
#include "src/core/spread.h"

namespace benchtau::cli {

// Everything a prediction report shows. corners and monte_carlo are null when
// they were not worked out (a design that does not oscillate, or no draws).
struct PredictReport {
  const Design& design;
  const CyclePrediction& nominal;
  const std::vector<Variation>& variations;
  const CornerSpread* corners = nullptr;
  const MonteCarlo* monte_carlo = nullptr;
  bool chip_spread = false;
  const Findings& findings;
};

std::string predict_table(const PredictReport& report);

// Schema "benchtau-predict-1", documented in README.md ("JSON from predict").
std::string predict_json(const PredictReport& report);

}  // namespace benchtau::cli
