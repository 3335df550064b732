// benchtau: the timer circuits benchtau models, and their exact cycle solution.
#pragma once

#include <limits>
#include <string>
#include <string_view>

#include "src/core/timer_family.h"

namespace benchtau {

// How the timing network is wired.
//   astable_two_resistor:    supply - R1 - discharge - R2 - capacitor node (the textbook astable)
//   astable_output_resistor: output - R - capacitor node; the discharge pin is free for a load
//   astable_diode_steered:   as two-resistor, with a diode from discharge to the capacitor that
//                            bypasses R2 while charging (duty below 50 % possible)
//   monostable:              supply - R - capacitor node, discharge tied to the capacitor node;
//                            one pulse per trigger
enum class CircuitKind {
  astable_two_resistor,
  astable_output_resistor,
  astable_diode_steered,
  monostable
};

// What the control pin is tied to. load_to_ground covers any resistor to a
// fixed voltage (control_to_V, 0 V by default); driven is a voltage source
// (control_to_V behind control_ohm, which may be 0).
enum class ControlWiring {
  decoupled,
  load_to_ground,
  feedback_from_output,
  feedback_from_discharge,
  driven
};

enum class ResetWiring { supply, control, cap_node, open };

constexpr double kOpen = std::numeric_limits<double>::infinity();

// Effective values, SI units throughout. A resistance of kOpen is absent.
struct CircuitValues {
  double supply_V = 9.0;
  double upper_ohm = kOpen;   // R1 (two-resistor, diode-steered)
  double lower_ohm = kOpen;   // R2 (two-resistor, diode-steered)
  double timing_ohm = kOpen;  // R (output-resistor, monostable)
  double cap_F = 0.0;
  double diode_vf_V = 0.6;       // the steering diode, at its working current
  double diode_ohm = 10.0;       // and its incremental resistance there
  double control_ohm = kOpen;    // external control-pin resistor (or a driving source's resistance)
  double control_to_V = 0.0;     // where it goes (load_to_ground, driven)
  double pullup_ohm = kOpen;     // discharge pin to the supply (feedback_from_discharge)
  double load_ohm = kOpen;       // a load from the supply into the discharge pin...
  double led_vf_V = 0.0;         // ...through an LED of this forward voltage (0: a plain resistor)
  double leak_ohm = kOpen;       // capacitor leakage, as a resistance across it
  double leak_A = 0.0;           // and as a constant current out of the capacitor node
  double probe_cap_ohm = kOpen;  // instrument input resistance on each captured node
  double probe_ctl_ohm = kOpen;
  double probe_out_ohm = kOpen;
  TimerFigures chip = typical_figures(Family::bipolar);
  Family family = Family::bipolar;
};

struct Circuit {
  CircuitKind kind = CircuitKind::astable_two_resistor;
  ControlWiring control = ControlWiring::decoupled;
  ResetWiring reset = ResetWiring::supply;
  CircuitValues v;
};

// Why a circuit does not oscillate.
enum class Stop {
  none,
  charge_short_of_upper,     // the charging target lies at or below the upper threshold
  discharge_short_of_lower,  // the discharging target lies at or above the lower threshold
  thresholds_crossed,        // the lower threshold is not below the upper one
  held_in_reset,             // the reset pin sits below its threshold
  no_timing_path,            // a timing resistor or the capacitor is missing
  unsupported_wiring,        // a combination the model does not cover
};

// One phase of the capacitor node: V(t) = target + (start - target) exp(-t / tau).
struct PhaseSolution {
  double tau_s = 0.0;
  double target_V = 0.0;  // where the node would settle (Thevenin voltage)
  double start_V = 0.0;
  double end_V = 0.0;  // the threshold it switches at
  double duration_s = 0.0;
  double margin_V = 0.0;  // how far beyond the threshold the target lies (>0 runs)
};

// The steady cycle. For a monostable, high is the pulse and low is the
// discharge after it (period and duty are then NaN). When the circuit does
// not oscillate, stop says why and the phases hold the voltages that show it.
struct CyclePrediction {
  bool oscillates = false;
  Stop stop = Stop::none;
  PhaseSolution high, low;  // high: output high, capacitor charging
  double high_s = 0.0, low_s = 0.0, period_s = 0.0, frequency_Hz = 0.0, duty = 0.0;
  double cap_max_V = 0.0, cap_min_V = 0.0;
  double ctl_high_V = 0.0, ctl_low_V = 0.0;  // control pin (upper threshold) in each phase
  double out_high_V = 0.0, out_low_V = 0.0;  // output levels under the circuit's load
  double reset_min_V = 0.0;                  // the lowest voltage the reset pin sees
  // A margin smaller than the family's spread of the figure that decides it:
  // the same design may run on one part and stop on another.
  bool marginal = false;
  std::string_view deciding_figure;  // e.g. "output low level"
};

// Solves the steady cycle exactly (piecewise exponential, no time stepping).
// Cheap and allocation-free, for Monte Carlo use.
CyclePrediction predict_cycle(const Circuit& circuit);

// A sentence for a circuit that does not oscillate, naming the node voltages;
// empty when it does.
std::string describe_stop(const CyclePrediction& p);

std::string_view circuit_kind_name(CircuitKind k);
std::string_view control_wiring_name(ControlWiring c);
std::string_view reset_wiring_name(ResetWiring r);

}  // namespace benchtau
