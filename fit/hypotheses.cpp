// benchtau: which explanations a design has, and their prior weights.
#include "fit/hypotheses.h"

#include <cmath>

namespace benchtau {
namespace {

// A part that is off: its ln value spreads 0.4 about where its kind fails (a factor of 1.5 at
// one sigma), wide enough for a value that has gone a long way.
constexpr double kOffSigma = 0.4;

bool is_cap_kind(PartKind k) {
  switch (k) {
    case PartKind::film:
    case PartKind::ceramic:
    case PartKind::c0g:
    case PartKind::x7r:
    case PartKind::electrolytic:
    case PartKind::tantalum:
      return true;
    default:
      return false;
  }
}

// How often a part of this kind is the fault, relative to a healthy board, and which way its
// value goes when it is (ln of the typical factor). Common practice, from memory
// (hypotheses.h): resistors fail upward (film cracks, carbon drift, a joint going high), and
// capacitors lose capacitance (drying, ageing, self-healing of film); the opposite ways are
// rarer, not impossible, so the prior's spread (kOffSigma) leaves room for them.
struct FailureMode {
  double weight = 0.02;
  double log_shift = 0.0;
};

FailureMode failure_mode(const Part& p) {
  const bool cap = p.role == PartRole::timing_cap || is_cap_kind(p.kind);
  switch (p.kind) {
    case PartKind::electrolytic:
      return {0.20, std::log(0.6)};
    case PartKind::tantalum:
      return {0.05, std::log(0.8)};
    case PartKind::x7r:
      return {0.05, std::log(0.8)};
    case PartKind::ceramic:
      return {0.03, std::log(0.85)};
    case PartKind::film:
      return {0.01, std::log(0.85)};
    case PartKind::c0g:
      return {0.005, std::log(0.9)};
    default:
      break;
  }
  if (cap) return {0.05, std::log(0.8)};
  FailureMode m;
  switch (p.kind) {
    case PartKind::carbon_film:
      m = {0.04, std::log(1.3)};
      break;
    case PartKind::metal_film:
    case PartKind::wirewound:
      m = {0.01, std::log(1.2)};
      break;
    default:
      m = {0.02, std::log(1.25)};
      break;
  }
  if (p.value >= 1e6) {
    m.weight += 0.03;
    m.log_shift = std::log(1.3);
  }
  return m;
}

double leakage_weight(const Part* cap) {
  if (cap == nullptr) return 0.02;
  switch (cap->kind) {
    case PartKind::electrolytic:
      return 0.10;
    case PartKind::tantalum:
      return 0.05;
    default:
      return 0.02;  // flux or moisture, whatever the capacitor
  }
}

// The resistance the capacitor charges through, for the leakage's range.
double charge_path_ohm(const Design& d) {
  double r = 0.0;
  for (const Part& p : d.parts) {
    if (p.role == PartRole::upper || p.role == PartRole::lower || p.role == PartRole::timing_res) {
      r += p.value;
    }
  }
  return r > 0.0 ? r : 10e3;
}

}  // namespace

std::vector<Explanation> explanations(const Design& design, std::span<const FitParameter> params) {
  std::vector<Explanation> out;
  const std::vector<Prior> base = design_priors(params);
  Explanation healthy;
  healthy.spec.priors = base;
  out.push_back(healthy);

  for (std::size_t i = 0; i < params.size(); ++i) {
    const FitParameter& f = params[i];
    if (f.part < 0 || f.transform != Transform::log) continue;
    const Part& part = design.parts[static_cast<std::size_t>(f.part)];
    const FailureMode m = failure_mode(part);
    Explanation e;
    e.kind = ExplanationKind::part_off;
    e.ref = part.ref;
    e.param = static_cast<std::ptrdiff_t>(i);
    e.weight = m.weight;
    e.spec.priors = base;
    e.spec.priors[i] = {std::log(f.nominal) + m.log_shift, kOffSigma};
    out.push_back(std::move(e));
  }

  const Part* cap = design.part_with(PartRole::timing_cap);
  {
    // From a thousand times the charging resistance (beyond which nothing shows) to a third
    // of it (beyond which the astable stops).
    const double rt = charge_path_ohm(design);
    Explanation e;
    e.kind = ExplanationKind::cap_leakage;
    e.ref = (cap != nullptr ? cap->ref : std::string("C")) + "-leakage";
    e.weight = leakage_weight(cap);
    e.spec.priors = base;
    e.spec.fault = FaultPath::cap_leakage;
    e.lo_S = 1.0 / (1000.0 * rt);
    e.hi_S = 3.0 / rt;
    out.push_back(std::move(e));
  }
  if (design.control == ControlWiring::decoupled) {
    // A leaky decoupling capacitor or flux: from a hundredth of the pin's own impedance (two
    // thirds of a divider resistor) to a hundred times it.
    const double rd = 2.0 / 3.0 * design.figures.divider_ohm;
    Explanation e;
    e.kind = ExplanationKind::control_load;
    e.ref = "control-pin-load";
    e.weight = 0.03;
    e.spec.priors = base;
    e.spec.fault = FaultPath::control_load;
    e.lo_S = 1.0 / (100.0 * rd);
    e.hi_S = 10.0 / rd;
    out.push_back(std::move(e));
  }
  return out;
}

}  // namespace benchtau
