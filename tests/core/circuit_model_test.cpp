// benchtau: the circuit models against textbook relations and facts of the trade.
#include <catch2/catch.hpp>

#include <cmath>

#include "src/core/circuit.h"

using namespace benchtau;

namespace {

// A chip with none of the second-order figures, so the textbook relations hold exactly.
TimerFigures ideal_chip() {
  TimerFigures f = typical_figures(Family::bipolar);
  f.discharge_on_ohm = 1e-9;
  f.discharge_sat_V = 0.0;
  f.threshold_current_A = 0.0;
  f.trigger_current_A = 0.0;
  f.propagation_delay_s = 0.0;
  return f;
}

Circuit two_resistor(double r1, double r2, double c, double supply = 9.0) {
  Circuit k;
  k.kind = CircuitKind::astable_two_resistor;
  k.v.supply_V = supply;
  k.v.upper_ohm = r1;
  k.v.lower_ohm = r2;
  k.v.cap_F = c;
  k.v.chip = ideal_chip();
  return k;
}

}  // namespace

TEST_CASE("two-resistor astable: the textbook relations") {
  // t_high = ln 2 (R1 + R2) C, t_low = ln 2 R2 C: P. Horowitz and W. Hill, The
  // Art of Electronics, 3rd ed., 2015, section on the 555 (from memory).
  for (double supply : {5.0, 9.0, 15.0}) {
    const CyclePrediction p = predict_cycle(two_resistor(10e3, 47e3, 100e-9, supply));
    REQUIRE(p.oscillates);
    CHECK(p.high_s == Approx(std::log(2.0) * 57e3 * 100e-9).epsilon(1e-9));
    CHECK(p.low_s == Approx(std::log(2.0) * 47e3 * 100e-9).epsilon(1e-9));
    CHECK(p.period_s == Approx(std::log(2.0) * 104e3 * 100e-9).epsilon(1e-9));
    CHECK(p.duty == Approx(57.0 / 104.0).epsilon(1e-9));
    // Three equal divider resistors: the control pin at 2/3 of the supply, the
    // lower threshold at half of that (common practice).
    CHECK(p.ctl_high_V == Approx(2.0 / 3.0 * supply));
    CHECK(p.cap_max_V == Approx(2.0 / 3.0 * supply));
    CHECK(p.cap_min_V == Approx(1.0 / 3.0 * supply));
  }
}

TEST_CASE("monostable: the textbook pulse width ln 3 R C") {
  // Pulse width = ln 3 R C = 1.0986 R C (Horowitz and Hill, from memory).
  Circuit k;
  k.kind = CircuitKind::monostable;
  k.v.timing_ohm = 100e3;
  k.v.cap_F = 1e-6;
  k.v.chip = ideal_chip();
  const CyclePrediction p = predict_cycle(k);
  REQUIRE(p.oscillates);
  CHECK(p.high_s == Approx(std::log(3.0) * 0.1).epsilon(1e-6));
  CHECK(std::isnan(p.period_s));
}

TEST_CASE("one resistor from a rail-to-rail output gives close to 50 % duty") {
  // Common practice: a CMOS timer with R from the output to the capacitor.
  Circuit k;
  k.kind = CircuitKind::astable_output_resistor;
  k.v.family = Family::cmos;
  k.v.chip = typical_figures(Family::cmos);
  k.v.chip.out_source_ohm = k.v.chip.out_sink_ohm = 100.0;
  k.v.supply_V = 5.0;
  k.v.timing_ohm = 100e3;
  k.v.cap_F = 10e-9;
  const CyclePrediction p = predict_cycle(k);
  REQUIRE(p.oscillates);
  CHECK(p.duty == Approx(0.5).margin(0.005));
  // Each phase swings between 1/3 and 2/3 of the rail toward a rail: ln 2 (R + Rout) C.
  CHECK(p.high_s == Approx(std::log(2.0) * 100.1e3 * 10e-9).epsilon(1e-3));
}

