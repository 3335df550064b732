// benchtau: the Monte Carlo timing path gives what the circuit model gives, for every wiring.
#include <catch2/catch.hpp>

#include <algorithm>
#include <array>
#include <cmath>

#include "src/core/cycle_timing.h"
#include "src/core/random.h"

using namespace benchtau;

namespace {

double between(Xoshiro256& rng, double lo, double hi) { return lo + (hi - lo) * rng.uniform(); }
double log_between(Xoshiro256& rng, double lo, double hi) {
  return std::exp(between(rng, std::log(lo), std::log(hi)));
}
template <class T, std::size_t N>
T pick(Xoshiro256& rng, const std::array<T, N>& from) {
  return from[static_cast<std::size_t>(rng.uniform() * N) % N];
}

constexpr std::array kKinds{CircuitKind::astable_two_resistor, CircuitKind::astable_output_resistor,
                            CircuitKind::astable_diode_steered, CircuitKind::monostable};
constexpr std::array kControls{ControlWiring::decoupled, ControlWiring::load_to_ground,
                               ControlWiring::feedback_from_output,
                               ControlWiring::feedback_from_discharge, ControlWiring::driven};
constexpr std::array kResets{ResetWiring::supply, ResetWiring::control, ResetWiring::cap_node,
                             ResetWiring::open};

// A random circuit of the given wiring, with every optional part and chip
// figure moved about, over ranges wide enough that some stop.
Circuit random_circuit(Xoshiro256& rng, CircuitKind kind, ControlWiring control,
                       ResetWiring reset) {
  Circuit c;
  c.kind = kind;
  c.control = control;
  c.reset = reset;
  c.v.family = rng.uniform() < 0.5 ? Family::bipolar : Family::cmos;
  c.v.chip = typical_figures(c.v.family);
  c.v.supply_V = between(rng, 1.0, 18.0);
  c.v.upper_ohm = log_between(rng, 100.0, 1e6);
  c.v.lower_ohm = log_between(rng, 100.0, 1e6);
  c.v.timing_ohm = log_between(rng, 100.0, 1e6);
  c.v.cap_F = log_between(rng, 100e-12, 1e-3);
  c.v.diode_vf_V = between(rng, 0.2, 0.8);
  c.v.diode_ohm = log_between(rng, 1.0, 100.0);
  c.v.control_ohm = log_between(rng, 1e3, 1e6);
  if (control == ControlWiring::driven && rng.uniform() < 0.3) c.v.control_ohm = kOpen;
  c.v.control_to_V = between(rng, 0.0, c.v.supply_V);
  if (rng.uniform() < 0.7) c.v.pullup_ohm = log_between(rng, 1e3, 1e5);
  if (rng.uniform() < 0.3) c.v.load_ohm = log_between(rng, 220.0, 1e5);
  if (rng.uniform() < 0.5) c.v.led_vf_V = between(rng, 1.5, 3.0);
  if (rng.uniform() < 0.3) c.v.leak_ohm = log_between(rng, 1e5, 1e9);
  if (rng.uniform() < 0.3) c.v.leak_A = log_between(rng, 1e-9, 1e-5);
  if (rng.uniform() < 0.5) c.v.probe_cap_ohm = log_between(rng, 1e5, 1e8);
  if (rng.uniform() < 0.5) c.v.probe_ctl_ohm = log_between(rng, 1e5, 1e8);
  if (rng.uniform() < 0.2) c.v.probe_out_ohm = log_between(rng, 1e5, 1e8);
  TimerFigures& f = c.v.chip;
  f.divider_ohm *= between(rng, 0.8, 1.2);
  f.out_high_drop_V *= between(rng, 0.5, 1.5);
  f.out_source_ohm *= between(rng, 0.5, 2.0);
  f.out_low_V *= between(rng, 0.5, 2.0);
  f.out_sink_ohm *= between(rng, 0.5, 2.0);
  f.discharge_on_ohm *= between(rng, 0.5, 2.0);
  f.discharge_sat_V = between(rng, 0.0, 0.2);
  f.threshold_current_A *= between(rng, 0.0, 3.0);
  f.trigger_current_A *= between(rng, 0.0, 3.0);
  f.reset_threshold_V *= between(rng, 0.8, 1.2);
  f.propagation_delay_s *= between(rng, 0.0, 10.0);
  // A design may give an ideal output or switch: a zero-ohm branch holds its node.
  if (rng.uniform() < 0.1) f.out_source_ohm = 0.0;
  if (rng.uniform() < 0.1) f.out_sink_ohm = 0.0;
  if (rng.uniform() < 0.1) f.discharge_on_ohm = 0.0;
  if (rng.uniform() < 0.05) c.v.diode_ohm = 0.0;
  return c;
}

// Equal to within epsilon relative, or both NaN.
void check_same(double got, double want, double epsilon) {
  if (std::isnan(want)) {
    CHECK(std::isnan(got));
  } else {
    CHECK(got == Approx(want).epsilon(epsilon).margin(0.0));
  }
}

// 1e-12, except for a circuit whose threshold margin is under 1 % of its
// supply: a phase's time is then a logarithm of a ratio over that small
// margin, which amplifies a rounding of the node voltages (about 1e-16 of the
// supply) by supply / margin, whichever way the arithmetic is arranged; that
// with a factor of 100 to spare.
double tolerance(const Circuit& c, const CyclePrediction& p) {
  double margin_V = p.high.margin_V;
  if (c.kind != CircuitKind::monostable) margin_V = std::min(margin_V, p.low.margin_V);
  const double amplified = 1e-14 * std::max(c.v.supply_V, 1.0) / margin_V;
  return std::max(1e-12, amplified);
}

}  // namespace

