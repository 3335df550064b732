// benchtau: circuits that stop against ngspice: reset from a loaded control pin, hard feedback.
//
// ngspice (Debian package ngspice) is the independent simulator, running the
// team's behavioural timer model; benchtau's chip carries that model's figures
// (ngspice_circuits.h). A run "oscillates" when its output rises again after
// its first fall; where each side stops is found by searching the resistor.
#include <catch2/catch.hpp>

#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "tests/reference/ngspice_circuits.h"

using namespace benchtau;
using spice::CircuitCase;

namespace {

// What the output did over a run, and where the nodes ended.
struct Activity {
  std::size_t rises_after_fall = 0;
  double out_max_V = 0.0;
  double cap_max_V = 0.0;
  double cap_end_V = 0.0, ctl_end_V = 0.0;
};

Activity activity(const spice::Simulated& s) {
  const Capture& c = s.csv.capture;
  const std::vector<double>& out = c.channels[*s.map.out].values;
  const std::vector<double>& cap = c.channels[*s.map.cap].values;
  Activity a;
  // Levels 7.3 V and 0.1 V: crossings of 5 V up and 2 V down, so a soft level
  // near a threshold is not counted as switching.
  bool high = false, fell = false;
  for (std::size_t i = 0; i < c.samples(); ++i) {
    a.out_max_V = std::max(a.out_max_V, out[i]);
    a.cap_max_V = std::max(a.cap_max_V, cap[i]);
    if (!high && out[i] > 5.0) {
      high = true;
      if (fell) ++a.rises_after_fall;
    } else if (high && out[i] < 2.0) {
      high = false;
      fell = true;
    }
  }
  a.cap_end_V = cap.back();
  if (s.map.ctl) a.ctl_end_V = c.channels[*s.map.ctl].values.back();
  return a;
}

bool model_runs(const Circuit& c) { return predict_cycle(c).oscillates; }

// Where predict_cycle stops, by bisection over [lo, hi] (stopped at lo, running at hi).
double model_threshold(const std::function<Circuit(double)>& at, double lo, double hi) {
  REQUIRE_FALSE(model_runs(at(lo)));
  REQUIRE(model_runs(at(hi)));
  for (int i = 0; i < 60; ++i) {
    const double mid = 0.5 * (lo + hi);
    (model_runs(at(mid)) ? hi : lo) = mid;
  }
  return 0.5 * (lo + hi);
}

// Where ngspice stops, by trisection (two runs at a time) over [lo, hi], which
// must bracket it; the result is good to (hi - lo) / 3^rounds.
double ngspice_threshold(const std::function<CircuitCase(double, std::string)>& at, double lo,
                         double hi, int rounds) {
  for (int r = 0; r < rounds; ++r) {
    const double a = lo + (hi - lo) / 3.0, b = lo + 2.0 * (hi - lo) / 3.0;
    std::vector<CircuitCase> pair{at(a, fmt::format("a{}", r)), at(b, fmt::format("b{}", r))};
    const std::vector<spice::Simulated> s = spice::simulate(pair);
    const bool a_runs = activity(s[0]).rises_after_fall > 0;
    const bool b_runs = activity(s[1]).rises_after_fall > 0;
    INFO("round " << r << ": " << a << " ohm " << (a_runs ? "runs" : "stops") << ", " << b
                  << " ohm " << (b_runs ? "runs" : "stops"));
    CHECK((b_runs || !a_runs));  // monotonic: more resistance never stops it
    if (a_runs) {
      hi = a;
    } else if (b_runs) {
      lo = a;
      hi = b;
    } else {
      lo = b;
    }
  }
  return 0.5 * (lo + hi);
}

// Two-resistor astable, control pin fed back from the output through rfb.
// R1 1k (common practice: the smallest usual R1), R2 10k, C 100n (invented).
// The low phase aims at the discharge node, Vs ron / (R1 + ron) = 89 mV; the
// lower threshold follows the output's low level down as rfb falls.
constexpr double fb_r1_ohm = 1e3, fb_r2_ohm = 10e3, fb_c_F = 100e-9;

Circuit feedback_circuit(double rfb_ohm) {
  Circuit c = spice::base_circuit(CircuitKind::astable_two_resistor);
  c.control = ControlWiring::feedback_from_output;
  c.v.upper_ohm = fb_r1_ohm;
  c.v.lower_ohm = fb_r2_ohm;
  c.v.cap_F = fb_c_F;
  c.v.control_ohm = rfb_ohm;
  return c;
}

CircuitCase feedback_case(double rfb_ohm, std::string label) {
  CircuitCase k;
  k.label = "feedback_" + label;
  k.netlist = "astable_control_from_output.cir";
  k.params = {{"r1", fb_r1_ohm}, {"r2", fb_r2_ohm}, {"c1", fb_c_F}, {"rfb", rfb_ohm}};
  k.circuit = feedback_circuit(rfb_ohm);
  // Long enough for the first charge and 40 time constants of discharge: a run
  // that has not risen again by then is stopped to within exp(-40) of its target.
  const double tau_low_s = (fb_r2_ohm + 10.0) * fb_c_F;
  k.step_s = tau_low_s / 200.0;
  k.stop_s = 2.0 * (fb_r1_ohm + fb_r2_ohm) * fb_c_F + 40.0 * tau_low_s;
  return k;
}

// Two-resistor astable, R1 10k, R2 47k, C 100n, control pin loaded by rctl,
// reset tied to the control pin.
Circuit reset_circuit(double rctl_ohm) {
  Circuit c = spice::base_circuit(CircuitKind::astable_two_resistor);
  c.control = ControlWiring::load_to_ground;
  c.reset = ResetWiring::control;
  c.v.upper_ohm = 10e3;
  c.v.lower_ohm = 47e3;
  c.v.cap_F = 100e-9;
  c.v.control_ohm = rctl_ohm;
  return c;
}

CircuitCase reset_case(double rctl_ohm, std::string label, bool fixed_length) {
  CircuitCase k;
  k.label = "reset_" + label;
  k.netlist = "astable_reset_from_control.cir";
  k.params = {{"r1", 10e3}, {"r2", 47e3}, {"c1", 100e-9}, {"rctl", rctl_ohm}};
  k.circuit = reset_circuit(rctl_ohm);
  if (fixed_length) {
    // The first charge and a low phase of this astable at 1k are 4 ms; 20 ms
    // leaves room for several cycles wherever it runs.
    k.step_s = 5e-6;
    k.stop_s = 20e-3;
  }
  return k;
}

}  // namespace

