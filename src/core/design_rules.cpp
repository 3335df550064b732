// benchtau: design-rule checks: pin currents, LED, reset, input and leakage currents, ratings.
#include "src/core/design_rules.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "src/core/engineering.h"
#include "src/core/stop_margin.h"

namespace benchtau {
namespace {

std::string V(double v) { return format_eng(v, "V"); }
std::string A(double a) { return format_eng(a, "A"); }
std::string ohm(double r) { return format_eng(r, "ohm"); }

void add(Findings& out, const char* code, Severity s, std::string message) {
  out.push_back({code, s, std::move(message)});
}

std::string ref_of(const Design& d, PartRole role, const char* fallback) {
  const Part* p = d.part_with(role);
  return p != nullptr ? p->ref : std::string(fallback);
}

bool bipolar(const Design& d) { return d.family == Family::bipolar; }

// The resistors that run from the supply into the discharge pin, each with the
// voltage it starts from (the supply, less an LED's forward voltage).
struct Feed {
  std::string label;  // "R1 470 ohm"
  double from_V = 0.0;
  double ohm = 0.0;
};

std::vector<Feed> discharge_feeds(const Design& d, const Circuit& c) {
  std::vector<Feed> feeds;
  const CircuitValues& v = c.v;
  auto resistor = [&](PartRole role, double r) {
    if (r > 0.0 && r < kOpen) {
      feeds.push_back({fmt::format("{} {}", ref_of(d, role, "R"), ohm(r)), v.supply_V, r});
    }
  };
  switch (c.kind) {
    case CircuitKind::astable_two_resistor:
    case CircuitKind::astable_diode_steered:
      resistor(PartRole::upper, v.upper_ohm);
      break;
    case CircuitKind::monostable:  // discharge is tied to the capacitor node
      resistor(PartRole::timing_res, v.timing_ohm);
      break;
    case CircuitKind::astable_output_resistor:
      resistor(PartRole::pullup, v.pullup_ohm);
      break;
  }
  if (v.load_ohm > 0.0 && v.load_ohm < kOpen && v.supply_V - v.led_vf_V > v.chip.discharge_sat_V) {
    std::string label = fmt::format("{} {}", ref_of(d, PartRole::load_res, "R"), ohm(v.load_ohm));
    if (v.led_vf_V > 0.0) label += fmt::format(" with {}", ref_of(d, PartRole::led, "the LED"));
    feeds.push_back({label, v.supply_V - v.led_vf_V, v.load_ohm});
  }
  return feeds;
}

// The steady current the discharge switch sinks while on: the feeds and the
// switch (its saturation behind its resistance) meet at the pin.
double discharge_current_A(const std::vector<Feed>& feeds, const TimerFigures& f) {
  if (feeds.empty() || !(f.discharge_on_ohm > 0.0)) return 0.0;
  double g = 1.0 / f.discharge_on_ohm, i = f.discharge_sat_V / f.discharge_on_ohm;
  for (const Feed& x : feeds) {
    g += 1.0 / x.ohm;
    i += x.from_V / x.ohm;
  }
  return (i / g - f.discharge_sat_V) / f.discharge_on_ohm;
}

void discharge_rule(Findings& out, const Design& d, const Circuit& c, const RuleLimits& lim) {
  const std::vector<Feed> feeds = discharge_feeds(d, c);
  const double amps = discharge_current_A(feeds, c.v.chip);
  const double limit = bipolar(d) ? lim.discharge_max_A_bipolar : lim.discharge_max_A_cmos;
  if (!(amps > limit)) return;
  std::string through;
  for (const Feed& f : feeds) through += (through.empty() ? "" : ", ") + f.label;
  // Common practice (memory): R1 of about 1 k or more keeps a bipolar
  // discharge transistor's current near 10 mA at usual supplies; CMOS parts'
  // discharge switches are weaker and are kept to a few milliamps.
  add(out, "discharge_current", Severity::warning,
      fmt::format("the discharge pin sinks {} while on ({} from the {} supply); common practice "
                  "keeps it below {} on a {} timer, about {} or more from the supply",
                  A(amps), through, V(c.v.supply_V), A(limit), family_name(d.family),
                  ohm(c.v.supply_V / limit)));
}

// The output pin's node at the start of a phase, when its load current peaks:
// the pin's own source, the timing resistor to the capacitor (output-resistor
// astables), the control resistor (feedback from the output) and a probe.
double output_current_A(const Circuit& c, const CyclePrediction& p, bool high) {
  const CircuitValues& v = c.v;
  const TimerFigures& f = v.chip;
  const double own_V = high ? v.supply_V - f.out_high_drop_V : f.out_low_V;
  const double own_ohm = high ? f.out_source_ohm : f.out_sink_ohm;
  if (!(own_ohm > 0.0)) return 0.0;
  double g = 1.0 / own_ohm, i = own_V / own_ohm;
  auto branch = [&](double to_V, double r) {
    if (r > 0.0 && r < kOpen) {
      g += 1.0 / r;
      i += to_V / r;
    }
  };
  if (c.kind == CircuitKind::astable_output_resistor) {
    branch(high ? p.cap_min_V : p.cap_max_V, v.timing_ohm);
  }
  if (c.control == ControlWiring::feedback_from_output) {
    branch(high ? p.ctl_high_V : p.ctl_low_V, v.control_ohm);
  }
  branch(0.0, v.probe_out_ohm);
  return std::fabs(own_V - i / g) / own_ohm;
}

void output_rule(Findings& out, const Design& d, const Circuit& c, const CyclePrediction& p,
                 const RuleLimits& lim) {
  if (!p.oscillates) return;
  const double source_A = output_current_A(c, p, true);
  const double sink_A = output_current_A(c, p, false);
  // Common practice (memory): bipolar outputs are rated near 200 mA and are
  // kept to about half that; CMOS outputs manage a few to ten milliamps.
  const double limit = bipolar(d) ? lim.output_max_A_bipolar : lim.output_max_A_cmos;
  const bool high = source_A >= sink_A;
  const double amps = high ? source_A : sink_A;
  if (!(amps > limit)) return;
  add(out, "output_current", Severity::warning,
      fmt::format("the output pin {} {} at the start of each {} phase; common practice keeps a "
                  "{} timer's output below {}",
                  high ? "sources" : "sinks", A(amps), high ? "high" : "low", family_name(d.family),
                  A(limit)));
}

void led_rules(Findings& out, const Design& d, const Circuit& c, const RuleLimits& lim) {
  const Part* led = d.part_with(PartRole::led);
  if (led == nullptr || !(c.v.load_ohm < kOpen)) return;
  const CircuitValues& v = c.v;
  const std::string load = ref_of(d, PartRole::load_res, "the load resistor");
  const double headroom_V = v.supply_V - v.led_vf_V - v.chip.discharge_sat_V;
  if (!(headroom_V > 0.0)) {
    add(out, "led_unlit", Severity::warning,
        fmt::format("{} will not light: the {} supply less the discharge switch's {} does not "
                    "exceed its {} forward voltage",
                    led->ref, V(v.supply_V), V(v.chip.discharge_sat_V), V(v.led_vf_V)));
    return;
  }
  const double amps = headroom_V / (v.load_ohm + v.chip.discharge_on_ohm);
  if (!(amps > lim.led_max_A)) return;
  // Common practice (memory): small indicator LEDs are run at 20 mA or less.
  add(out, "led_current", Severity::warning,
      fmt::format("{} carries {} while the discharge pin is on ({} supply, {} forward voltage, "
                  "{} {} and the switch's {}); common practice keeps a small indicator LED at "
                  "{} or less",
                  led->ref, A(amps), V(v.supply_V), V(v.led_vf_V), load, ohm(v.load_ohm),
                  ohm(v.chip.discharge_on_ohm), A(lim.led_max_A)));
}

void reset_rules(Findings& out, const Design& d, const Circuit& c, const CyclePrediction& p,
                 const RuleLimits& lim) {
  if (c.reset == ResetWiring::open) {
    // From memory: bipolar parts hold an open reset high through an internal
    // pull-up; a CMOS reset input is a bare gate that can float low.
    if (bipolar(d)) {
      add(out, "reset_open", Severity::info,
          "the reset pin is left open; a bipolar timer usually holds it high by itself, but "
          "common practice ties it to the supply");
    } else {
      add(out, "reset_open", Severity::warning,
          "the reset pin is left open; a CMOS timer's reset input has no pull-up and can float "
          "low and stop the timer: tie it to the supply");
    }
    return;
  }
  if (!p.oscillates || c.reset == ResetWiring::supply) return;
  const double threshold_V = c.v.chip.reset_threshold_V;
  const double margin_V = p.reset_min_V - threshold_V;
  if (!(margin_V < lim.reset_margin_V)) return;
  // From memory: reset thresholds spread over roughly 0.4-1 V on bipolar parts.
  add(out, "reset_margin", Severity::warning,
      fmt::format("the reset pin falls to {}, only {} above its {} threshold; reset thresholds "
                  "spread from part to part, and common practice keeps {} or more",
                  V(p.reset_min_V), V(margin_V), V(threshold_V), V(lim.reset_margin_V)));
}

// The current through the timing resistance at the upper threshold, and the
// resistance. The model folds the pins' input currents, leakage and probe
// into the Thevenin source the capacitor sees; adding them back gives the
// current in the resistor itself.
struct Charge {
  double amps = 0.0;
  double ohm = 0.0;
  std::string path;  // "R1 + R2"
};

Charge charge_at_upper(const Design& d, const Circuit& c, const CyclePrediction& p) {
  Charge q;
  const CircuitValues& v = c.v;
  q.ohm = p.high.tau_s / v.cap_F;
  const double shunt_S = (v.leak_ohm < kOpen ? 1.0 / v.leak_ohm : 0.0) +
                         (v.probe_cap_ohm < kOpen ? 1.0 / v.probe_cap_ohm : 0.0);
  const double into_cap_A = (p.high.target_V - p.high.end_V) / q.ohm;
  q.amps = into_cap_A + v.leak_A + v.chip.threshold_current_A + v.chip.trigger_current_A +
           p.high.end_V * shunt_S;
  switch (c.kind) {
    case CircuitKind::astable_two_resistor:
      q.path = fmt::format("{} + {}", ref_of(d, PartRole::upper, "R1"),
                           ref_of(d, PartRole::lower, "R2"));
      break;
    case CircuitKind::astable_diode_steered:
      q.path = fmt::format("{} and {}", ref_of(d, PartRole::upper, "R1"),
                           ref_of(d, PartRole::diode, "the diode"));
      break;
    default:
      q.path = ref_of(d, PartRole::timing_res, "R");
      break;
  }
  return q;
}

void threshold_rule(Findings& out, const Design& d, const Circuit& c, const CyclePrediction& p,
                    const RuleLimits& lim) {
  if (!p.oscillates) return;
  const Charge q = charge_at_upper(d, c, p);
  const double input_A = std::fabs(c.v.chip.threshold_current_A);
  if (!(q.amps > 0.0) || !(input_A > lim.threshold_share * q.amps)) return;
  add(out, "threshold_current", Severity::warning,
      fmt::format("the timing resistance is high for the threshold input: at the upper threshold "
                  "only {} flows through {} ({}), and the threshold pin draws {} of it ({}); that "
                  "input current varies from part to part, so common practice keeps it under {} "
                  "(a smaller resistance and a larger capacitor)",
                  A(q.amps), q.path, ohm(q.ohm), A(input_A), format_percent(input_A / q.amps),
                  format_percent(lim.threshold_share, 0)));
}

bool polar(PartKind k) { return k == PartKind::electrolytic || k == PartKind::tantalum; }

void capacitor_rules(Findings& out, const Design& d, const Circuit& c, const CyclePrediction& p,
                     const RuleLimits& lim) {
  const Part* cap = d.part_with(PartRole::timing_cap);
  if (cap == nullptr) return;
  if (polar(cap->kind) && p.oscillates) {
    // The usual rule of thumb for electrolytic leakage (common practice, from
    // memory): 0.01 C V microamps with C in microfarads and V in volts, or
    // 3 uA, whichever is greater; V is the rated voltage when known.
    // Tantalum parts usually leak less, so for them this errs on the safe side.
    const double rule_V = std::isfinite(cap->rated_V) ? cap->rated_V : d.supply_V;
    const double leak_A = std::max(0.01 * (cap->value * 1e6) * rule_V * 1e-6, 3e-6);
    const Charge q = charge_at_upper(d, c, p);
    if (q.amps > 0.0 && leak_A > lim.leakage_share * q.amps) {
      add(out, "cap_leakage", Severity::warning,
          fmt::format(
              "{} ({}, {}) may leak about {} (the rule of thumb 0.01 CV or 3 uA, "
              "whichever is greater, at {}), {} of the {} through the timing resistance at the "
              "upper threshold; the timing will run long and drift with temperature and "
              "age",
              cap->ref, part_kind_name(cap->kind), format_eng(cap->value, "F"), A(leak_A),
              V(rule_V), format_percent(leak_A / q.amps), A(q.amps)));
    }
  }
  if (!std::isfinite(cap->rated_V)) return;
  if (cap->rated_V < d.supply_V) {
    add(out, "cap_rating_low", Severity::problem,
        fmt::format("{} is rated {}, below the {} supply", cap->ref, V(cap->rated_V),
                    V(d.supply_V)));
  } else if (polar(cap->kind) && cap->rated_V < (1.0 + lim.rating_headroom) * d.supply_V) {
    // Common practice: derate electrolytic and tantalum parts well below their rating.
    add(out, "cap_rating_close", Severity::info,
        fmt::format("{} ({}) is rated {}, within {} of the {} supply; common practice leaves "
                    "more headroom",
                    cap->ref, part_kind_name(cap->kind), V(cap->rated_V),
                    format_percent(lim.rating_headroom, 0), V(d.supply_V)));
  }
}

void supply_rules(Findings& out, const Design& d) {
  const TimerFigures& f = d.figures;
  const std::string range = fmt::format("{} to {} usual for a {} timer", V(f.supply_min_V),
                                        V(f.supply_max_V), family_name(d.family));
  if (d.supply_V > f.supply_max_V) {
    add(out, "supply_high", Severity::problem,
        fmt::format("the {} supply is above the {}", V(d.supply_V), range));
  } else if (d.supply_V < f.supply_min_V) {
    add(out, "supply_low", Severity::warning,
        fmt::format("the {} supply is below the {}", V(d.supply_V), range));
  }
}

}  // namespace

Findings check_design(const Design& design, const Circuit& circuit,
                      const CyclePrediction& prediction, const RuleLimits& limits) {
  Findings out;
  discharge_rule(out, design, circuit, limits);
  output_rule(out, design, circuit, prediction, limits);
  led_rules(out, design, circuit, limits);
  reset_rules(out, design, circuit, prediction, limits);
  threshold_rule(out, design, circuit, prediction, limits);
  capacitor_rules(out, design, circuit, prediction, limits);
  supply_rules(out, design);
  if (prediction.oscillates && prediction.marginal) {
    const double margin_V = circuit.kind == CircuitKind::monostable
                                ? prediction.high.margin_V
                                : std::min(prediction.high.margin_V, prediction.low.margin_V);
    add(out, "marginal", Severity::warning,
        fmt::format("a threshold margin of {} is within the part-to-part spread of the "
                    "{}; the same design may run on one timer and stop on another",
                    V(margin_V), prediction.deciding_figure));
  }
  // The other side of the same edge: a circuit that stops by less than the spread.
  if (const StopMargin stop = stop_margin(circuit, prediction); stop.marginal) {
    add(out, "marginal", Severity::warning,
        fmt::format("it stops because {} by {}, within the part-to-part spread of the "
                    "{}; the same design may run on another timer",
                    stop.what, V(stop.short_V), stop.deciding_figure));
  }
  if (!prediction.oscillates) {
    add(out, "no_oscillation", Severity::problem, describe_stop(prediction));
  }
  return out;
}

}  // namespace benchtau
