// benchtau: the steady cycle's times and turnaround voltages alone, for Monte Carlo draws.
//
// The circuit is circuit_model.cpp's, node for node; only the arithmetic is
// arranged for speed. A node is summed in conductances, each branch costing
// one division, and a Thevenin source in series with a resistor joins the
// next node without being turned back into a voltage and a resistance.
#include "src/core/cycle_timing.h"

#include <cmath>

#include "src/core/circuit_parts.h"

namespace benchtau {
namespace {

using circuit_detail::parallel;
using circuit_detail::present;
using circuit_detail::timing_parts_present;

// The branches into one node: conductance g (S) and the sum of v g less the
// currents drawn (A). The node's Thevenin voltage is i / g, its resistance 1 / g.
// A branch of zero resistance (an ideal output or switch) holds the node at
// its voltage outright, as in the model.
struct Sum {
  double g = 0.0;
  double i = 0.0;
  bool held = false;
  double held_V = 0.0;

  // A source v behind r; an open branch (kOpen) adds nothing.
  void add(double v, double r) {
    if (!(r < kOpen)) return;
    if (!(r > 0.0)) {
      held = true;
      held_V = v;
      return;
    }
    const double gb = 1.0 / r;
    g += gb;
    i += v * gb;
  }
  // Node s's Thevenin source, less drop_V, in series with r: s.g / (1 + r s.g)
  // is the branch's conductance, with no division for s's own voltage.
  void add_through(const Sum& s, double r, double drop_V = 0.0) {
    if (s.held) {
      add(s.held_V - drop_V, r);
      return;
    }
    if (!(s.g > 0.0) || !(r < kOpen)) return;
    const double k = 1.0 / (1.0 + r * s.g);
    g += s.g * k;
    i += (s.i - drop_V * s.g) * k;
  }
  double v() const { return held ? held_V : i / g; }
};

// A phase's capacitor-node source: target_V behind r_ohm (kOpen: no path).
struct Phase {
  double target_V = 0.0;
  double r_ohm = kOpen;
  double g_S = 0.0;
};

Phase thevenin(const Sum& n) {
  if (n.held) return {n.held_V, 0.0, kOpen};  // zero resistance: infinite conductance
  if (!(n.g > 0.0)) return {};
  const double r = 1.0 / n.g;
  return {n.i * r, r, n.g};
}

// exp(-x). The propagation delay is usually a tiny fraction of a time
// constant, where six terms of the series are exact to double precision
// (the first term left out is below x^6 / 720 < 2e-21) and far cheaper.
double exp_minus(double x) {
  if (x >= 0.0 && x < 1e-3) {
    return 1.0 - x * (1.0 - x * (0.5 - x * (1.0 / 6 - x * (1.0 / 24 - x * (1.0 / 120)))));
  }
  return std::exp(-x);
}

double output_V(const CircuitValues& v, bool high) {
  return high ? v.supply_V - v.chip.out_high_drop_V : v.chip.out_low_V;
}
double output_ohm(const CircuitValues& v, bool high) {
  return high ? v.chip.out_source_ohm : v.chip.out_sink_ohm;
}

// The free discharge pin: pull-up and load to the supply, and the switch when
// on (an LED load conducts only then).
Sum free_discharge(const CircuitValues& v, bool on) {
  Sum d;
  d.add(v.supply_V, v.pullup_ohm);
  if (on) {
    d.add(v.chip.discharge_sat_V, v.chip.discharge_on_ohm);
    d.add(v.supply_V - v.led_vf_V, v.load_ohm);
  } else if (v.led_vf_V == 0.0) {
    d.add(v.supply_V, v.load_ohm);
  }
  return d;
}

// Only the feedback wirings make the control pin differ between phases.
bool phase_dependent(ControlWiring w) {
  return w == ControlWiring::feedback_from_output || w == ControlWiring::feedback_from_discharge;
}

double control_V(const Circuit& c, bool high) {
  const CircuitValues& v = c.v;
  if (c.control == ControlWiring::driven && !present(v.control_ohm)) return v.control_to_V;
  Sum n;
  n.add(2.0 / 3.0 * v.supply_V, 2.0 / 3.0 * v.chip.divider_ohm);
  n.add(0.0, v.probe_ctl_ohm);
  switch (c.control) {
    case ControlWiring::decoupled:
      break;
    case ControlWiring::load_to_ground:
    case ControlWiring::driven:
      n.add(v.control_to_V, v.control_ohm);
      break;
    case ControlWiring::feedback_from_output:
      n.add(output_V(v, high), v.control_ohm + output_ohm(v, high));
      break;
    case ControlWiring::feedback_from_discharge:
      n.add_through(free_discharge(v, !high), v.control_ohm);
      break;
  }
  return n.v();
}

// The discharge node between R1 and R2, with the switch on or off.
Sum discharge_node(const CircuitValues& v, bool on) {
  Sum d;
  d.add(v.supply_V, v.upper_ohm);
  if (on) {
    d.add(v.chip.discharge_sat_V, v.chip.discharge_on_ohm);
    d.add(v.supply_V - v.led_vf_V, v.load_ohm);
  } else if (v.led_vf_V == 0.0) {
    d.add(v.supply_V, v.load_ohm);
  }
  return d;
}

Phase cap_phase(const Circuit& c, bool high) {
  const CircuitValues& v = c.v;
  Sum n;
  switch (c.kind) {
    case CircuitKind::astable_two_resistor:
      n.add_through(discharge_node(v, !high), v.lower_ohm);
      break;
    case CircuitKind::astable_output_resistor:
      n.add(output_V(v, high), output_ohm(v, high) + v.timing_ohm);
      break;
    case CircuitKind::astable_diode_steered:
      if (high) {
        // Charging through the diode, with R2 across it.
        const double drop_V = present(v.lower_ohm)
                                  ? v.diode_vf_V * v.lower_ohm / (v.lower_ohm + v.diode_ohm)
                                  : v.diode_vf_V;
        n.add_through(discharge_node(v, false), parallel(v.diode_ohm, v.lower_ohm), drop_V);
      } else {
        n.add_through(discharge_node(v, true), v.lower_ohm);
      }
      break;
    case CircuitKind::monostable:
      n.add(v.supply_V, v.timing_ohm);
      if (!high) n.add(v.chip.discharge_sat_V, v.chip.discharge_on_ohm);
      break;
  }
  n.add(0.0, v.leak_ohm);
  n.add(0.0, v.probe_cap_ohm);
  n.i -= v.leak_A + v.chip.threshold_current_A + v.chip.trigger_current_A;
  return thevenin(n);
}

}  // namespace

CycleTiming cycle_timing(const Circuit& c) {
  CycleTiming t;
  const CircuitValues& v = c.v;
  const TimerFigures& f = v.chip;
  const bool mono = c.kind == CircuitKind::monostable;
  // The stops predict_cycle finds, in the order cheapest first: only whether
  // the circuit stops matters here, not why.
  if (!timing_parts_present(c)) return t;
  if (c.control == ControlWiring::feedback_from_discharge &&
      c.kind != CircuitKind::astable_output_resistor)
    return t;
  const double ctl_high_V = control_V(c, true);
  const double ctl_low_V = phase_dependent(c.control) ? control_V(c, false) : ctl_high_V;
  const double reset_min_V =
      c.reset == ResetWiring::control ? std::fmin(ctl_high_V, ctl_low_V) : v.supply_V;
  if (reset_min_V < f.reset_threshold_V) return t;
  const double upper_V = ctl_high_V, lower_V = 0.5 * ctl_low_V;
  if (!mono && !(upper_V > lower_V)) return t;
  const Phase hs = cap_phase(c, true);
  if (!(hs.target_V - upper_V > 0.0) || !(hs.r_ohm < kOpen)) return t;
  const Phase ls = cap_phase(c, false);
  if (!mono && !(lower_V - ls.target_V > 0.0)) return t;
  if (c.reset == ResetWiring::cap_node && (mono ? ls.target_V : lower_V) < f.reset_threshold_V)
    return t;

  // Each phase switches a propagation delay after its threshold crossing (as
  // in the model); a monostable's pulse starts from the discharged floor.
  // tpd / tau is tpd g / C, and the two logarithms' ratios share one
  // division: divisions set the pace here.
  const double tpd = f.propagation_delay_s;
  const double th = hs.r_ohm * v.cap_F, tl = ls.r_ohm * v.cap_F;
  const double tpd_per_F = tpd / v.cap_F;
  const double start_V =
      mono ? ls.target_V : ls.target_V + (lower_V - ls.target_V) * exp_minus(tpd_per_F * ls.g_S);
  const double peak_V = hs.target_V + (upper_V - hs.target_V) * exp_minus(tpd_per_F * hs.g_S);
  t.oscillates = true;
  t.cap_max_V = peak_V;
  t.cap_min_V = start_V;
  const double high_margin_V = hs.target_V - upper_V;
  if (mono) {
    t.high_s = th * std::log((hs.target_V - start_V) / high_margin_V) + tpd;
    t.low_s = tl * std::log(100.0);  // recovery to within 1 % of the floor, as in the model
    return t;
  }
  const double low_margin_V = lower_V - ls.target_V;
  const double per_margins = 1.0 / (high_margin_V * low_margin_V);
  t.high_s = th * std::log((hs.target_V - start_V) * low_margin_V * per_margins) + tpd;
  t.low_s = tl * std::log((peak_V - ls.target_V) * high_margin_V * per_margins) + tpd;
  t.period_s = t.high_s + t.low_s;
  t.frequency_Hz = 1.0 / t.period_s;
  t.duty = t.high_s * t.frequency_Hz;
  return t;
}

}  // namespace benchtau