TEST_CASE("loading the control pin to ground speeds it up, with 1 k the low time dominates") {
  // Common practice. Loaded with Rx, the control pin sits at 2/3 Vs scaled by
  // Rx / (Rx + 2/3 Rd): lower thresholds, a shorter climb, a faster timer.
  const CyclePrediction free = predict_cycle(two_resistor(10e3, 47e3, 100e-9));
  Circuit k10 = two_resistor(10e3, 47e3, 100e-9);
  k10.control = ControlWiring::load_to_ground;
  k10.v.control_ohm = 10e3;
  Circuit k1 = k10;
  k1.v.control_ohm = 1e3;
  const CyclePrediction p10 = predict_cycle(k10), p1 = predict_cycle(k1);
  REQUIRE(p10.oscillates);
  REQUIRE(p1.oscillates);
  CHECK(p10.period_s < 0.9 * free.period_s);
  CHECK(p1.period_s < 0.6 * free.period_s);
  CHECK(p1.low_s > 3.0 * p1.high_s);
  // The Thevenin divider: Vc = 6 V * 10k / (10k + 3.333k) = 4.5 V.
  CHECK(p10.ctl_high_V == Approx(4.5).epsilon(1e-6));
  // The low time stays ln 2 R2 C whatever the control voltage (the swing is Vc to Vc/2).
  CHECK(p10.low_s == Approx(free.low_s).epsilon(1e-6));
}

TEST_CASE("a resistor from the output to the control pin widens the swing and slows it") {
  // Common practice: the more, the smaller the resistor.
  const CyclePrediction free = predict_cycle(two_resistor(10e3, 47e3, 100e-9));
  double last_period = free.period_s;
  double last_swing = free.cap_max_V - free.cap_min_V;
  for (double rx : {100e3, 22e3, 4.7e3, 1e3}) {
    Circuit k = two_resistor(10e3, 47e3, 100e-9);
    k.control = ControlWiring::feedback_from_output;
    k.v.control_ohm = rx;
    k.v.chip = typical_figures(Family::bipolar);
    const CyclePrediction p = predict_cycle(k);
    INFO("Rx " << rx);
    REQUIRE(p.oscillates);
    CHECK(p.period_s > last_period);
    CHECK(p.cap_max_V - p.cap_min_V > last_swing);
    last_period = p.period_s;
    last_swing = p.cap_max_V - p.cap_min_V;
  }
}

TEST_CASE("a dead short from the output to the control pin stops it") {
  // Common practice. The thresholds then follow the output: the lower one
  // falls to half the output's low level, below where the discharge can pull
  // the capacitor.
  for (Family family : {Family::bipolar, Family::cmos}) {
    Circuit k = two_resistor(10e3, 47e3, 100e-9);
    k.v.chip = typical_figures(family);
    k.v.family = family;
    k.control = ControlWiring::feedback_from_output;
    k.v.control_ohm = 0.0;
    const CyclePrediction p = predict_cycle(k);
    CHECK_FALSE(p.oscillates);
    CHECK(p.stop == Stop::discharge_short_of_lower);
    CHECK(describe_stop(p).rfind("will not oscillate: while discharging", 0) == 0);
  }
}

TEST_CASE("leakage across the capacitor lowers the charging target and shortens both taus") {
  const CyclePrediction clean = predict_cycle(two_resistor(10e3, 47e3, 10e-6));
  Circuit leaky = two_resistor(10e3, 47e3, 10e-6);
  leaky.v.leak_ohm = 1e6;
  const CyclePrediction p = predict_cycle(leaky);
  REQUIRE(p.oscillates);
  // Thevenin with the leak: 9 V * 1M / (1M + 57k) and 57k || 1M.
  CHECK(p.high.target_V == Approx(9.0 * 1e6 / 1.057e6).epsilon(1e-9));
  CHECK(p.high.tau_s == Approx(57e3 * 1e6 / 1.057e6 * 10e-6).epsilon(1e-9));
  CHECK(p.high_s > clean.high_s);  // the charge now aims lower and slows near the top
  CHECK(p.low.tau_s < clean.low.tau_s);
  // Leakage that holds the node below the upper threshold stops it.
  leaky.v.leak_ohm = 100e3;  // target 9 * 100/157 = 5.73 V < 6 V
  const CyclePrediction stopped = predict_cycle(leaky);
  CHECK_FALSE(stopped.oscillates);
  CHECK(stopped.stop == Stop::charge_short_of_upper);
}

