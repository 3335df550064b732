// benchtau: a design's synthetic capture: wave from the prediction, sensible defaults, checks.
#include "src/core/simulate.h"

#include <fmt/format.h>

#include <cmath>

#include "src/core/engineering.h"
#include "src/core/input_error.h"

namespace benchtau {
namespace {

// The smallest 1-2-5 step (..., 1, 2, 5, 10, 20, ...) at or above x.
double step_at_or_above(double x) {
  double decade = std::pow(10.0, std::floor(std::log10(x)));
  for (;;) {
    for (double m : {1.0, 2.0, 5.0}) {
      if (m * decade >= x * (1.0 - 1e-12)) return m * decade;
    }
    decade *= 10.0;
  }
}

void require_positive(const std::optional<double>& v, const char* option) {
  if (v && !(*v > 0.0 && std::isfinite(*v))) {
    throw InputError(option, 0, 0, fmt::format("must be positive, found {}", *v));
  }
}

}  // namespace

AstableWave astable_wave(const CyclePrediction& p) {
  AstableWave w;
  w.upper_V = p.low.start_V;
  w.lower_V = p.high.start_V;
  w.ctl_high_V = p.ctl_high_V;
  w.ctl_low_V = p.ctl_low_V;
  w.charge_tau_s = p.high.tau_s;
  w.charge_target_V = p.high.target_V;
  w.discharge_tau_s = p.low.tau_s;
  w.discharge_target_V = p.low.target_V;
  w.out_high_V = p.out_high_V;
  w.out_low_V = p.out_low_V;
  return w;
}

PulseWave pulse_wave(const CyclePrediction& p) {
  PulseWave w;
  w.peak_V = p.low.start_V;
  w.floor_V = p.high.start_V;
  w.charge_tau_s = p.high.tau_s;
  w.charge_target_V = p.high.target_V;
  w.discharge_tau_s = p.low.tau_s;
  w.ctl_high_V = p.ctl_high_V;
  w.ctl_low_V = p.ctl_low_V;
  w.out_high_V = p.out_high_V;
  w.out_low_V = p.out_low_V;
  return w;
}

Simulation simulate_design(const Design& design, const CyclePrediction& p,
                           const SimulateRequest& r) {
  require_positive(r.rate_Hz, "--rate");
  require_positive(r.seconds, "--seconds");
  require_positive(r.cycles, "--cycles");
  require_positive(r.trigger_every_s, "--trigger-every");
  require_positive(r.full_scale_V, "--full-scale");
  if (r.bits < 0 || r.bits > 24) {
    throw InputError("--bits", 0, 0, fmt::format("must lie between 0 and 24, found {}", r.bits));
  }
  if (!(r.noise_V >= 0.0)) {
    throw InputError("--noise", 0, 0, fmt::format("must not be negative, found {}", r.noise_V));
  }
  const bool mono = design.kind == CircuitKind::monostable;
  Simulation s;
  double cycle_s = p.period_s;
  if (mono) {
    const double busy_s = p.high_s + p.low_s;
    s.trigger_every_s = r.trigger_every_s.value_or(step_at_or_above(2.0 * busy_s));
    if (!(s.trigger_every_s > busy_s)) {
      throw InputError(
          "--trigger-every", 0, 0,
          fmt::format("{} is too short: the pulse ({}) and the capacitor's recovery after it ({}) "
                      "need more than {} between triggers",
                      format_eng(s.trigger_every_s, "s"), format_eng(p.high_s, "s"),
                      format_eng(p.low_s, "s"), format_eng(busy_s, "s")));
    }
    cycle_s = s.trigger_every_s;
  } else if (r.trigger_every_s) {
    throw InputError("--trigger-every", 0, 0,
                     fmt::format("applies only to a monostable; this design is an {} circuit",
                                 circuit_kind_name(design.kind)));
  }
  const double shortest_s = std::fmin(p.high_s, mono ? p.high_s : p.low_s);
  s.rate_Hz = r.rate_Hz.value_or(step_at_or_above(std::fmax(1000.0 / cycle_s, 200.0 / shortest_s)));
  s.duration_s = r.seconds ? *r.seconds : r.cycles.value_or(10.0) * cycle_s;
  s.full_scale_V = r.full_scale_V.value_or(step_at_or_above(design.supply_V * (1.0 + 1e-9)));
  const double samples = std::floor(s.duration_s * s.rate_Hz) + 1.0;
  if (samples > kMaxSimulatedSamples) {
    throw InputError(r.seconds || r.cycles ? (r.seconds ? "--seconds" : "--cycles") : "--rate", 0,
                     0,
                     fmt::format("{} at {} would be {:.0f} samples; the limit is {:.0f}",
                                 format_eng(s.duration_s, "s"), format_eng(s.rate_Hz, "S/s"),
                                 samples, kMaxSimulatedSamples));
  }

  SynthOptions o;
  o.rate_Hz = s.rate_Hz;
  o.duration_s = s.duration_s;
  o.power_up = r.power_up;
  o.bits = r.bits;
  o.full_scale_V = s.full_scale_V;
  o.noise_V = r.noise_V;
  o.seed = r.seed;
  o.with_ctl = true;
  // A monostable's record starts idle, a quarter interval before its first trigger.
  s.record = mono ? synth_pulse_train(pulse_wave(p), s.trigger_every_s, 0.25 * s.trigger_every_s, o)
                  : synth_astable(astable_wave(p), o);
  return s;
}

}  // namespace benchtau
