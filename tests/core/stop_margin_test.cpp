// benchtau: a stopped circuit is marginal when it stops by less than the family's spread.
#include <catch2/catch.hpp>

#include "src/core/stop_margin.h"

using namespace benchtau;

namespace {

// The textbook astable (R1 10k, R2 47k, 100n, 9 V, bipolar typical figures)
// with its control pin driven stiffly to ctl_V.
Circuit driven(double ctl_V) {
  Circuit c;
  c.control = ControlWiring::driven;
  c.v.control_to_V = ctl_V;
  c.v.upper_ohm = 10e3;
  c.v.lower_ohm = 47e3;
  c.v.cap_F = 100e-9;
  return c;
}

}  // namespace

TEST_CASE("a charge that falls just short of a driven upper threshold is marginal") {
  // Charging: the supply through R1 + R2, plus the pins' net 0.4 uA out of the
  // trigger pin (0.5 uA out, 0.1 uA in; typical, from memory) across the same
  // 57 k: 9 V + 22.8 mV (Thevenin, a textbook step).
  const double target_V = 9.0 + 0.4e-6 * 57e3;
  for (double short_V : {0.004, 0.009}) {
    const Circuit c = driven(target_V + short_V);
    const CyclePrediction p = predict_cycle(c);
    REQUIRE(p.stop == Stop::charge_short_of_upper);
    const StopMargin m = stop_margin(c, p);
    CHECK(m.marginal);  // within the comparator's 10 mV offset
    CHECK(m.short_V == Approx(short_V).epsilon(1e-6));
    CHECK(m.deciding_figure == "comparator offset");
    CHECK(m.what == "the charging target falls short of the upper threshold");
  }
  const Circuit far = driven(target_V + 0.011);
  CHECK_FALSE(stop_margin(far, predict_cycle(far)).marginal);
  const Circuit running = driven(target_V - 0.004);
  const CyclePrediction run = predict_cycle(running);
  REQUIRE(run.oscillates);
  CHECK(run.marginal);  // the model's own check, for the circuit that runs
  CHECK_FALSE(stop_margin(running, run).marginal);
}

TEST_CASE("a discharge that stays just above a driven lower threshold is marginal") {
  // Discharging: the discharge pin is the supply through R1 against the
  // switch's 0.05 V behind 5 ohm, then R2 to the node, and the pins' 0.4 uA
  // across R1 || Ron + R2 (Thevenin, a textbook step).
  const double r1 = 10e3, ron = 5.0, r2 = 47e3;
  const double target_V =
      (9.0 * ron + 0.05 * r1) / (r1 + ron) + 0.4e-6 * (r1 * ron / (r1 + ron) + r2);
  const Circuit near = driven(2.0 * (target_V - 0.003));  // lower threshold 3 mV under the target
  const CyclePrediction p = predict_cycle(near);
  REQUIRE(p.stop == Stop::discharge_short_of_lower);
  const StopMargin m = stop_margin(near, p);
  CHECK(m.marginal);
  CHECK(m.short_V == Approx(0.003).epsilon(1e-6));
  CHECK(m.deciding_figure == "comparator offset");
  const Circuit far = driven(2.0 * (target_V - 0.05));
  CHECK_FALSE(stop_margin(far, predict_cycle(far)).marginal);
}

TEST_CASE("an output-resistor astable on a low supply stops within the output level's spread") {
  // A bipolar output's high level, 1.7 V under a 5 V supply, lies below the
  // 3.33 V upper threshold (two thirds of the supply: common practice) by
  // 29 mV, well inside that level's 0.3 V spread from part to part.
  Circuit c;
  c.kind = CircuitKind::astable_output_resistor;
  c.v.supply_V = 5.0;
  c.v.timing_ohm = 10e3;
  c.v.cap_F = 100e-9;
  const CyclePrediction p = predict_cycle(c);
  REQUIRE(p.stop == Stop::charge_short_of_upper);
  const StopMargin m = stop_margin(c, p);
  CHECK(m.marginal);
  CHECK(m.deciding_figure == "output high level");
  // Held in reset is not a threshold margin: never marginal here.
  c.v.supply_V = 0.5;
  const CyclePrediction held = predict_cycle(c);
  REQUIRE(held.stop == Stop::held_in_reset);
  CHECK_FALSE(stop_margin(c, held).marginal);
}
