// benchtau: which capacitor samples each charge and discharge segment fits.
#pragma once

// What goes in: the capacitor node (volts, NaN for missing), its time base and the edges in
// time order. What comes out: for each whole segment (between two successive edges of
// opposite kinds) the window of samples fitted, its times since the segment's start edge
// (seconds) gathered into one flat array, and its values (volts), in place in the channel
// unless NaNs had to be left out. Filled once, with one allocation each, so that the fits make
// none per sample.
#include <cstddef>
#include <memory>
#include <span>
#include <vector>

#include "src/core/capture.h"
#include "src/core/edges.h"

namespace benchtau {

// charging: after a rising edge (output high); discharging: after a falling edge.
enum class Phase { charging, discharging };

// The samples right after an edge do not follow the segment's exponential, and the last one
// before the next edge may not belong to the segment at all:
// - an edge is timed only to a fraction of a sample, so the sample nearest each edge can sit
//   on the wrong side of the true switching time;
// - at the start edge the discharge transistor switches and the comparator and flip-flop
//   settle, and the instrument's front end (probe, anti-alias filter) answers the sudden
//   change of slope with a transient that lasts a few samples and scales with the sampling
//   rate, hence a fraction of the segment as well as a fixed count;
// - a causal front end smears a corner forward in time, so before the end edge only the
//   timing uncertainty matters: one sample.
struct WindowRule {
  std::size_t skip_after_min = 2;     // samples skipped after the start edge, at least...
  double skip_after_fraction = 0.02;  // ...and at least this fraction of the segment's samples
  std::size_t skip_before = 1;        // samples skipped before the end edge
};

struct SegmentWindow {
  Phase phase = Phase::charging;
  std::size_t start_edge = 0;  // index of the start edge in the edge list
  double start_s = 0.0;        // start edge time: the segment's reference time t0
  double end_s = 0.0;          // end edge time
  std::size_t first = 0;       // sample indices fitted: [first, end), NaNs left out
  std::size_t end = 0;
  std::size_t excluded = 0;  // samples of the segment skipped next to its edges
  std::size_t missing = 0;   // NaN samples within [first, end)
  std::size_t offset = 0;    // the fitted samples are [offset, offset + used) of the arrays
  std::size_t used = 0;
  double length_s() const { return end_s - start_s; }
};

struct SegmentSamples {
  std::vector<SegmentWindow> windows;
  std::unique_ptr<double[]> x_s;  // time since the window's start edge, at each window's offset
  // Capacitor voltages: a window without a NaN reads them in place from the channel (cap_V,
  // which must outlive this); only a window with gaps has its values gathered, into gap_y_V
  // at its offset. The rest of gap_y_V is never written, so its pages never become resident.
  std::span<const double> cap_V;
  std::unique_ptr<double[]> gap_y_V;
  std::size_t outside = 0;  // samples before the first or after the last whole segment

  std::span<const double> x(const SegmentWindow& w) const {
    return std::span<const double>(x_s.get() + w.offset, w.used);
  }
  std::span<const double> y(const SegmentWindow& w) const {
    if (w.missing == 0) return cap_V.subspan(w.first, w.used);
    return std::span<const double>(gap_y_V.get() + w.offset, w.used);
  }
};

// Throws std::invalid_argument when the time base does not match the values (explicit times
// of another length, or a uniform step that is not positive). The result refers to cap_V.
SegmentSamples segment_samples(const TimeBase& time, std::span<const double> cap_V,
                               std::span<const Edge> edges, const WindowRule& rule = {});

}  // namespace benchtau
