// benchtau: the monostable's pulse against ngspice: width, a second trigger, a held trigger.
//
// ngspice (Debian package ngspice) is the independent simulator, running the
// team's behavioural timer model; benchtau's chip carries that model's figures
// (ngspice_circuits.h). The trigger is a pulse source every tper.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "tests/reference/ngspice_circuits.h"

using namespace benchtau;
using spice::CircuitCase;

namespace {

constexpr double r_ohm = 100e3, c_F = 100e-9;  // invented; pulse about 11 ms
constexpr double tdel_s = 1e-3;                // first trigger
constexpr double tedge_s = 100e-9;             // trigger fall and rise
constexpr int triggers = 4;

CircuitCase monostable(std::string label, double tlow_s, double tper_s) {
  CircuitCase k;
  k.label = std::move(label);
  k.netlist = "monostable.cir";
  k.params = {{"r", r_ohm},     {"c1", c_F}, {"tdel", tdel_s}, {"tedge", tedge_s}, {"tlow", tlow_s},
              {"tper", tper_s}, {"v2", 0.0}, {"t2del", 5e-3},  {"t2low", 100e-6}};
  k.circuit = spice::base_circuit(CircuitKind::monostable);
  k.circuit.v.timing_ohm = r_ohm;
  k.circuit.v.cap_F = c_F;
  const CyclePrediction p = predict_cycle(k.circuit);
  // Edges on the output alone: the discharge after the pulse takes (R || ron) C ln 100,
  // half a microsecond, too short for the capacitor curve to refine the falling
  // edge, so the sample interval must be fine: 1/2000 of the pulse (0.05 %).
  k.step_s = p.high_s / 2000.0;
  k.stop_s = tdel_s + (triggers - 1) * tper_s + std::max(p.high_s, tlow_s) + 0.2 * tper_s;
  return k;
}

}  // namespace

TEST_CASE("ngspice circuits: monostable pulse width, a second trigger, a held trigger",
          "[reference][ngspice]") {
  const double tper_s = 15e-3;
  std::vector<CircuitCase> cases;
  // 1. A brief trigger, 100 us low: one pulse of the predicted width each time.
  cases.push_back(monostable("monostable_100k_100n", 100e-6, tper_s));
  // 2. The same with a second trigger 5 ms into each pulse: the standard part is
  //    not retriggerable (common practice), the pulse neither restarts nor ends early.
  cases.push_back(monostable("monostable_retriggered", 100e-6, tper_s));
  cases[1].params["v2"] = spice::kSupply_V;
  // 3. A trigger held low for 15 ms, past the 11 ms timing: the trigger (set)
  //    dominates the threshold comparator, so the output stays high until the
  //    trigger is released (common practice), while the capacitor runs on toward
  //    the supply.
  const double held_s = 15e-3, held_per_s = 20e-3;
  cases.push_back(monostable("monostable_held_trigger", held_s, held_per_s));
  const std::vector<spice::Simulated> runs = spice::simulate(cases);
  const spice::Tolerance tol;
  const CyclePrediction& p = runs[0].p;
  REQUIRE(p.oscillates);  // for a monostable: it makes pulses
  // The pulse starts from the discharged floor, Vs ron / (R + ron), and ends at
  // two-thirds of the supply (three equal divider resistors, common practice).
  CHECK(p.high.start_V == Approx(spice::kSupply_V * 10.0 / (r_ohm + 10.0)).epsilon(1e-9));

  std::vector<Measurement> ms;
  for (std::size_t i = 0; i < cases.size(); ++i) {
    INFO(cases[i].label);
    ms.push_back(measure(runs[i].csv.capture, runs[i].map));
    const Summary& s = ms.back().summary;
    WARN(fmt::format("{}: high {:.6e} s (model {:.6e}, {:+.3f} %), cap max {:.4f} V, {} cycles",
                     cases[i].label, s.high_s.mean, p.high_s, spice::pct(s.high_s.mean, p.high_s),
                     s.cap_max_V.mean, s.cycles));
    // One cycle per trigger period after the first trigger; none flagged start-up,
    // since every pulse starts from the same floor.
    CHECK(s.cycles == static_cast<std::size_t>(triggers - 1));
    CHECK(ms.back().edge_node == "out");
  }
  const Summary& plain = ms[0].summary;
  CHECK(plain.high_s.mean == Approx(p.high_s).epsilon(tol.time_rel));
  CHECK(plain.period_s.mean == Approx(tper_s).epsilon(1e-3));
  CHECK(plain.cap_max_V.mean == Approx(p.cap_max_V).margin(spice::volt_margin(tol, p.cap_max_V)));

  // The second trigger changes nothing: same width to a sample, same peak.
  const Summary& again = ms[1].summary;
  CHECK(std::fabs(again.high_s.mean - plain.high_s.mean) < runs[1].step_s);
  CHECK(again.high_s.max - again.high_s.min < runs[1].step_s);
  CHECK(again.cap_max_V.mean == Approx(plain.cap_max_V.mean).margin(0.002));
  // ...though it was there: the trigger pin went low inside each pulse.
  const Capture& rc = runs[1].csv.capture;
  REQUIRE(rc.channels.size() == 4);
  for (const Cycle& c : ms[1].cycles) {
    const double t2_s = c.start_s + 5e-3 + 50e-6;  // mid second trigger (tdel-relative)
    const double trig_V = spice::window_mean(rc, 3, t2_s - 20e-6, t2_s + 20e-6, 0.0);
    CHECK(trig_V < 0.1);
  }

  // The held trigger: the output is high for as long as the trigger is low
  // (from its falling crossing of Vs/3 to its rising one: tlow + 2/3 tedge), and
  // the capacitor ends that stretch on the RC charging curve from the floor.
  const Summary& held = ms[2].summary;
  CHECK(held.high_s.mean > 1.3 * p.high_s);
  CHECK(held.high_s.mean == Approx(held_s + 2.0 / 3.0 * tedge_s).epsilon(tol.time_rel));
  const double tau_s = p.high.tau_s;
  const double peak_V =
      p.high.target_V + (p.high.start_V - p.high.target_V) * std::exp(-held_s / tau_s);
  CHECK(held.cap_max_V.mean == Approx(peak_V).margin(spice::volt_margin(tol, peak_V)));
  CHECK(held.cap_max_V.mean > p.cap_max_V + 0.5);
}
