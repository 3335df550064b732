// benchtau: design-rule checks of a timer design at its nominal values.
#pragma once

#include "src/core/circuit.h"
#include "src/core/design.h"
#include "src/core/findings.h"

namespace benchtau {

// The limits the rules use. Each is common practice of the trade, recalled
// from memory rather than taken from one datasheet; the .cpp says why.
struct RuleLimits {
  double discharge_max_A_bipolar = 15e-3;
  double discharge_max_A_cmos = 5e-3;
  double output_max_A_bipolar = 100e-3;
  double output_max_A_cmos = 10e-3;
  double led_max_A = 20e-3;
  double reset_margin_V = 0.5;
  double threshold_share = 0.01;  // threshold input current vs the charging current
  double leakage_share = 0.10;    // capacitor leakage vs the charging current
  double rating_headroom = 0.20;  // a capacitor rated within this of the supply
};

// Every rule that fires, in a fixed order, with stable codes:
//   discharge_current, output_current, led_current, led_unlit, reset_open,
//   reset_margin, threshold_current, cap_leakage, cap_rating_low,
//   cap_rating_close, supply_high, supply_low, marginal, no_oscillation.
// circuit and prediction are the design's nominal ones.
Findings check_design(const Design& design, const Circuit& circuit,
                      const CyclePrediction& prediction, const RuleLimits& limits = {});

}  // namespace benchtau
