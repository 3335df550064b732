// benchtau: a synthetic capture of a design, from the circuit model's predicted cycle.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

#include "src/core/circuit.h"
#include "src/core/design.h"
#include "src/core/synth.h"
#include "src/core/synth_pulses.h"

namespace benchtau {

// What to simulate; what is left out is chosen from the predicted cycle.
struct SimulateRequest {
  std::optional<double> rate_Hz;          // default: 1000 samples a cycle, 200 a phase or more
  std::optional<double> seconds;          // default: 10 cycles (or 10 triggers)
  std::optional<double> cycles;           // instead of seconds
  std::optional<double> trigger_every_s;  // monostable only; default: twice pulse and recovery
  int bits = 0;                           // 0: full precision
  std::optional<double> full_scale_V;     // default: the 1-2-5 step above the supply
  double noise_V = 0.0;
  std::uint64_t seed = 1;
  bool power_up = false;  // start with every node at 0 V
};

struct Simulation {
  SynthRecord record;  // channels "out_V", "cap_V", "ctl_V"
  double rate_Hz = 0.0;
  double duration_s = 0.0;
  double trigger_every_s = 0.0;  // a monostable's trigger interval; 0 for an astable
  double full_scale_V = 0.0;
};

// The astable's cycle as an exact two-phase wave. The capacitor charges from
// its lower turnaround (high.start_V) to its upper one (low.start_V): with the
// model's propagation delay those lie a little beyond the thresholds, and the
// wave's phase durations are then exactly the predicted high and low times.
AstableWave astable_wave(const CyclePrediction& p);

// The same for a monostable: pulses from the discharged floor to the peak.
PulseWave pulse_wave(const CyclePrediction& p);

// The capture a scope would record on the design's board. The prediction
// must be the design's and must oscillate. Throws InputError naming the
// option for a request that does not fit (a trigger interval shorter than the
// pulse and its recovery, or more than kMaxSimulatedSamples samples).
inline constexpr double kMaxSimulatedSamples = 5e7;
Simulation simulate_design(const Design& design, const CyclePrediction& p,
                           const SimulateRequest& request);

}  // namespace benchtau
