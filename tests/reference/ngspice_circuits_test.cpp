// benchtau: predict_cycle against ngspice runs of the astable timing networks.
//
// ngspice (Debian package ngspice) is the independent simulator; the timer in
// it is the team's behavioural model, tests/reference/spice/timer_behavioural.lib,
// and benchtau's chip is given that model's figures (ngspice_circuits.h).
// Tolerances and their reasons are beside spice::Tolerance.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "tests/reference/ngspice_circuits.h"

using namespace benchtau;
using spice::CircuitCase;

namespace {

CircuitCase two_resistor(std::string label, double r1_ohm, double r2_ohm, double c_F) {
  CircuitCase k;
  k.label = std::move(label);
  k.netlist = "astable_two_resistor.cir";
  k.capture = "astable.txt";
  k.params = {{"r1", r1_ohm}, {"r2", r2_ohm}, {"c1", c_F}};
  k.circuit = spice::base_circuit(CircuitKind::astable_two_resistor);
  k.circuit.v.upper_ohm = r1_ohm;
  k.circuit.v.lower_ohm = r2_ohm;
  k.circuit.v.cap_F = c_F;
  k.circuit.v.probe_out_ohm = 10e3;  // that netlist's 10k output load
  return k;
}

CircuitCase output_resistor(std::string label, double r_ohm, double c_F) {
  CircuitCase k;
  k.label = std::move(label);
  k.netlist = "astable_output_resistor.cir";
  k.params = {{"r", r_ohm}, {"c1", c_F}};
  k.circuit = spice::base_circuit(CircuitKind::astable_output_resistor);
  k.circuit.v.timing_ohm = r_ohm;
  k.circuit.v.cap_F = c_F;
  return k;
}

}  // namespace

TEST_CASE("ngspice circuits: two-resistor, output-resistor (with an LED), diode-steered",
          "[reference][ngspice]") {
  constexpr double led_vf_V = 2.0, led_rd_ohm = 10.0, led_series_ohm = 680.0;
  constexpr double diode_vf_V = 0.6, diode_rd_ohm = 10.0;
  std::vector<CircuitCase> cases;
  // Part values invented for the check.
  cases.push_back(two_resistor("two_resistor_10k_47k_100n", 10e3, 47e3, 100e-9));
  cases.push_back(output_resistor("output_resistor_22k_100n", 22e3, 100e-9));
  {
    CircuitCase k = output_resistor("output_resistor_led_22k_100n", 22e3, 100e-9);
    k.netlist = "astable_output_resistor_led.cir";
    k.params.insert({{"rled", led_series_ohm}, {"vfled", led_vf_V}, {"rdled", led_rd_ohm}});
    // benchtau folds the LED's own resistance into the load resistor.
    k.circuit.v.load_ohm = led_series_ohm + led_rd_ohm;
    k.circuit.v.led_vf_V = led_vf_V;
    cases.push_back(k);
  }
  {
    CircuitCase k = two_resistor("diode_steered_10k_47k_100n", 10e3, 47e3, 100e-9);
    k.netlist = "astable_diode_steered.cir";
    k.capture = "capture.txt";
    k.params.insert({{"vfd", diode_vf_V}, {"rdd", diode_rd_ohm}});
    k.circuit.kind = CircuitKind::astable_diode_steered;
    k.circuit.v.diode_vf_V = diode_vf_V;
    k.circuit.v.diode_ohm = diode_rd_ohm;
    k.circuit.v.probe_out_ohm = kOpen;
    cases.push_back(k);
  }
  const std::vector<spice::Simulated> runs = spice::simulate(cases);
  const spice::Tolerance tol;
  for (std::size_t i = 0; i < cases.size(); ++i) {
    Measurement m;
    spice::check_astable(cases[i], runs[i], tol, &m);
    if (cases[i].netlist == "astable_output_resistor_led.cir") {
      // Timing as without the LED: it hangs on the free discharge pin only.
      CHECK(runs[i].p.high_s == runs[1].p.high_s);
      CHECK(runs[i].p.low_s == runs[1].p.low_s);
      // LED current while the switch is on: (Vs - Vf) / (R + rd + ron), Ohm's law
      // with the diode as Vf behind rd; off, the LED carries next to nothing.
      const Capture& cap = runs[i].csv.capture;
      REQUIRE(cap.channels.size() == 4);
      const double on_A = (spice::kSupply_V - led_vf_V) /
                          (led_series_ohm + led_rd_ohm + cases[i].circuit.v.chip.discharge_on_ohm);
      double lit_sum_A = 0.0;
      int lit_n = 0;
      for (const Cycle& c : m.cycles) {
        if (c.startup) continue;
        const double lit_A =
            spice::window_mean(cap, 3, c.start_s + c.high_s, c.start_s + c.period_s);
        const double dark_A = spice::window_mean(cap, 3, c.start_s, c.start_s + c.high_s);
        // 0.1 %: the diode's smoothed corner is microvolts away at 10 mA.
        CHECK(std::fabs(lit_A) == Approx(on_A).epsilon(0.001));
        CHECK(std::fabs(dark_A) < 1e-6);
        lit_sum_A += std::fabs(lit_A);
        ++lit_n;
      }
      WARN(fmt::format(
          "LED current while lit: ngspice {:.5f} mA, (Vs - Vf) / (R + rd + ron) {:.5f} mA",
          1e3 * lit_sum_A / lit_n, 1e3 * on_A));
    }
    if (cases[i].circuit.kind == CircuitKind::astable_diode_steered) CHECK(runs[i].p.duty < 0.5);
  }
}
