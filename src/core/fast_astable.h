// benchtau: a fast path for the decoupled two-resistor astable, for Monte Carlo draws.
#pragma once

#include <optional>

#include "src/core/circuit.h"
#include "src/core/spread.h"

namespace benchtau {

// The outputs predict_cycle(c) would give (to within 1e-12 relative, checked
// by a test over random circuits), for the commonest case: a two-resistor
// astable with its control pin decoupled, reset tied to the supply or left
// open, and nothing on the discharge pin but R1 and R2. The same cycle in
// closed form, with few divisions. Returns nothing for any other circuit, and
// for one that would not oscillate, so that predict_cycle decides those.
std::optional<OutputValues> fast_astable_outputs(const Circuit& c);

}  // namespace benchtau
