// benchtau: the steady cycle's timing figures alone, for Monte Carlo draws.
#pragma once

#include <limits>

#include "src/core/circuit.h"

namespace benchtau {

// What a tolerance spread reports of one draw: the times and the capacitor's
// turnaround voltages, as predict_cycle gives them (monostable: period,
// frequency and duty are NaN). All NaN when the circuit does not oscillate.
struct CycleTiming {
  bool oscillates = false;
  double high_s = std::numeric_limits<double>::quiet_NaN();
  double low_s = std::numeric_limits<double>::quiet_NaN();
  double period_s = std::numeric_limits<double>::quiet_NaN();
  double frequency_Hz = std::numeric_limits<double>::quiet_NaN();
  double duty = std::numeric_limits<double>::quiet_NaN();
  double cap_max_V = std::numeric_limits<double>::quiet_NaN();
  double cap_min_V = std::numeric_limits<double>::quiet_NaN();
};

// The same cycle as predict_cycle(c), for every kind, control and reset
// wiring, and the same decision whether it oscillates (to within 1e-12
// relative, checked by a test over random circuits), without what a spread
// does not need: the output levels, the stop's reason and the marginal
// check. Each control voltage is worked out once, and each Thevenin sum in
// conductances with one division per branch.
CycleTiming cycle_timing(const Circuit& c);

}  // namespace benchtau
