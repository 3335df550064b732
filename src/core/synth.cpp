// benchtau: exact synthetic timer waveforms.
#include "src/core/synth.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <random>

namespace benchtau {

double exponential_time_s(double tau_s, double v0, double v1, double target) {
  const double ratio = (target - v0) / (target - v1);
  if (!(ratio > 0.0) || !std::isfinite(ratio)) return std::numeric_limits<double>::quiet_NaN();
  return tau_s * std::log(ratio);
}
double AstableWave::high_s() const {
  return exponential_time_s(charge_tau_s, lower_V, upper_V, charge_target_V);
}

double AstableWave::low_s() const {
  return exponential_time_s(discharge_tau_s, upper_V, lower_V, discharge_target_V);
}

AstableWave two_resistor_astable(double supply_V, double r1_ohm, double r2_ohm, double c_F,
                                 double out_drop_V, double out_low_V) {
  AstableWave w;
  w.upper_V = 2.0 / 3.0 * supply_V;
  w.lower_V = w.upper_V / 2.0;
  w.ctl_high_V = w.ctl_low_V = w.upper_V;
  w.charge_tau_s = (r1_ohm + r2_ohm) * c_F;
  w.charge_target_V = supply_V;
  w.discharge_tau_s = r2_ohm * c_F;
  w.discharge_target_V = 0.0;
  w.out_high_V = supply_V - out_drop_V;
  w.out_low_V = out_low_V;
  return w;
}

std::size_t SynthOptions::samples() const {
  return static_cast<std::size_t>(std::floor(duration_s * rate_Hz)) + 1;
}

Capture synth_capture(const SynthOptions& o) {
  Capture c;
  c.source = "<synthetic>";
  c.time_origin = "synthetic uniform rate";
  c.time.dt_s = 1.0 / o.rate_Hz;
  const std::size_t n = o.samples();
  const std::string_view names[] = {"out_V", "cap_V", "ctl_V"};
  for (std::size_t k = 0; k < (o.with_ctl ? 3U : 2U); ++k) {
    Channel ch;
    ch.name = names[k];
    ch.unit = "V";
    ch.column = k + 1;
    ch.values.reserve(n);
    c.channels.push_back(std::move(ch));
  }
  return c;
}

SynthAdc::SynthAdc(const SynthOptions& o)
    : noise_V_(o.noise_V),
      lsb_V_(o.bits > 0 ? o.full_scale_V / std::ldexp(1.0, o.bits) : 0.0),
      top_code_(o.bits > 0 ? std::ldexp(1.0, o.bits) - 1.0 : 0.0),
      rng_(o.seed) {}

double SynthAdc::operator()(double v) {
  if (noise_V_ > 0.0) v += noise_V_ * noise_(rng_);
  if (lsb_V_ > 0.0) v = std::clamp(std::round(v / lsb_V_), 0.0, top_code_) * lsb_V_;
  return v;
}

SynthRecord synth_astable(const AstableWave& wave, const SynthOptions& o) {
  SynthRecord rec;
  rec.capture = synth_capture(o);
  Capture& c = rec.capture;
  c.time.t0_s = 0.0;
  SynthAdc adc(o);
  const std::size_t n = o.samples();

  bool high = true;
  double phase_start = -o.phase_s;
  double v_start = wave.lower_V;
  double phase_len = wave.high_s();
  if (o.power_up) {
    phase_start = o.off_s;
    v_start = 0.0;
    phase_len = exponential_time_s(wave.charge_tau_s, 0.0, wave.upper_V, wave.charge_target_V);
  }
  if (o.power_up && o.off_s > 0.0) {
    Edge on;
    on.t_s = o.off_s;
    on.cap_V = 0.0;
    rec.edges.push_back(on);
  }
  for (std::size_t i = 0; i < n; ++i) {
    const double t = c.time.at(i);
    if (o.power_up && t < o.off_s) {
      for (Channel& ch : c.channels) ch.values.push_back(adc(0.0));
      continue;
    }
    while (t >= phase_start + phase_len) {
      phase_start += phase_len;
      high = !high;
      v_start = high ? wave.lower_V : wave.upper_V;
      phase_len = high ? wave.high_s() : wave.low_s();
      if (phase_start >= 0.0)
        rec.edges.push_back(
            {phase_start, high ? EdgeKind::rising : EdgeKind::falling, i, false, v_start});
    }
    const double tau = high ? wave.charge_tau_s : wave.discharge_tau_s;
    const double target = high ? wave.charge_target_V : wave.discharge_target_V;
    const double cap = target + (v_start - target) * std::exp(-(t - phase_start) / tau);
    c.channels[0].values.push_back(adc(high ? wave.out_high_V : wave.out_low_V));
    c.channels[1].values.push_back(adc(cap));
    if (o.with_ctl) c.channels[2].values.push_back(adc(high ? wave.ctl_high_V : wave.ctl_low_V));
  }
  return rec;
}

}  // namespace benchtau
