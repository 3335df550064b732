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
  rec.capture = synth_capture(o);
  Capture& c = rec.capture;
  SynthAdc adc(o);
  const std::size_t n = o.samples();

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