TEST_CASE("diode steering lets the duty fall below 50 %") {
  Circuit k = two_resistor(10e3, 47e3, 100e-9);
  k.kind = CircuitKind::astable_diode_steered;
  k.v.diode_vf_V = 0.6;
  k.v.diode_ohm = 10.0;
  const CyclePrediction p = predict_cycle(k);
  REQUIRE(p.oscillates);
  CHECK(p.duty < 0.5);
  // Charging through R1 and the diode toward Vs - Vf (R2 carries next to nothing).
  CHECK(p.high.target_V == Approx(9.0 - 0.6 * 47e3 / (47e3 + 10.0)).epsilon(1e-9));
  CHECK(p.low_s == Approx(std::log(2.0) * 47e3 * 100e-9).epsilon(1e-6));
}

TEST_CASE("reset tied to a loaded control pin, or to the capacitor node") {
  Circuit k = two_resistor(10e3, 47e3, 100e-9);
  k.reset = ResetWiring::control;
  CHECK(predict_cycle(k).oscillates);  // 6 V on reset: fine
  k.control = ControlWiring::load_to_ground;
  k.v.control_ohm = 300.0;  // Vc = 6 * 300 / 3633 = 0.50 V < 0.7 V
  const CyclePrediction held = predict_cycle(k);
  CHECK(held.stop == Stop::held_in_reset);
  CHECK(held.reset_min_V == Approx(6.0 * 300.0 / (300.0 + 10e3 / 3.0)).epsilon(1e-9));
  Circuit c = two_resistor(10e3, 47e3, 100e-9);
  c.reset = ResetWiring::cap_node;
  CHECK(predict_cycle(c).oscillates);  // the node never falls below 3 V
}

TEST_CASE("missing parts and crossed thresholds are reported, never a number") {
  Circuit k = two_resistor(10e3, 47e3, 0.0);
  CHECK(predict_cycle(k).stop == Stop::no_timing_path);
  CHECK(describe_stop(predict_cycle(k)) ==
        "will not oscillate: a timing resistor or the timing capacitor is missing or zero");
  Circuit d = two_resistor(10e3, 47e3, 100e-9);
  d.control = ControlWiring::feedback_from_discharge;
  d.v.control_ohm = 10e3;
  CHECK(predict_cycle(d).stop == Stop::unsupported_wiring);
}

TEST_CASE("propagation delay: each phase runs on past its threshold") {
  Circuit k = two_resistor(1e3, 1e3, 1e-9);  // 1.39 us high, 0.69 us low
  const CyclePrediction fast = predict_cycle(k);
  const double tpd = 20e-9;
  k.v.chip.propagation_delay_s = tpd;
  const CyclePrediction slow = predict_cycle(k);
  // The node overshoots each threshold by about its slope times the delay...
  const double slope_at_upper = (9.0 - 6.0) / fast.high.tau_s;
  const double slope_at_lower = (3.0 - 0.0) / fast.low.tau_s;
  CHECK(slow.cap_max_V - 6.0 == Approx(slope_at_upper * tpd).epsilon(0.05));
  CHECK(3.0 - slow.cap_min_V == Approx(slope_at_lower * tpd).epsilon(0.05));
  // ...and each phase lasts its delay plus the time to cover the other's overshoot.
  const double slope_high_at_lower = (9.0 - 3.0) / fast.high.tau_s;
  const double slope_low_at_upper = 6.0 / fast.low.tau_s;
  CHECK(slow.high_s - fast.high_s ==
        Approx(tpd + slope_at_lower * tpd / slope_high_at_lower).epsilon(0.05));
  CHECK(slow.low_s - fast.low_s ==
        Approx(tpd + slope_at_upper * tpd / slope_low_at_upper).epsilon(0.05));
}

TEST_CASE("zero-ohm figures (an ideal switch and output) hold their node outright") {
  // The same textbook relations with the discharge switch and the output given as exactly
  // 0 ohm, as a design file may: no division by zero, the output at its unloaded levels.
  Circuit k = two_resistor(10e3, 47e3, 100e-9);
  k.v.chip.discharge_on_ohm = 0.0;
  k.v.chip.out_source_ohm = 0.0;
  k.v.chip.out_sink_ohm = 0.0;
  k.v.probe_out_ohm = 10e6;
  const CyclePrediction p = predict_cycle(k);
  REQUIRE(p.oscillates);
  CHECK(p.low_s == Approx(std::log(2.0) * 47e3 * 100e-9).epsilon(1e-9));
  CHECK(p.out_high_V == Approx(9.0 - k.v.chip.out_high_drop_V));
  CHECK(p.out_low_V == Approx(k.v.chip.out_low_V));
}
