// benchtau: exact synthetic timer waveforms, for tests and demo captures.
#pragma once

#include <cstdint>
#include <random>
#include <vector>

#include "src/core/capture.h"
#include "src/core/edges.h"

namespace benchtau {

// An astable's capacitor node as two exponential phases between the two
// comparator thresholds (the control voltage and half of it; with feedback to
// the control pin, the upper one of the high phase and the lower one of the
// low phase):
//   charging (output high):    V(t) -> charge_target_V    with charge_tau_s, lower_V to upper_V
//   discharging (output low):  V(t) -> discharge_target_V with discharge_tau_s, upper_V to lower_V
struct AstableWave {
  double upper_V = 6.0;
  double lower_V = 3.0;
  double ctl_high_V = 6.0;  // the control pin as captured in each phase
  double ctl_low_V = 6.0;
  double charge_tau_s = 1e-3;
  double charge_target_V = 9.0;
  double discharge_tau_s = 1e-3;
  double discharge_target_V = 0.0;
  double out_high_V = 7.3;
  double out_low_V = 0.1;

  // Exact phase durations; NaN when a target does not lie beyond its threshold.
  double high_s() const;
  double low_s() const;
};

// The classic two-resistor astable with the control pin decoupled: charging
// through R1 + R2 toward the supply, discharging through R2 toward ground,
// thresholds at 2/3 and 1/3 of the supply (three equal divider resistors).
AstableWave two_resistor_astable(double supply_V, double r1_ohm, double r2_ohm, double c_F,
                                 double out_drop_V = 1.7, double out_low_V = 0.1);

// Time an exponential on tau_s takes to go from v0 toward target until it
// reaches v1; NaN when target does not lie beyond v1.
double exponential_time_s(double tau_s, double v0, double v1, double target);

struct SynthOptions {
  double rate_Hz = 100e3;
  double duration_s = 10e-3;
  double phase_s = 0.0;   // how far into a cycle (from a rising edge) the record starts
  bool power_up = false;  // start at 0 V with the output just gone high
  double off_s = 0.0;     // with power_up: every node at 0 V until the supply comes up
  int bits = 0;           // ADC resolution over [0, full_scale_V]; 0 keeps full precision
  double full_scale_V = 10.0;
  double noise_V = 0.0;  // Gaussian, RMS, added before quantisation
  std::uint64_t seed = 1;
  bool with_ctl = true;  // add a control-pin channel

  std::size_t samples() const;  // in duration_s at rate_Hz, both ends included
};

struct SynthRecord {
  Capture capture;          // channels "out_V", "cap_V" and, if asked, "ctl_V"; uniform time
  std::vector<Edge> edges;  // the exact switching times within the record
};

SynthRecord synth_astable(const AstableWave& wave, const SynthOptions& options);

// Shared by the synthetic sources: a capture with the uniform time base and
// the empty channels that `options` asks for, reserved for every sample.
Capture synth_capture(const SynthOptions& options);

// The synthetic ADC: seeded Gaussian noise, then quantisation to the bits
// asked for over [0, full_scale_V].
class SynthAdc {
 public:
  explicit SynthAdc(const SynthOptions& options);
  double operator()(double v);

 private:
  double noise_V_;
  double lsb_V_;
  double top_code_;
  std::mt19937_64 rng_;
  std::normal_distribution<double> noise_{0.0, 1.0};
};

}  // namespace benchtau
