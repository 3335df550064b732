// benchtau: a design's parts, where their values land in the circuit, and their names.
#include "src/core/design.h"

namespace benchtau {
namespace {

double CircuitValues::*field_for(PartRole role) {
  switch (role) {
    case PartRole::upper:
      return &CircuitValues::upper_ohm;
    case PartRole::lower:
      return &CircuitValues::lower_ohm;
    case PartRole::timing_cap:
      return &CircuitValues::cap_F;
    case PartRole::diode:
      return &CircuitValues::diode_vf_V;
    case PartRole::timing_res:
      return &CircuitValues::timing_ohm;
    case PartRole::control_res:
      return &CircuitValues::control_ohm;
    case PartRole::load_res:
      return &CircuitValues::load_ohm;
    case PartRole::led:
      return &CircuitValues::led_vf_V;
    case PartRole::pullup:
      return &CircuitValues::pullup_ohm;
  }
  return nullptr;
}

// Diodes and LEDs carry their forward voltage instead of a value.
bool takes_vf(PartRole role) { return role == PartRole::diode || role == PartRole::led; }

}  // namespace

const Part* Design::part_with(PartRole role) const {
  for (const Part& p : parts) {
    if (p.role == role) return &p;
  }
  return nullptr;
}

Circuit nominal_circuit(const Design& design) {
  Circuit c;
  c.kind = design.kind;
  c.control = design.control;
  c.reset = design.reset;
  c.v.supply_V = design.supply_V;
  c.v.family = design.family;
  c.v.chip = design.figures;
  c.v.control_to_V = design.control_to_V;
  // A driven control pin with no source resistance given is driven stiffly.
  if (design.control == ControlWiring::driven) c.v.control_ohm = 0.0;
  for (const PartSlot& slot : part_slots(design)) {
    const Part& p = design.parts[slot.part];
    c.v.*slot.field = takes_vf(p.role) ? p.vf_V : p.value;
  }
  c.v.probe_out_ohm = design.out.input_ohm;
  c.v.probe_cap_ohm = design.cap.input_ohm;
  c.v.probe_ctl_ohm = design.ctl.input_ohm;
  return c;
}

std::vector<PartSlot> part_slots(const Design& design) {
  std::vector<PartSlot> slots;
  slots.reserve(design.parts.size());
  for (std::size_t k = 0; k < design.parts.size(); ++k) {
    slots.push_back({k, field_for(design.parts[k].role)});
  }
  return slots;
}

std::string_view part_kind_name(PartKind k) {
  switch (k) {
    case PartKind::unknown:
      return "unknown";
    case PartKind::metal_film:
      return "metal-film";
    case PartKind::carbon_film:
      return "carbon-film";
    case PartKind::wirewound:
      return "wirewound";
    case PartKind::film:
      return "film";
    case PartKind::ceramic:
      return "ceramic";
    case PartKind::c0g:
      return "C0G";
    case PartKind::x7r:
      return "X7R";
    case PartKind::electrolytic:
      return "electrolytic";
    case PartKind::tantalum:
      return "tantalum";
    case PartKind::signal_diode:
      return "signal-diode";
    case PartKind::led:
      return "led";
  }
  return "unknown";
}

std::string_view part_role_name(PartRole r) {
  switch (r) {
    case PartRole::upper:
      return "upper";
    case PartRole::lower:
      return "lower";
    case PartRole::timing_cap:
      return "timing-cap";
    case PartRole::diode:
      return "diode";
    case PartRole::timing_res:
      return "timing-res";
    case PartRole::control_res:
      return "control-res";
    case PartRole::load_res:
      return "load-res";
    case PartRole::led:
      return "led";
    case PartRole::pullup:
      return "pull-up";
  }
  return "upper";
}

}  // namespace benchtau
