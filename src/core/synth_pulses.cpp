// benchtau: exact synthetic monostable pulse trains.
#include "src/core/synth_pulses.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <random>

namespace benchtau {
double PulseWave::pulse_s() const {
  return exponential_time_s(charge_tau_s, floor_V, peak_V, charge_target_V);
}

SynthRecord synth_pulse_train(const PulseWave& wave, double every_s, double first_trigger_s,
                              const SynthOptions& o) {
  SynthRecord rec;
  Capture& c = rec.capture;
  c.source = "<synthetic>";
  c.time_origin = "synthetic uniform rate";
  c.time.dt_s = 1.0 / o.rate_Hz;
  const auto n = static_cast<std::size_t>(std::floor(o.duration_s * o.rate_Hz)) + 1;
  const char* names[] = {"out_V", "cap_V", "ctl_V"};
  for (std::size_t k = 0; k < (o.with_ctl ? 3U : 2U); ++k) {
    Channel ch;
    ch.name = names[k];
    ch.unit = "V";
    ch.column = k + 1;
    ch.values.reserve(n);
    c.channels.push_back(std::move(ch));
  }

  std::mt19937_64 rng(o.seed);
  std::normal_distribution<double> noise(0.0, 1.0);
  const double lsb = o.bits > 0 ? o.full_scale_V / std::ldexp(1.0, o.bits) : 0.0;
  auto adc = [&](double v) {
    if (o.noise_V > 0.0) v += o.noise_V * noise(rng);
    if (lsb > 0.0) v = std::clamp(std::round(v / lsb), 0.0, std::ldexp(1.0, o.bits) - 1.0) * lsb;
    return v;
  };

  // The phase in force: its start time and voltage, and where it heads.
  bool high = false;
  double phase_start = 0.0;
  double v_start = o.power_up ? 0.0 : wave.floor_V;
  double next_trigger = first_trigger_s;
  double pulse_end = std::numeric_limits<double>::infinity();
  auto cap_at = [&](double t) {
    const double tau = high ? wave.charge_tau_s : wave.discharge_tau_s;
    const double target = high ? wave.charge_target_V : wave.floor_V;
    return target + (v_start - target) * std::exp(-(t - phase_start) / tau);
  };
  for (std::size_t i = 0; i < n; ++i) {
    const double t = c.time.at(i);
    for (;;) {
      if (!high && t >= next_trigger) {
        // The pulse starts from the node's voltage at the trigger.
        v_start = cap_at(next_trigger);
        phase_start = next_trigger;
        high = true;
        pulse_end = phase_start + exponential_time_s(wave.charge_tau_s, v_start, wave.peak_V,
                                                     wave.charge_target_V);
        rec.edges.push_back({phase_start, EdgeKind::rising, i, false, v_start});
        next_trigger += every_s;
      } else if (high && t >= pulse_end) {
        phase_start = pulse_end;
        v_start = wave.peak_V;
        high = false;
        rec.edges.push_back({phase_start, EdgeKind::falling, i, false, v_start});
      } else {
        break;
      }
    }
    c.channels[0].values.push_back(adc(high ? wave.out_high_V : wave.out_low_V));
    c.channels[1].values.push_back(adc(cap_at(t)));
    if (o.with_ctl) c.channels[2].values.push_back(adc(high ? wave.ctl_high_V : wave.ctl_low_V));
  }
  return rec;
}

}  // namespace benchtau