TEST_CASE("ngspice circuits: reset tied to the control pin runs, or holds it in reset",
          "[reference][ngspice]") {
  // Runs: a 1k load leaves 6 V 1k / (1k + 3.33k) = 1.38 V on reset, above 0.7 V.
  // Held: 300 ohm leaves 0.50 V (the Thevenin divider, common practice).
  std::vector<CircuitCase> cases{reset_case(1e3, "1k", false), reset_case(300.0, "300", true)};
  const std::vector<spice::Simulated> s = spice::simulate(cases);
  spice::check_astable(cases[0], s[0], spice::Tolerance{});
  CHECK(s[0].p.reset_min_V == Approx(6.0 * 1e3 / (1e3 + 10e3 / 3.0)).epsilon(1e-9));

  const CyclePrediction& held = s[1].p;
  CHECK_FALSE(held.oscillates);
  CHECK(held.stop == Stop::held_in_reset);
  CHECK(held.reset_min_V == Approx(6.0 * 300.0 / (300.0 + 10e3 / 3.0)).epsilon(1e-9));
  const Activity a = activity(s[1]);
  WARN(
      fmt::format("reset_300: ngspice output max {:.4f} V, cap max {:.4f} V, ctl end {:.4f} V "
                  "(model reset pin {:.4f} V)",
                  a.out_max_V, a.cap_max_V, a.ctl_end_V, held.reset_min_V));
  CHECK(a.out_max_V < 0.2);  // never left the low level (0.1 V)
  CHECK(a.cap_max_V < 0.1);  // never charged: the switch held it near the floor
  CHECK(a.ctl_end_V == Approx(held.reset_min_V).margin(1e-3));

  // Where each says reset starts to hold: predict_cycle at Vc = 0.7 V exactly
  // (rctl = 0.7 x 3.33k / 5.3 = 440 ohm); the model's reset input is a 20 mV wide
  // step about 0.7 V, so ngspice may stop a few ohms either side.
  const double model_ohm = model_threshold(reset_circuit, 300.0, 1e3);
  CHECK(model_ohm == Approx(0.7 * (10e3 / 3.0) / (6.0 - 0.7)).epsilon(1e-6));
  const double spice_ohm = ngspice_threshold(
      [](double r, std::string l) { return reset_case(r, l, true); }, 300.0, 700.0, 5);
  WARN(fmt::format("reset held below rctl: predict_cycle {:.2f} ohm, ngspice {:.2f} ohm", model_ohm,
                   spice_ohm));
  CHECK(spice_ohm == Approx(model_ohm).margin(10.0));
}

