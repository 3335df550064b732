// benchtau: the explanations the diagnosis compares, with their priors.
#pragma once

// One explanation is "every part within tolerance"; the others each let one thing go:
//   a part's value off: that part's prior widened to a factor of about 1.5 at one sigma
//     (sigma 0.4 in ln value), centred where its kind usually fails (resistors above their
//     value, capacitors below);
//   a leakage across the timing capacitor: a conductance across it, scored over a range
//     (evidence.h);
//   an unexpected load on a decoupled control pin: a conductance to ground, likewise.
// Each has a prior weight, how often that fault is behind a drifting timer relative to a
// healthy board. They are common practice of repair benches, from memory, not measured rates:
//   resistors that fail mostly go up in value, capacitors mostly lose capacitance;
//   aluminium electrolytics dry out, losing capacitance and growing leakage, with age and heat;
//   tantalum and class-II ceramics (X7R) lose some capacitance with age and bias;
//   carbon-film and high-value (1 M and up) resistors drift upward;
//   film and C0G capacitors and metal-film resistors rarely change;
//   flux or moisture adds a leakage path from a node to ground, on any board.
#include <cstddef>
#include <span>
#include <string>
#include <vector>

#include "fit/circuit_fit.h"
#include "fit/diagnosis.h"
#include "src/core/design.h"

namespace benchtau {

enum class ExplanationKind { all_in_tolerance, part_off, cap_leakage, control_load };

struct Explanation {
  ExplanationKind kind = ExplanationKind::all_in_tolerance;
  std::string ref;            // the part, "C1-leakage", "control-pin-load"; empty for healthy
  std::ptrdiff_t param = -1;  // part_off: the unknown let go
  double weight = 1.0;        // prior weight (healthy: 1)
  FitSpec spec;
  double lo_S = 0.0, hi_S = 0.0;  // a fault path's range of conductance
};

// Every explanation for this design and these unknowns.
std::vector<Explanation> explanations(const Design& design, std::span<const FitParameter> params);

}  // namespace benchtau