TEST_CASE("the timing path matches predict_cycle to 1e-12 over random circuits of every wiring") {
  Xoshiro256 rng(4242, 0);
  std::size_t runs = 0, stops = 0, well_conditioned = 0;
  for (CircuitKind kind : kKinds) {
    for (ControlWiring control : kControls) {
      for (ResetWiring reset : kResets) {
        std::size_t wiring_runs = 0;
        for (int i = 0; i < 400; ++i) {
          const Circuit c = random_circuit(rng, kind, control, reset);
          const CyclePrediction p = predict_cycle(c);
          const CycleTiming t = cycle_timing(c);
          INFO(circuit_kind_name(kind) << " / " << control_wiring_name(control) << " / "
                                       << reset_wiring_name(reset) << ", circuit " << i);
          REQUIRE(t.oscillates == p.oscillates);
          if (!p.oscillates) {
            ++stops;
            CHECK(std::isnan(t.high_s));
            CHECK(std::isnan(t.cap_max_V));
            continue;
          }
          ++runs;
          ++wiring_runs;
          const double eps = tolerance(c, p);
          if (eps == 1e-12) ++well_conditioned;
          check_same(t.high_s, p.high_s, eps);
          check_same(t.low_s, p.low_s, eps);
          check_same(t.period_s, p.period_s, eps);
          check_same(t.frequency_Hz, p.frequency_Hz, eps);
          check_same(t.duty, p.duty, eps);
          check_same(t.cap_max_V, p.cap_max_V, eps);
          check_same(t.cap_min_V, p.cap_min_V, eps);
        }
        // Every wiring the model runs is exercised; feedback from the
        // discharge pin runs only on the output-resistor astable, and a
        // monostable with reset on its capacitor mostly rests below the reset
        // threshold (its floor is the switch's saturation), so is held.
        const bool unsupported = control == ControlWiring::feedback_from_discharge &&
                                 kind != CircuitKind::astable_output_resistor;
        const bool mostly_held = kind == CircuitKind::monostable && reset == ResetWiring::cap_node;
        INFO(circuit_kind_name(kind)
             << " / " << control_wiring_name(control) << " / " << reset_wiring_name(reset));
        if (unsupported) {
          CHECK(wiring_runs == 0);
        } else if (!mostly_held) {
          CHECK(wiring_runs > 20);
        }
      }
    }
  }
  CHECK(runs > 10000);
  CHECK(well_conditioned > runs - runs / 20);  // nearly all checked to 1e-12
  CHECK(stops > 5000);
}

TEST_CASE("the timing path gives the textbook astable and monostable times") {
  // t_high = ln 2 (R1 + R2) C, t_low = ln 2 R2 C, and a monostable's pulse
  // ln 3 R C: P. Horowitz and W. Hill, The Art of Electronics, 3rd ed., 2015,
  // section on the 555 (from memory). An ideal chip makes them exact.
  Circuit c;
  c.v.chip.discharge_on_ohm = 1e-9;
  c.v.chip.discharge_sat_V = 0.0;
  c.v.chip.threshold_current_A = 0.0;
  c.v.chip.trigger_current_A = 0.0;
  c.v.chip.propagation_delay_s = 0.0;
  c.v.upper_ohm = 10e3;
  c.v.lower_ohm = 47e3;
  c.v.cap_F = 100e-9;
  const CycleTiming t = cycle_timing(c);
  REQUIRE(t.oscillates);
  CHECK(t.high_s == Approx(std::log(2.0) * 57e3 * 100e-9).epsilon(1e-9));
  CHECK(t.low_s == Approx(std::log(2.0) * 47e3 * 100e-9).epsilon(1e-9));
  CHECK(t.duty == Approx(57.0 / 104.0).epsilon(1e-9));
  CHECK(t.cap_max_V == Approx(6.0).epsilon(1e-9));
  CHECK(t.cap_min_V == Approx(3.0).epsilon(1e-9));
  c.kind = CircuitKind::monostable;
  c.v.timing_ohm = 100e3;
  c.v.cap_F = 1e-6;
  const CycleTiming m = cycle_timing(c);
  REQUIRE(m.oscillates);
  CHECK(m.high_s == Approx(std::log(3.0) * 0.1).epsilon(1e-6));
  CHECK(std::isnan(m.period_s));
  // No capacitor, no cycle.
  c.v.cap_F = 0.0;
  CHECK_FALSE(cycle_timing(c).oscillates);
}
