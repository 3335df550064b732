// benchtau: a fast path for the decoupled two-resistor astable, for Monte Carlo draws.
#pragma once

#include <array>
#include <cstddef>
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

// The same cycle for a batch of circuits at once, laid out one array per
// input so that a loop over the lanes runs several draws per instruction.
inline constexpr std::size_t kAstableLanes = 64;
using AstableLane = std::array<double, kAstableLanes>;
struct AstableBatch {
  AstableLane supply_V{}, upper_V{}, r1_ohm{}, r2_ohm{}, on_ohm{}, sat_V{}, drawn_A{}, shunt_S{},
      cap_F{}, delay_s{};
  std::array<bool, kAstableLanes> covered{};  // the circuit is one fast_astable_outputs covers
};

// Puts c's inputs into lane; false (and the lane marked not covered) when
// fast_astable_outputs would decline c for its wiring or values.
bool load_lane(const Circuit& c, AstableBatch& batch, std::size_t lane);

// Each of the first lanes' outputs, as fast_astable_outputs gives them.
// done[i] is false where lane i must go the slow way instead: not covered,
// stopped, or a delay too long for the series this path uses for exp.
struct AstableBatchOutputs {
  std::array<AstableLane, kOutputs> value{};
  std::array<bool, kAstableLanes> done{};
  AstableLane fit_for_path{};  // done before coverage, as 0 or 1: a bool stops the vectoriser
};
void batch_outputs(const AstableBatch& batch, std::size_t lanes, AstableBatchOutputs& out);

}  // namespace benchtau
