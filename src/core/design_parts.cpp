// benchtau: one entry of a design file's [parts]: value, tolerance, kind, ratings, role.
#include <fmt/format.h>

#include <array>
#include <charconv>
#include <cmath>
#include <limits>
#include <string>

#include "src/core/design_sections.h"

namespace benchtau::design_detail {
namespace {

using design_toml::Label;
using design_toml::Reader;
using design_toml::Sign;
using design_toml::Word;

constexpr std::array kRoles{PartRole::upper,    PartRole::lower,      PartRole::timing_cap,
                            PartRole::diode,    PartRole::timing_res, PartRole::control_res,
                            PartRole::load_res, PartRole::led,        PartRole::pullup};
constexpr std::array kKinds{PartKind::metal_film,   PartKind::carbon_film,  PartKind::wirewound,
                            PartKind::film,         PartKind::ceramic,      PartKind::c0g,
                            PartKind::x7r,          PartKind::electrolytic, PartKind::tantalum,
                            PartKind::signal_diode, PartKind::led};

constexpr std::array<std::string_view, 6> kPartKeys{"value",   "tolerance", "kind",
                                                    "rated_V", "vf_V",      "role"};

std::string_view group_name(PartGroup g) {
  switch (g) {
    case PartGroup::resistor:
      return "a resistor";
    case PartGroup::capacitor:
      return "a capacitor";
    case PartGroup::diode:
      return "a diode";
  }
  return "a resistor";
}

// Tolerances usual for each kind when the file gives none: common practice of
// the trade, from memory, not from one maker. Diodes have none: their vf_V is
// taken as given.
double default_tolerance(PartKind kind, PartGroup group) {
  switch (kind) {
    case PartKind::metal_film:
      return 0.01;
    case PartKind::carbon_film:
    case PartKind::wirewound:
    case PartKind::film:
    case PartKind::c0g:
      return 0.05;
    case PartKind::ceramic:
    case PartKind::x7r:
    case PartKind::tantalum:
      return 0.10;
    case PartKind::electrolytic:
      return 0.20;
    case PartKind::signal_diode:
    case PartKind::led:
      return std::numeric_limits<double>::quiet_NaN();
    case PartKind::unknown:
      break;
  }
  // Unknown kind: the general-purpose default of each sort of part.
  if (group == PartGroup::resistor) return 0.05;
  if (group == PartGroup::capacitor) return 0.20;
  return std::numeric_limits<double>::quiet_NaN();
}

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

// "1%", "0.5 %" or a plain fraction 0.01; it must lie strictly between 0 and 100 %.
double read_tolerance(const Reader& r, const toml::node& n, Label label) {
  if (n.is_number()) {
    const double fraction = r.number(n, label, Sign::any);
    if (!(fraction > 0.0 && fraction < 1.0)) {
      r.fail(n, fmt::format("{} {}{} must lie between 0 and 1 (a plain number is a fraction: 0.05 "
                            "is 5 %)",
                            label.key, fraction, label.in()));
    }
    return fraction;
  }
  if (!n.is_string()) {
    r.fail(n, fmt::format("{} must be a percentage such as \"1%\" or a fraction such as 0.01, "
                          "found {}",
                          label.text(), design_toml::describe(n)));
  }
  const std::string text = *n.value_exact<std::string>();
  std::string_view s = trim(text);
  if (s.empty() || s.back() != '%') {
    r.fail(n, fmt::format("{} \"{}\"{} must end in % (\"1%\") or be a plain number as a fraction "
                          "(0.01)",
                          label.key, text, label.in()));
  }
  s = trim(s.substr(0, s.size() - 1));
  double percent = 0.0;
  const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), percent);
  if (s.empty() || ec != std::errc() || end != s.data() + s.size()) {
    r.fail(n, fmt::format("{} \"{}\"{} is not a percentage such as \"1%\"", label.key, text,
                          label.in()));
  }
  if (!(percent > 0.0 && percent < 100.0)) {
    r.fail(n, fmt::format("{} \"{}\"{} must lie between 0 and 100 %", label.key, text, label.in()));
  }
  return percent / 100.0;
}

}  // namespace

