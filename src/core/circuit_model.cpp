// benchtau: the exact steady cycle of each timer circuit.
//
// Every node the capacitor sees is linear in each phase, so the capacitor
// node is a Thevenin source (target_V behind R) and each phase is one
// exponential, tau = R C. The control pin is likewise a Thevenin sum of the
// chip's divider (2/3 Vs behind 2/3 Rd) and whatever the wiring adds; the
// lower threshold is always half of it (common practice: the lower two divider
// resistors halve the control voltage).
#include <cmath>
#include <limits>

#include "src/core/circuit.h"
#include "src/core/circuit_parts.h"

namespace benchtau {
namespace {

using circuit_detail::parallel;
using circuit_detail::present;
using circuit_detail::timing_parts_present;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Sum of branches into one node: each a source V behind R, or a current drawn.
// A branch of zero resistance (a design may give an ideal output or switch) holds the node
// at its voltage outright.
struct Node {
  double g = 0.0;  // total conductance, S
  double i = 0.0;  // sum of V/R less currents drawn, A
  bool held = false;
  double held_V = 0.0;

  void branch(double v, double r) {
    if (!(r < kOpen)) return;
    if (!(r > 0.0)) {
      held = true;
      held_V = v;
      return;
    }
    g += 1.0 / r;
    i += v / r;
  }
  void draw(double amps) { i -= amps; }
  double v() const { return held ? held_V : i / g; }
  double r() const { return held ? 0.0 : 1.0 / g; }
};

// A Thevenin pair.
struct Source {
  double v = 0.0;
  double r = kOpen;
};

Source thevenin(const Node& n) {
  if (n.held) return {n.held_V, 0.0};
  if (!(n.g > 0.0)) return {0.0, kOpen};
  return {n.v(), n.r()};
}

// The output pin as a source in each phase.
Source output(const CircuitValues& v, bool high) {
  return high ? Source{v.supply_V - v.chip.out_high_drop_V, v.chip.out_source_ohm}
              : Source{v.chip.out_low_V, v.chip.out_sink_ohm};
}

// The free discharge pin's own Thevenin source: pull-up and load to the
// supply, and the switch to ground when on. An LED load conducts only while
// the switch is on (it sinks into the discharge pin then).
Source free_discharge(const CircuitValues& v, bool on) {
  Node d;
  d.branch(v.supply_V, v.pullup_ohm);
  if (on) {
    d.branch(v.chip.discharge_sat_V, v.chip.discharge_on_ohm);
    d.branch(v.supply_V - v.led_vf_V, v.load_ohm);
  } else if (v.led_vf_V == 0.0) {
    d.branch(v.supply_V, v.load_ohm);
  }
  return thevenin(d);
}

// The control pin's voltage in one phase.
double control_V(const Circuit& c, bool high) {
  const CircuitValues& v = c.v;
  if (c.control == ControlWiring::driven && !present(v.control_ohm)) return v.control_to_V;
  Node n;
  n.branch(2.0 / 3.0 * v.supply_V, 2.0 / 3.0 * v.chip.divider_ohm);
  n.branch(0.0, v.probe_ctl_ohm);
  switch (c.control) {
    case ControlWiring::decoupled:
      break;
    case ControlWiring::load_to_ground:
    case ControlWiring::driven:
      n.branch(v.control_to_V, v.control_ohm);
      break;
    case ControlWiring::feedback_from_output: {
      const Source out = output(v, high);
      n.branch(out.v, v.control_ohm + out.r);
      break;
    }
    case ControlWiring::feedback_from_discharge: {
      const Source d = free_discharge(v, !high);
      if (d.r < kOpen) n.branch(d.v, v.control_ohm + d.r);
      break;
    }
  }
  return n.v();
}

// The Thevenin source the capacitor node sees in one phase, less what the
// comparator inputs and leakage draw.
Source cap_source(const Circuit& c, bool high) {
  const CircuitValues& v = c.v;
  Node n;
  switch (c.kind) {
    case CircuitKind::astable_two_resistor: {
      Node d;  // the discharge node between R1 and R2
      d.branch(v.supply_V, v.upper_ohm);
      if (high) {
        if (v.led_vf_V == 0.0) d.branch(v.supply_V, v.load_ohm);
      } else {
        d.branch(v.chip.discharge_sat_V, v.chip.discharge_on_ohm);
        d.branch(v.supply_V - v.led_vf_V, v.load_ohm);
      }
      const Source s = thevenin(d);
      if (s.r < kOpen) n.branch(s.v, s.r + v.lower_ohm);
      break;
    }
    case CircuitKind::astable_output_resistor: {
      const Source out = output(v, high);
      n.branch(out.v, out.r + v.timing_ohm);
      break;
    }
    case CircuitKind::astable_diode_steered: {
      Node d;
      d.branch(v.supply_V, v.upper_ohm);
      if (high) {
        if (v.led_vf_V == 0.0) d.branch(v.supply_V, v.load_ohm);
        // Charging through the diode, with R2 across it.
        const Source s = thevenin(d);
        const double drop_V = present(v.lower_ohm)
                                  ? v.diode_vf_V * v.lower_ohm / (v.lower_ohm + v.diode_ohm)
                                  : v.diode_vf_V;
        if (s.r < kOpen) n.branch(s.v - drop_V, s.r + parallel(v.diode_ohm, v.lower_ohm));
      } else {
        // Discharging through R2; the diode is reverse biased.
        d.branch(v.chip.discharge_sat_V, v.chip.discharge_on_ohm);
        d.branch(v.supply_V - v.led_vf_V, v.load_ohm);
        const Source s = thevenin(d);
        if (s.r < kOpen) n.branch(s.v, s.r + v.lower_ohm);
      }
      break;
    }
    case CircuitKind::monostable:
      n.branch(v.supply_V, v.timing_ohm);
      if (!high) n.branch(v.chip.discharge_sat_V, v.chip.discharge_on_ohm);
      break;
  }
  n.branch(0.0, v.leak_ohm);
  n.branch(0.0, v.probe_cap_ohm);
  n.draw(v.leak_A + v.chip.threshold_current_A + v.chip.trigger_current_A);
  return thevenin(n);
}

// Output level at the end of a phase, loaded by what the pin drives.
double loaded_output_V(const Circuit& c, bool high, double cap_end_V, double ctl_V) {
  const CircuitValues& v = c.v;
  const Source out = output(v, high);
  Node n;
  n.branch(out.v, out.r);
  n.branch(0.0, v.probe_out_ohm);
  if (c.kind == CircuitKind::astable_output_resistor) n.branch(cap_end_V, v.timing_ohm);
  if (c.control == ControlWiring::feedback_from_output) n.branch(ctl_V, v.control_ohm);
  return n.v();
}

}  // namespace

CyclePrediction predict_cycle(const Circuit& c) {
  CyclePrediction p;
  const CircuitValues& v = c.v;
  p.ctl_high_V = control_V(c, true);
  p.ctl_low_V = control_V(c, false);
  const double upper_V = p.ctl_high_V;
  const double lower_V = 0.5 * p.ctl_low_V;
  p.reset_min_V = v.supply_V;
  if (c.reset == ResetWiring::control) p.reset_min_V = std::fmin(p.ctl_high_V, p.ctl_low_V);

  if (!timing_parts_present(c)) {
    p.stop = Stop::no_timing_path;
    return p;
  }
  if (c.control == ControlWiring::feedback_from_discharge &&
      c.kind != CircuitKind::astable_output_resistor) {
    p.stop = Stop::unsupported_wiring;
    return p;
  }
  if (p.reset_min_V < v.chip.reset_threshold_V) {
    p.stop = Stop::held_in_reset;
    return p;
  }

  const Source hs = cap_source(c, true);
  const Source ls = cap_source(c, false);
  p.high = {hs.r * v.cap_F, hs.v, lower_V, upper_V, kNaN, hs.v - upper_V};
  p.low = {ls.r * v.cap_F, ls.v, upper_V, lower_V, kNaN, lower_V - ls.v};
  p.cap_max_V = upper_V;
  p.cap_min_V = lower_V;
  const bool mono = c.kind == CircuitKind::monostable;
  if (mono) {
    p.high.start_V = ls.v;  // the pulse starts from the discharged floor
    p.low.margin_V = kNaN;
    p.cap_min_V = ls.v;
  }
  if (!(upper_V > lower_V) && !mono) {
    p.stop = Stop::thresholds_crossed;
    return p;
  }
  if (!(p.high.margin_V > 0.0) || !(hs.r < kOpen)) {
    p.stop = Stop::charge_short_of_upper;
    return p;
  }
  if (!mono && !(p.low.margin_V > 0.0)) {
    p.stop = Stop::discharge_short_of_lower;
    return p;
  }
  if (c.reset == ResetWiring::cap_node) {
    p.reset_min_V = p.cap_min_V;
    if (p.cap_min_V < v.chip.reset_threshold_V) {
      p.stop = Stop::held_in_reset;
      return p;
    }
  }

  // Each phase switches a propagation delay after its threshold crossing, so
  // the node overshoots both thresholds a little; the overshoot at the lower
  // one depends only on that threshold, which closes the cycle exactly.
  const double tpd = v.chip.propagation_delay_s;
  const double th = p.high.tau_s, tl = p.low.tau_s;
  const double start_V = mono ? p.high.start_V : ls.v + (lower_V - ls.v) * std::exp(-tpd / tl);
  const double peak_V = hs.v + (upper_V - hs.v) * std::exp(-tpd / th);
  p.high.start_V = start_V;
  p.high.duration_s = th * std::log((hs.v - start_V) / (hs.v - upper_V)) + tpd;
  p.low.start_V = peak_V;
  p.cap_max_V = peak_V;
  if (mono) {
    // Recovery: the discharge brings the node to within 1 % of its floor.
    p.low.duration_s = tl * std::log(100.0);
    p.low.end_V = ls.v + 0.01 * (peak_V - ls.v);
    p.high_s = p.high.duration_s;
    p.low_s = p.low.duration_s;
    p.period_s = p.frequency_Hz = p.duty = kNaN;
  } else {
    p.low.duration_s = tl * std::log((peak_V - ls.v) / (lower_V - ls.v)) + tpd;
    p.cap_min_V = start_V;
    p.high_s = p.high.duration_s;
    p.low_s = p.low.duration_s;
    p.period_s = p.high_s + p.low_s;
    p.frequency_Hz = 1.0 / p.period_s;
    p.duty = p.high_s / p.period_s;
  }
  p.out_high_V = loaded_output_V(c, true, p.cap_max_V, p.ctl_high_V);
  p.out_low_V = loaded_output_V(c, false, p.cap_min_V, p.ctl_low_V);
  p.oscillates = true;

  // Marginal: a margin within the spread of the figure that sets it.
  const bool output_sets_targets = c.kind == CircuitKind::astable_output_resistor;
  const bool output_sets_thresholds = c.control == ControlWiring::feedback_from_output;
  const double offset = v.chip.comparator_offset_V;
  const double high_spread =
      offset +
      ((output_sets_targets || output_sets_thresholds) ? v.chip.out_high_drop_spread_V : 0.0);
  const double low_spread =
      offset + ((output_sets_targets || output_sets_thresholds) ? v.chip.out_low_spread_V : 0.0);
  if (p.high.margin_V < high_spread) {
    p.marginal = true;
    p.deciding_figure = high_spread > offset ? "output high level" : "comparator offset";
  }
  if (!mono && p.low.margin_V < low_spread &&
      (!p.marginal || p.low.margin_V / low_spread < p.high.margin_V / high_spread)) {
    p.marginal = true;
    p.deciding_figure = low_spread > offset ? "output low level" : "comparator offset";
  }
  return p;
}

}  // namespace benchtau
