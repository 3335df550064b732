// benchtau: names of circuits and wirings, and the sentence for a circuit that stops.
#include <fmt/format.h>

#include "src/core/circuit.h"
#include "src/core/engineering.h"

namespace benchtau {

std::string_view circuit_kind_name(CircuitKind k) {
  switch (k) {
    case CircuitKind::astable_two_resistor:
      return "astable-two-resistor";
    case CircuitKind::astable_output_resistor:
      return "astable-output-resistor";
    case CircuitKind::astable_diode_steered:
      return "astable-diode-steered";
    case CircuitKind::monostable:
      return "monostable";
  }
  return "";
}

std::string_view control_wiring_name(ControlWiring c) {
  switch (c) {
    case ControlWiring::decoupled:
      return "decoupled";
    case ControlWiring::load_to_ground:
      return "load-to-ground";
    case ControlWiring::feedback_from_output:
      return "feedback-from-output";
    case ControlWiring::feedback_from_discharge:
      return "feedback-from-discharge";
    case ControlWiring::driven:
      return "driven";
  }
  return "";
}

std::string_view reset_wiring_name(ResetWiring r) {
  switch (r) {
    case ResetWiring::supply:
      return "supply";
    case ResetWiring::control:
      return "control";
    case ResetWiring::cap_node:
      return "cap-node";
    case ResetWiring::open:
      return "open";
  }
  return "";
}

std::string describe_stop(const CyclePrediction& p) {
  auto V = [](double v) { return format_eng(v, "V"); };
  switch (p.stop) {
    case Stop::none:
      return {};
    case Stop::charge_short_of_upper:
      return fmt::format(
          "will not oscillate: while charging, the capacitor node heads for {} but must reach the "
          "upper threshold {} (the control pin's voltage with the output high); it settles {} "
          "short, so the output stays high",
          V(p.high.target_V), V(p.ctl_high_V), V(-p.high.margin_V));
    case Stop::discharge_short_of_lower:
      return fmt::format(
          "will not oscillate: while discharging, the capacitor node settles at {}, above the "
          "lower threshold {} (half the control pin's {} with the output low), so the output "
          "stays low",
          V(p.low.target_V), V(0.5 * p.ctl_low_V), V(p.ctl_low_V));
    case Stop::thresholds_crossed:
      return fmt::format(
          "will not oscillate: the lower threshold {} (half the control pin's {} with the output "
          "low) is not below the upper threshold {} (the control pin with the output high)",
          V(0.5 * p.ctl_low_V), V(p.ctl_low_V), V(p.ctl_high_V));
    case Stop::held_in_reset:
      return fmt::format(
          "will not oscillate: the reset pin falls to {}, below the reset threshold, so the timer "
          "is held reset with its output low",
          V(p.reset_min_V));
    case Stop::no_timing_path:
      return "will not oscillate: a timing resistor or the timing capacitor is missing or zero";
    case Stop::unsupported_wiring:
      return "this wiring is not modelled: feedback from the discharge pin needs a circuit whose "
             "discharge pin is free (astable-output-resistor)";
  }
  return {};
}

}  // namespace benchtau