PartGroup role_group(PartRole r) {
  switch (r) {
    case PartRole::timing_cap:
      return PartGroup::capacitor;
    case PartRole::diode:
    case PartRole::led:
      return PartGroup::diode;
    default:
      return PartGroup::resistor;
  }
}

std::optional<PartGroup> kind_group(PartKind k) {
  switch (k) {
    case PartKind::unknown:
      return std::nullopt;
    case PartKind::metal_film:
    case PartKind::carbon_film:
    case PartKind::wirewound:
      return PartGroup::resistor;
    case PartKind::signal_diode:
    case PartKind::led:
      return PartGroup::diode;
    default:
      return PartGroup::capacitor;
  }
}

Part read_part(const Reader& r, const toml::key& ref, const toml::node& entry) {
  const std::string context = fmt::format("part {}", ref.str());
  const toml::table& t =
      r.table(entry, context, "such as { value = \"10k\", tolerance = \"1%\", role = \"upper\" }");
  r.check_keys(t, kPartKeys, fmt::format("in {}", context));

  Part part;
  part.ref = std::string(ref.str());
  part.line = ref.source().begin.line;

  std::vector<Word<PartRole>> roles;
  std::vector<std::string_view> role_texts;
  for (PartRole role : kRoles) {
    roles.push_back({part_role_name(role), role});
    role_texts.push_back(part_role_name(role));
  }
  const toml::node* role = t.get("role");
  if (role == nullptr) {
    r.fail(ref,
           fmt::format("{} has no role; accepted: {}", context, design_toml::join(role_texts)));
  }
  part.role = r.word<PartRole>(*role, {"role", context}, roles);
  const PartGroup group = role_group(part.role);

  if (const toml::node* kind = t.get("kind")) {
    std::vector<Word<PartKind>> kinds;
    for (PartKind k : kKinds) kinds.push_back({part_kind_name(k), k});
    part.kind = r.word<PartKind>(*kind, {"kind", context}, kinds, /*ignore_case=*/true);
    if (kind_group(part.kind) != group) {
      r.fail(*kind,
             fmt::format("kind \"{}\" in {} is {}, and role \"{}\" takes {}",
                         part_kind_name(part.kind), context, group_name(*kind_group(part.kind)),
                         part_role_name(part.role), group_name(group)));
    }
  }

  const toml::node* value = t.get("value");
  const toml::node* vf = t.get("vf_V");
  if (group == PartGroup::diode) {
    if (value != nullptr) {
      r.fail(*value,
             fmt::format("{} is a diode: give its forward voltage as vf_V, not value", context));
    }
    if (vf == nullptr) {
      r.fail(ref, fmt::format("{} is a diode and needs vf_V, its forward voltage (such as vf_V = "
                              "0.6)",
                              context));
    }
    part.vf_V = r.number(*vf, {"vf_V", context}, Sign::positive);
  } else {
    if (vf != nullptr) {
      r.fail(*vf, fmt::format("vf_V in {} applies only to diodes and LEDs", context));
    }
    if (value == nullptr) r.fail(ref, fmt::format("{} has no value", context));
    const std::string_view unit = group == PartGroup::resistor ? "ohm" : "F";
    part.value = r.eng(*value, {"value", context}, unit, Sign::positive);
  }

  if (const toml::node* rated = t.get("rated_V")) {
    if (group != PartGroup::capacitor) {
      r.fail(*rated, fmt::format("rated_V in {} applies only to capacitors", context));
    }
    part.rated_V = r.number(*rated, {"rated_V", context}, Sign::positive);
  }

  if (const toml::node* tolerance = t.get("tolerance")) {
    part.tolerance = read_tolerance(r, *tolerance, {"tolerance", context});
  } else {
    part.tolerance = default_tolerance(part.kind, group);
  }
  return part;
}

}  // namespace benchtau::design_detail
