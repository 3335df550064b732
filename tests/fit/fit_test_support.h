// benchtau: synthetic captures and helpers shared by the segment-fit tests.
#pragma once

#include <algorithm>
#include <cstdint>
#include <filesystem>
#include <span>
#include <string>
#include <vector>

#include "fit/segment_fit.h"
#include "src/core/measure.h"
#include "src/core/synth.h"

namespace benchtau::test {

// 10 k / 47 k / 100 nF on 9 V. By the textbook two-resistor astable relations (charging
// through R1 + R2 toward the supply, discharging through R2 toward ground, thresholds at 1/3
// and 2/3 of the supply): charging tau = (R1 + R2) C = 5.7 ms toward 9 V, discharging
// tau = R2 C = 4.7 ms toward 0 V, between 3 V and 6 V; period ln 2 (R1 + 2 R2) C = 7.21 ms.
inline constexpr double kR1_ohm = 10e3, kR2_ohm = 47e3, kC_F = 100e-9, kSupply_V = 9.0;
inline constexpr double kChargeTau_s = (kR1_ohm + kR2_ohm) * kC_F;
inline constexpr double kDischargeTau_s = kR2_ohm * kC_F;

inline AstableWave board() { return two_resistor_astable(kSupply_V, kR1_ohm, kR2_ohm, kC_F); }

struct Bench {
  int bits = 8;           // over 10 V full scale: 39.06 mV steps
  double noise_V = 0.02;  // about half a step: the rounding is well dithered
  double samples_per_period = 300;
  double cycles = 12;
  double phase = 0.3;  // fraction of a period into a cycle at the record's start
  std::uint64_t seed = 1;
};

inline SynthRecord synth(const Bench& b) {
  const AstableWave w = board();
  const double period_s = w.high_s() + w.low_s();
  SynthOptions o;
  o.rate_Hz = b.samples_per_period / period_s;
  o.duration_s = b.cycles * period_s;
  o.phase_s = b.phase * period_s;
  o.bits = b.bits;
  o.noise_V = b.noise_V;
  o.seed = b.seed;
  o.with_ctl = false;
  return synth_astable(w, o);
}

// The edges as the measurement finds them: output pin, refined on the capacitor node.
inline std::vector<Edge> measured_edges(const SynthRecord& rec) {
  NodeMap map;
  map.out = 0;
  map.cap = 1;
  return measure(rec.capture, map).edges;
}

inline std::span<const double> cap(const SynthRecord& rec) {
  return rec.capture.channels[1].values;
}

inline SegmentFitResult fit(const SynthRecord& rec, const SegmentFitOptions& o = {}) {
  return fit_segments(rec.capture.time, cap(rec), measured_edges(rec), o);
}

// A capture made by hand: segments of equal length between edges placed half a sample
// before each segment's first sample, alternating charge (from a rising edge) and
// discharge. value(charging, x_s, i) gives sample i, x_s seconds after its segment's edge.
struct Manual {
  TimeBase time;
  std::vector<double> cap_V;
  std::vector<Edge> edges;
};

template <typename F>
Manual alternating(std::size_t per_segment, std::size_t segments, double dt_s, F value) {
  Manual m;
  m.time.dt_s = dt_s;
  for (std::size_t k = 0; k <= segments; ++k) {
    Edge e;
    e.index = k * per_segment + 1;
    e.t_s = (static_cast<double>(e.index) - 0.5) * dt_s;
    e.kind = k % 2 == 0 ? EdgeKind::rising : EdgeKind::falling;
    m.edges.push_back(e);
  }
  for (std::size_t i = 0; i <= segments * per_segment; ++i) {
    const std::size_t k = std::min(i == 0 ? 0 : (i - 1) / per_segment, segments - 1);
    m.cap_V.push_back(value(k % 2 == 0, m.time.at(i) - m.edges[k].t_s, i));
  }
  return m;
}

// A scratch file in the build tree (never the source tree).
inline std::string scratch_path(const std::string& name) {
  const std::filesystem::path dir = std::filesystem::path(BENCHTAU_BINARY_DIR) / "tests" / "fit";
  std::filesystem::create_directories(dir);
  return (dir / name).string();
}

}  // namespace benchtau::test
