// benchtau: which part roles each circuit and control wiring needs and allows.
#include <fmt/format.h>

#include <array>
#include <string>

#include "src/core/design_sections.h"

namespace benchtau::design_detail {
namespace {

using design_toml::Reader;

constexpr std::array kRoleOrder{PartRole::upper,      PartRole::lower,    PartRole::timing_res,
                                PartRole::timing_cap, PartRole::diode,    PartRole::control_res,
                                PartRole::pullup,     PartRole::load_res, PartRole::led};

// The discharge pin is free of the timing path only when the output drives
// the timing resistor; only then can it carry a pull-up of its own.
bool discharge_pin_free(CircuitKind k) { return k == CircuitKind::astable_output_resistor; }

bool control_has_resistor(ControlWiring c) {
  return c == ControlWiring::load_to_ground || c == ControlWiring::feedback_from_output ||
         c == ControlWiring::feedback_from_discharge || c == ControlWiring::driven;
}

bool uses(CircuitKind k, ControlWiring c, PartRole role) {
  const bool two_resistor =
      k == CircuitKind::astable_two_resistor || k == CircuitKind::astable_diode_steered;
  switch (role) {
    case PartRole::upper:
    case PartRole::lower:
      return two_resistor;
    case PartRole::diode:
      return k == CircuitKind::astable_diode_steered;
    case PartRole::timing_res:
      return !two_resistor;
    case PartRole::timing_cap:
    case PartRole::load_res:
    case PartRole::led:
      return true;
    case PartRole::control_res:
      return control_has_resistor(c);
    case PartRole::pullup:
      return discharge_pin_free(k);
  }
  return false;
}

std::string circuit_phrase(CircuitKind k) {
  const std::string_view word = circuit_kind_name(k);
  return fmt::format("{} {} circuit", word.front() == 'a' ? "an" : "a", word);
}

// Why a role is needed ("an astable-two-resistor circuit", "control \"driven\""),
// or empty when it is optional.
std::string needed_by(CircuitKind k, ControlWiring c, PartRole role) {
  switch (role) {
    case PartRole::control_res:
      // A driven pin may be driven stiffly; its source resistance is optional.
      if (control_has_resistor(c) && c != ControlWiring::driven) {
        return fmt::format("control \"{}\"", control_wiring_name(c));
      }
      return {};
    case PartRole::pullup:
      if (c == ControlWiring::feedback_from_discharge) {
        return fmt::format("control \"{}\"", control_wiring_name(c));
      }
      return {};
    case PartRole::load_res:
    case PartRole::led:
      return {};
    default:
      break;
  }
  return uses(k, c, role) ? circuit_phrase(k) : std::string();
}

std::string roles_of(CircuitKind k, ControlWiring c) {
  std::string out;
  for (PartRole role : kRoleOrder) {
    if (!uses(k, c, role)) continue;
    if (!out.empty()) out += ", ";
    out += part_role_name(role);
  }
  return out;
}

// The line of a part's role value, which is where a role problem is.
std::size_t role_line(const toml::table* parts_table, const Part& part) {
  if (parts_table != nullptr) {
    if (const toml::node* role = (*parts_table)[part.ref]["role"].node()) {
      return role->source().begin.line;
    }
  }
  return part.line;
}

}  // namespace

void check_roles(const Reader& r, const Design& design, const toml::table* parts_table) {
  const CircuitKind k = design.kind;
  const ControlWiring c = design.control;
  for (std::size_t i = 0; i < design.parts.size(); ++i) {
    const Part& part = design.parts[i];
    const std::size_t line = role_line(parts_table, part);
    const std::string role =
        fmt::format("role \"{}\" in part {}", part_role_name(part.role), part.ref);
    if (!uses(k, c, part.role)) {
      if (part.role == PartRole::pullup) {
        r.fail_at_line(line, fmt::format("{} needs a discharge pin outside the timing path, which "
                                         "only an astable-output-resistor circuit has; this is {}",
                                         role, circuit_phrase(k)));
      }
      if (part.role == PartRole::control_res) {
        r.fail_at_line(line, fmt::format("{} is not used with control \"{}\"; this circuit's "
                                         "roles: {}",
                                         role, control_wiring_name(c), roles_of(k, c)));
      }
      r.fail_at_line(line, fmt::format("{} is not used by {}; this circuit's roles: {}", role,
                                       circuit_phrase(k), roles_of(k, c)));
    }
    for (std::size_t j = 0; j < i; ++j) {
      if (design.parts[j].role == part.role) {
        r.fail_at_line(line, fmt::format("{} is taken already by part {} (line {})", role,
                                         design.parts[j].ref, design.parts[j].line));
      }
    }
  }
  if (const Part* led = design.part_with(PartRole::led);
      led != nullptr && design.part_with(PartRole::load_res) == nullptr) {
    r.fail_at_line(role_line(parts_table, *led),
                   fmt::format("role \"led\" in part {} is in series with a load-res part, and "
                               "the design has none",
                               led->ref));
  }
  for (PartRole role : kRoleOrder) {
    const std::string why = needed_by(k, c, role);
    if (why.empty() || design.part_with(role) != nullptr) continue;
    if (parts_table == nullptr) {
      r.fail_at_line(1, fmt::format("the design has no [parts]; {} needs a part in role \"{}\"",
                                    why, part_role_name(role)));
    }
    r.fail(*parts_table, fmt::format("[parts] has no part in role \"{}\", which {} needs",
                                     part_role_name(role), why));
  }
}

}  // namespace benchtau::design_detail
