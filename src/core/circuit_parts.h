// benchtau: internal to src/core: what the full cycle model (circuit_model.cpp) and the
// timing-only one (cycle_timing.cpp) both ask of a circuit's parts.
#pragma once

#include <cmath>

#include "src/core/circuit.h"

namespace benchtau::circuit_detail {

// A resistance that is there: positive and not kOpen.
inline bool present(double ohm) { return ohm > 0.0 && ohm < kOpen; }

// Two resistances in parallel; kOpen is an absent one.
inline double parallel(double a, double b) {
  if (!(a < kOpen)) return b;
  if (!(b < kOpen)) return a;
  return a * b / (a + b);
}

// The circuit has its timing capacitor and the timing resistors its kind needs.
inline bool timing_parts_present(const Circuit& c) {
  const CircuitValues& v = c.v;
  if (!(v.cap_F > 0.0) || !std::isfinite(v.cap_F)) return false;
  switch (c.kind) {
    case CircuitKind::astable_two_resistor:
    case CircuitKind::astable_diode_steered:
      return present(v.upper_ohm) && present(v.lower_ohm);
    case CircuitKind::astable_output_resistor:
    case CircuitKind::monostable:
      return present(v.timing_ohm);
  }
  return false;
}

}  // namespace benchtau::circuit_detail
