// benchtau: exact synthetic waveforms of a monostable fired by a train of triggers.
#pragma once

#include "src/core/synth.h"

namespace benchtau {

// A monostable's capacitor node: each trigger starts a pulse that charges the
// node from wherever it is toward charge_target_V until it reaches peak_V;
// then the discharge switch pulls it toward floor_V until the next trigger.
struct PulseWave {
  double peak_V = 6.0;  // where the pulse ends (the upper threshold, plus any overshoot)
  double floor_V = 0.0;
  double charge_tau_s = 1e-3;
  double charge_target_V = 9.0;
  double discharge_tau_s = 1e-6;
  double ctl_high_V = 6.0;  // the control pin as captured during and between pulses
  double ctl_low_V = 6.0;
  double out_high_V = 7.3;
  double out_low_V = 0.1;

  // The pulse width from a start at floor_V; NaN when the target does not lie beyond peak_V.
  double pulse_s() const;
};

// Triggers at first_trigger_s + k * every_s. The record starts with the node
// at floor_V (or at 0 V with options.power_up) and the output low; options'
// phase_s and off_s are not used. Channels and ADC as synth_astable's.
SynthRecord synth_pulse_train(const PulseWave& wave, double every_s, double first_trigger_s,
                              const SynthOptions& options);

}  // namespace benchtau
