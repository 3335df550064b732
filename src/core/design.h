// benchtau: a board's design: supply, timer family, circuit, parts and capture mapping.
#pragma once

#include <cstddef>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "src/core/circuit.h"
#include "src/core/timer_family.h"

namespace benchtau {

enum class PartKind {
  unknown,
  metal_film,
  carbon_film,
  wirewound,
  film,
  ceramic,
  c0g,
  x7r,
  electrolytic,
  tantalum,
  signal_diode,
  led
};

// What a part does in the circuit; which roles a circuit needs is checked
// when the design is read.
enum class PartRole {
  upper,        // R1, supply to discharge (two-resistor, diode-steered)
  lower,        // R2, discharge to capacitor (two-resistor, diode-steered)
  timing_cap,   // the timing capacitor
  diode,        // the steering diode (diode-steered)
  timing_res,   // R (output-resistor, monostable)
  control_res,  // the resistor on the control pin
  load_res,     // a load from the supply into the discharge pin
  led,          // an LED in series with load_res
  pullup,       // discharge pin to the supply (feedback_from_discharge)
};

struct Part {
  std::string ref;  // "R1", "C3"
  PartRole role = PartRole::upper;
  PartKind kind = PartKind::unknown;
  double value = std::numeric_limits<double>::quiet_NaN();      // ohm or farad; NaN for diodes
  double tolerance = std::numeric_limits<double>::quiet_NaN();  // fraction: 0.01 for "1%"
  double rated_V = std::numeric_limits<double>::quiet_NaN();    // capacitors
  double vf_V = std::numeric_limits<double>::quiet_NaN();       // diodes and LEDs
  std::size_t line = 0;  // where it is in the design file, for messages
};

// One captured node: the capture column (name or 1-based index, as text) and
// the instrument's input resistance on it.
struct CaptureNode {
  std::string column;  // empty: not captured
  double input_ohm = kOpen;
};

struct Design {
  std::string name;    // free text
  std::string source;  // the file it was read from
  double supply_V = 0.0;
  Family family = Family::bipolar;
  TimerFigures figures;  // typical_figures(family) with the file's overrides
  std::vector<double TimerFigures::*> figures_given;  // which figures the file set
  CircuitKind kind = CircuitKind::astable_two_resistor;
  ControlWiring control = ControlWiring::decoupled;
  ResetWiring reset = ResetWiring::supply;
  double control_to_V = 0.0;  // load_to_ground's far end, or driven's voltage
  std::vector<Part> parts;
  CaptureNode out, cap, ctl;

  // The part with a role, or nullptr.
  const Part* part_with(PartRole role) const;
};

// The circuit at the design's nominal values.
Circuit nominal_circuit(const Design& design);

// Where each part's value lands in CircuitValues, for Monte Carlo draws and
// the fit: parts[part].value (or vf_V for diodes and LEDs) goes to field.
struct PartSlot {
  std::size_t part = 0;
  double CircuitValues::*field = nullptr;
};
std::vector<PartSlot> part_slots(const Design& design);

std::string_view part_kind_name(PartKind k);
std::string_view part_role_name(PartRole r);

}  // namespace benchtau
