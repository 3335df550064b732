// benchtau: the Monte Carlo fast path gives what the circuit model gives.
#include <catch2/catch.hpp>

#include <cmath>

#include "src/core/fast_astable.h"
#include "src/core/random.h"

using namespace benchtau;

namespace {

double between(Xoshiro256& rng, double lo, double hi) { return lo + (hi - lo) * rng.uniform(); }
double log_between(Xoshiro256& rng, double lo, double hi) {
  return std::exp(between(rng, std::log(lo), std::log(hi)));
}

// The textbook board: R1 10 k, R2 47 k, C 100 n, the chip's typical figures.
Circuit classic() {
  Circuit c;
  c.v.upper_ohm = 10e3;
  c.v.lower_ohm = 47e3;
  c.v.cap_F = 100e-9;
  return c;
}

}  // namespace

TEST_CASE("the decoupled two-resistor fast path matches predict_cycle to 1e-12") {
  Xoshiro256 rng(2024, 0);
  std::size_t fast = 0, stopped = 0;
  for (int i = 0; i < 20000; ++i) {
    Circuit c;
    c.v.family = rng.uniform() < 0.5 ? Family::bipolar : Family::cmos;
    c.v.chip = typical_figures(c.v.family);
    c.reset = rng.uniform() < 0.8 ? ResetWiring::supply : ResetWiring::open;
    c.v.supply_V = between(rng, 1.0, 18.0);
    c.v.upper_ohm = log_between(rng, 10.0, 10e6);
    c.v.lower_ohm = log_between(rng, 10.0, 10e6);
    c.v.cap_F = log_between(rng, 100e-12, 1e-2);
    c.v.chip.divider_ohm *= between(rng, 0.8, 1.2);
    c.v.chip.discharge_on_ohm *= between(rng, 0.5, 2.0);
    c.v.chip.discharge_sat_V = between(rng, 0.0, 0.2);
    c.v.chip.threshold_current_A *= between(rng, 0.0, 3.0);
    c.v.chip.trigger_current_A *= between(rng, 0.0, 3.0);
    c.v.chip.propagation_delay_s *= between(rng, 0.0, 10.0);
    if (rng.uniform() < 0.5) c.v.probe_cap_ohm = log_between(rng, 1e5, 1e8);
    if (rng.uniform() < 0.5) c.v.probe_ctl_ohm = log_between(rng, 1e5, 1e8);
    if (rng.uniform() < 0.3) c.v.leak_ohm = log_between(rng, 1e5, 1e9);
    if (rng.uniform() < 0.3) c.v.leak_A = log_between(rng, 1e-9, 1e-5);
    const CyclePrediction p = predict_cycle(c);
    const std::optional<OutputValues> o = fast_astable_outputs(c);
    if (!p.oscillates) {
      ++stopped;
      CHECK_FALSE(o.has_value());  // the model decides every circuit that stops
      continue;
    }
    if (!o) continue;
    ++fast;
    const OutputValues want = outputs_of(p);
    for (std::size_t k = 0; k < kOutputs; ++k) {
      INFO("circuit " << i << ", " << output_key(static_cast<Output>(k)));
      CHECK((*o)[k] == Approx(want[k]).epsilon(1e-12).margin(0.0));
    }
  }
  // Every random circuit that oscillates takes the fast path, and there are
  // many of each kind.
  CHECK(fast == 20000 - stopped);
  CHECK(fast > 10000);
  CHECK(stopped > 1000);
}

TEST_CASE("the fast path declines every other wiring") {
  const Circuit c = classic();
  REQUIRE(fast_astable_outputs(c).has_value());
  Circuit k = c;
  k.control = ControlWiring::load_to_ground;
  k.v.control_ohm = 10e3;
  CHECK_FALSE(fast_astable_outputs(k).has_value());
  k = c;
  k.reset = ResetWiring::cap_node;
  CHECK_FALSE(fast_astable_outputs(k).has_value());
  k = c;
  k.v.load_ohm = 1e3;
  CHECK_FALSE(fast_astable_outputs(k).has_value());
  k = c;
  k.kind = CircuitKind::astable_diode_steered;
  CHECK_FALSE(fast_astable_outputs(k).has_value());
}

TEST_CASE("the batch path gives the scalar fast path's outputs, lane by lane") {
  // Random circuits as above, 64 to a batch; a lane the batch declines must be
  // one that stops, one the fast path does not cover, or one whose delay is
  // beyond the exp series (checked by doing that lane the slow way here).
  Xoshiro256 rng(2025, 0);
  std::size_t done = 0, declined = 0;
  AstableBatch batch;
  AstableBatchOutputs out;
  std::vector<Circuit> circuits(kAstableLanes);
  for (int round = 0; round < 300; ++round) {
    for (std::size_t i = 0; i < kAstableLanes; ++i) {
      Circuit& c = circuits[i];
      c = Circuit{};
      c.v.chip = typical_figures(c.v.family);
      c.v.supply_V = between(rng, 1.0, 18.0);
      c.v.upper_ohm = log_between(rng, 10.0, 10e6);
      c.v.lower_ohm = log_between(rng, 10.0, 10e6);
      c.v.cap_F = log_between(rng, 10e-12, 1e-2);
      c.v.chip.propagation_delay_s *= between(rng, 0.0, 10.0);
      if (rng.uniform() < 0.3) c.v.probe_cap_ohm = log_between(rng, 1e5, 1e8);
      if (rng.uniform() < 0.3) c.v.leak_ohm = log_between(rng, 1e5, 1e9);
      if (rng.uniform() < 0.1) c.control = ControlWiring::load_to_ground;
      c.v.control_ohm = 10e3;
      CHECK(load_lane(c, batch, i) == (c.control == ControlWiring::decoupled));
    }
    batch_outputs(batch, kAstableLanes, out);
    for (std::size_t i = 0; i < kAstableLanes; ++i) {
      const std::optional<OutputValues> scalar = fast_astable_outputs(circuits[i]);
      if (!out.done[i]) {
        ++declined;
        continue;
      }
      ++done;
      REQUIRE(scalar.has_value());
      for (std::size_t k = 0; k < kOutputs; ++k) {
        INFO("round " << round << ", lane " << i << ", " << output_key(static_cast<Output>(k)));
        CHECK(out.value[k][i] == Approx((*scalar)[k]).epsilon(1e-13).margin(0.0));
      }
    }
  }
  // Many lanes of each: the random values reach far past where the exp series holds.
  CHECK(done > 8000);
  CHECK(declined > 1000);
}

TEST_CASE("a batch lane with a long delay or a stopped circuit is declined, not guessed") {
  const Circuit c = classic();
  AstableBatch batch;
  AstableBatchOutputs out;
  REQUIRE(load_lane(c, batch, 0));
  Circuit slow = c;
  slow.v.cap_F = 10e-12;  // tau near 0.1 us: the delay is over 1e-3 of it
  REQUIRE(load_lane(slow, batch, 1));
  Circuit stopped = c;
  stopped.v.leak_ohm = 100.0;  // the leak holds the node below the upper threshold
  REQUIRE(load_lane(stopped, batch, 2));
  batch_outputs(batch, 3, out);
  CHECK(out.done[0]);
  CHECK_FALSE(out.done[1]);
  CHECK(fast_astable_outputs(slow).has_value());  // the scalar path does it with exp
  CHECK_FALSE(out.done[2]);
  CHECK_FALSE(fast_astable_outputs(stopped).has_value());
}