TEST_CASE("ngspice circuits: hard feedback from the output to the control pin locks up",
          "[reference][ngspice]") {
  // 1 milliohm stands for a wire. 100 ohm still runs, slowly.
  std::vector<CircuitCase> cases{feedback_case(1e-3, "short"), feedback_case(100.0, "100")};
  cases[1].step_s = cases[1].stop_s = 0.0;  // runs: planned from the prediction
  const std::vector<spice::Simulated> s = spice::simulate(cases);

  const CyclePrediction& locked = s[0].p;
  CHECK_FALSE(locked.oscillates);
  CHECK(locked.stop == Stop::discharge_short_of_lower);
  const Activity a = activity(s[0]);
  WARN(
      fmt::format("feedback_short: ngspice rises after the first fall {}, cap settles at "
                  "{:.5f} V (model target {:.5f}), ctl {:.5f} V (model {:.5f}), lower threshold "
                  "{:.5f} V (model {:.5f})",
                  a.rises_after_fall, a.cap_end_V, locked.low.target_V, a.ctl_end_V,
                  locked.ctl_low_V, 0.5 * a.ctl_end_V, locked.low.end_V));
  CHECK(a.rises_after_fall == 0);
  // Stuck where the model says: the capacitor at the discharge node's voltage
  // (Vs ron / (R1 + ron), Thevenin), above the lower threshold.
  CHECK(a.cap_end_V == Approx(locked.low.target_V).margin(1e-4));
  CHECK(a.cap_end_V == Approx(spice::kSupply_V * 10.0 / (fb_r1_ohm + 10.0)).margin(1e-4));
  CHECK(a.ctl_end_V == Approx(locked.ctl_low_V).margin(1e-4));
  CHECK(a.cap_end_V > 0.5 * a.ctl_end_V);

  spice::check_astable(cases[1], s[1], spice::Tolerance{});

  // The margin rests on the output's low level: at 0.2 V instead of 0.1 V the
  // lower threshold is 0.11 V, above the 89 mV floor, and the same short runs.
  std::vector<CircuitCase> higher{feedback_case(1e-3, "short_vlow_0.2")};
  higher[0].params["vlow"] = 0.2;
  higher[0].circuit.v.chip.out_low_V = 0.2;
  higher[0].step_s = higher[0].stop_s = 0.0;
  const std::vector<spice::Simulated> h = spice::simulate(higher);
  REQUIRE(h[0].p.oscillates);
  spice::check_astable(higher[0], h[0], spice::Tolerance{});

  // Where each locks up as rfb falls: the margin is the lower threshold (half the
  // control voltage, set by the output's low level through rfb) less the 89 mV
  // the discharge leaves. A 1 % error in that threshold moves it about 1 ohm, so
  // ngspice and the model must agree within 0.5 ohm.
  const double model_ohm = model_threshold(feedback_circuit, 1e-3, 100.0);
  const double spice_ohm = ngspice_threshold(feedback_case, 20.0, 60.0, 6);
  WARN(fmt::format("feedback locks up below rfb: predict_cycle {:.3f} ohm, ngspice {:.3f} ohm",
                   model_ohm, spice_ohm));
  CHECK(spice_ohm == Approx(model_ohm).margin(0.5));
}
