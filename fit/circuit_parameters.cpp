// benchtau: the circuit fit's unknowns and their priors.
#include "fit/circuit_parameters.h"

#include <algorithm>
#include <cmath>

namespace benchtau {
namespace {

bool takes_vf(PartRole role) { return role == PartRole::diode || role == PartRole::led; }

std::string unit_of(PartRole role) {
  switch (role) {
    case PartRole::timing_cap:
      return "F";
    case PartRole::diode:
    case PartRole::led:
      return "V";
    default:
      return "ohm";
  }
}

// A chip figure as an unknown: its design value (the family's typical one unless the design
// file overrides it) as the prior's centre. A figure the design file gives is that chip's,
// known to about 5 % (a tenth of the spread otherwise); a positive figure the design sets to
// zero (an ideal switch, no delay) is fitted on a linear scale around zero, with `zero_sigma`.
FitParameter figure(std::string id, std::string unit, double TimerFigures::*f, const Design& design,
                    Transform t, double sigma, double zero_sigma) {
  FitParameter p;
  p.id = std::move(id);
  p.unit = std::move(unit);
  p.slot.figure = f;
  p.nominal = design.figures.*f;
  const bool given = std::find(design.figures_given.begin(), design.figures_given.end(), f) !=
                     design.figures_given.end();
  if (t == Transform::log && !(p.nominal > 0.0)) {
    t = Transform::linear;
    sigma = zero_sigma;
  }
  p.transform = t;
  if (given) sigma = t == Transform::log ? std::fmin(sigma, 0.05) : 0.1 * sigma;
  p.prior = {p.to_x(p.nominal), sigma};
  return p;
}

}  // namespace

double FitParameter::to_x(double value) const {
  return transform == Transform::log ? std::log(value) : value;
}

double FitParameter::to_value(double x) const {
  return transform == Transform::log ? std::exp(x) : x;
}

Prior prior_for_tolerance(double nominal, double tolerance) {
  return {std::log(nominal), std::log1p(tolerance) / 2.0};
}

std::vector<FitParameter> circuit_parameters(const Design& design,
                                             std::span<const double> supply_V) {
  std::vector<FitParameter> params;
  for (const PartSlot& s : part_slots(design)) {
    const Part& part = design.parts[s.part];
    FitParameter p;
    p.id = part.ref;
    p.unit = unit_of(part.role);
    p.slot.value = s.field;
    p.part = static_cast<std::ptrdiff_t>(s.part);
    if (takes_vf(part.role)) {
      // A forward voltage varies about 50 mV part to part and with temperature (common
      // practice, from memory); it has no marked tolerance.
      p.slot.is_vf = true;
      p.transform = Transform::linear;
      p.nominal = part.vf_V;
      p.prior = {part.vf_V, 0.05};
    } else {
      if (!(part.value > 0.0) || !std::isfinite(part.value)) continue;
      p.nominal = part.value;
      const double tol = part.tolerance > 0.0 ? part.tolerance : 0.1;
      p.prior = prior_for_tolerance(part.value, tol);
    }
    params.push_back(std::move(p));
  }
  // A bench supply or regulator, read on a meter: within about 1 % (common practice).
  for (std::size_t k = 0; k < supply_V.size(); ++k) {
    FitParameter p;
    p.id = supply_V.size() > 1 ? "supply (capture " + std::to_string(k + 1) + ")" : "supply";
    p.unit = "V";
    p.slot.value = &CircuitValues::supply_V;
    p.nominal = supply_V[k];
    p.prior = {std::log(supply_V[k]), 0.01};
    p.capture = static_cast<std::ptrdiff_t>(k);
    params.push_back(std::move(p));
  }

  // The chip's figures, free within their part-to-part spread (spreads are typical of the
  // trade, from memory). Fitting them rather than fixing them keeps their effect from being
  // read as a fault: a stiffer discharge switch or a lower output level moves the capacitor's
  // targets as a leakage would.
  const TimerFigures& f = design.figures;
  const Design& d = design;
  const bool bipolar = design.family == Family::bipolar;
  params.push_back(figure("divider resistance", "ohm", &TimerFigures::divider_ohm, d,
                          Transform::log, std::log(1.3), 1e3));
  params.push_back(figure("output high drop", "V", &TimerFigures::out_high_drop_V, d,
                          Transform::linear, std::fmax(f.out_high_drop_spread_V, 0.02), 0.0));
  params.push_back(figure("output source resistance", "ohm", &TimerFigures::out_source_ohm, d,
                          Transform::log, std::log(2.0), 20.0));
  params.push_back(figure("output low level", "V", &TimerFigures::out_low_V, d, Transform::linear,
                          std::fmax(f.out_low_spread_V, 0.01), 0.0));
  params.push_back(figure("output sink resistance", "ohm", &TimerFigures::out_sink_ohm, d,
                          Transform::log, std::log(2.0), 10.0));
  params.push_back(figure("discharge on-resistance", "ohm", &TimerFigures::discharge_on_ohm, d,
                          Transform::log, std::log(3.0), 10.0));
  params.push_back(figure("discharge saturation", "V", &TimerFigures::discharge_sat_V, d,
                          Transform::linear, bipolar ? 0.05 : 0.005, 0.0));
  params.push_back(figure("threshold input current", "A", &TimerFigures::threshold_current_A, d,
                          Transform::linear, bipolar ? 100e-9 : 50e-12, 0.0));
  params.push_back(figure("trigger input current", "A", &TimerFigures::trigger_current_A, d,
                          Transform::linear, bipolar ? 300e-9 : 50e-12, 0.0));
  params.push_back(figure("propagation delay", "s", &TimerFigures::propagation_delay_s, d,
                          Transform::log, std::log(2.0), 100e-9));
  return params;
}

void apply_parameters(std::span<const FitParameter> params, std::span<const double> x,
                      std::size_t capture, FaultPath fault, double fault_S, Circuit& circuit) {
  for (std::size_t k = 0; k < params.size(); ++k) {
    const FitParameter& p = params[k];
    if (p.capture >= 0 && static_cast<std::size_t>(p.capture) != capture) continue;
    const double v = p.to_value(x[k]);
    if (p.slot.value != nullptr) circuit.v.*p.slot.value = v;
    if (p.slot.figure != nullptr) circuit.v.chip.*p.slot.figure = v;
  }
  if (!(fault_S > 0.0)) return;
  switch (fault) {
    case FaultPath::none:
      break;
    case FaultPath::cap_leakage: {
      const double g = fault_S + (circuit.v.leak_ohm < kOpen ? 1.0 / circuit.v.leak_ohm : 0.0);
      circuit.v.leak_ohm = 1.0 / g;
      break;
    }
    case FaultPath::control_load:
      // A load to ground on a decoupled control pin (a leaky decoupling capacitor, flux).
      if (circuit.control == ControlWiring::decoupled) {
        circuit.control = ControlWiring::load_to_ground;
        circuit.v.control_ohm = 1.0 / fault_S;
        circuit.v.control_to_V = 0.0;
      } else if (circuit.control == ControlWiring::load_to_ground &&
                 circuit.v.control_to_V == 0.0) {
        const double g =
            fault_S + (circuit.v.control_ohm < kOpen ? 1.0 / circuit.v.control_ohm : 0.0);
        circuit.v.control_ohm = 1.0 / g;
      }
      break;
  }
}

}  // namespace benchtau
