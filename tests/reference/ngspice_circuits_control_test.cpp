// benchtau: predict_cycle against ngspice runs with the control pin loaded, fed back or driven.
//
// ngspice (Debian package ngspice) is the independent simulator, running the
// team's behavioural timer model; benchtau's chip carries that model's figures
// (ngspice_circuits.h, where the tolerances are reasoned).
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "tests/reference/ngspice_circuits.h"

using namespace benchtau;
using spice::CircuitCase;

namespace {

// The two-resistor astable of these netlists: R1 10k, R2 47k, C 100n (invented).
CircuitCase two_resistor(std::string label, std::string netlist, ControlWiring control) {
  CircuitCase k;
  k.label = std::move(label);
  k.netlist = std::move(netlist);
  k.params = {{"r1", 10e3}, {"r2", 47e3}, {"c1", 100e-9}};
  k.circuit = spice::base_circuit(CircuitKind::astable_two_resistor);
  k.circuit.control = control;
  k.circuit.v.upper_ohm = 10e3;
  k.circuit.v.lower_ohm = 47e3;
  k.circuit.v.cap_F = 100e-9;
  return k;
}

CircuitCase loaded(double rctl_ohm) {
  CircuitCase k = two_resistor(fmt::format("control_load_{:g}", rctl_ohm),
                               "astable_control_load.cir", ControlWiring::load_to_ground);
  k.params["rctl"] = rctl_ohm;
  k.circuit.v.control_ohm = rctl_ohm;
  return k;
}

CircuitCase from_output(double rfb_ohm) {
  CircuitCase k =
      two_resistor(fmt::format("control_from_output_{:g}", rfb_ohm),
                   "astable_control_from_output.cir", ControlWiring::feedback_from_output);
  k.params["rfb"] = rfb_ohm;
  k.circuit.v.control_ohm = rfb_ohm;
  return k;
}

CircuitCase driven(double vctl_V) {
  CircuitCase k = two_resistor(fmt::format("control_driven_{:g}V", vctl_V),
                               "astable_control_driven.cir", ControlWiring::driven);
  k.params["vctl"] = vctl_V;
  k.circuit.v.control_ohm = 0.0;  // an ideal source
  k.circuit.v.control_to_V = vctl_V;
  return k;
}

CircuitCase from_discharge(double rpu_ohm, double rfb_ohm) {
  CircuitCase k;
  k.label = fmt::format("control_from_discharge_{:g}_{:g}", rpu_ohm, rfb_ohm);
  k.netlist = "astable_control_from_discharge.cir";
  k.params = {{"r", 22e3}, {"c1", 100e-9}, {"rpu", rpu_ohm}, {"rfb", rfb_ohm}};
  k.circuit = spice::base_circuit(CircuitKind::astable_output_resistor);
  k.circuit.control = ControlWiring::feedback_from_discharge;
  k.circuit.v.timing_ohm = 22e3;
  k.circuit.v.cap_F = 100e-9;
  k.circuit.v.pullup_ohm = rpu_ohm;
  k.circuit.v.control_ohm = rfb_ohm;
  return k;
}

void check_all(std::vector<CircuitCase>& cases) {
  const std::vector<spice::Simulated> runs = spice::simulate(cases);
  const spice::Tolerance tol;
  for (std::size_t i = 0; i < cases.size(); ++i) spice::check_astable(cases[i], runs[i], tol);
}

}  // namespace

TEST_CASE("ngspice circuits: control pin loaded to ground with 10k and 1k",
          "[reference][ngspice]") {
  std::vector<CircuitCase> cases{loaded(10e3), loaded(1e3)};
  check_all(cases);
}

TEST_CASE("ngspice circuits: control pin fed back from the output through 10k and 4.7k",
          "[reference][ngspice]") {
  std::vector<CircuitCase> cases{from_output(10e3), from_output(4.7e3)};
  check_all(cases);
}

TEST_CASE("ngspice circuits: control pin fed back from a pulled-up discharge pin",
          "[reference][ngspice]") {
  std::vector<CircuitCase> cases{from_discharge(1e3, 10e3), from_discharge(1e3, 4.7e3)};
  check_all(cases);
}

TEST_CASE("ngspice circuits: control pin driven at 4 V and 7 V", "[reference][ngspice]") {
  std::vector<CircuitCase> cases{driven(4.0), driven(7.0)};
  check_all(cases);
}
