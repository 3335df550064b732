// benchtau: switching edges of the timer, from the output pin or, when only the
// capacitor node was captured, from the sawtooth's turnarounds.
#pragma once

#include <cstddef>
#include <limits>
#include <span>
#include <vector>

#include "src/core/capture.h"
#include "src/core/levels.h"

namespace benchtau {

// rising: the output goes high and the capacitor starts to charge.
// falling: the output goes low and the discharge switch closes.
enum class EdgeKind { rising, falling };

struct Edge {
  double t_s = 0.0;  // interpolated crossing (or turnaround) time
  EdgeKind kind = EdgeKind::rising;
  std::size_t index = 0;   // first sample after the edge
  bool after_gap = false;  // missing samples lie between this edge and the one before
  double cap_V = std::numeric_limits<double>::quiet_NaN();  // turnaround voltage, when known
};

struct EdgeOptions {
  // Hysteresis band, as a fraction of the swing either side of the midpoint:
  // the signal must cross mid + h*swing to count as high, mid - h*swing as low.
  double hysteresis = 0.2;
  // A segment shorter than this fraction of the median segment of its kind is
  // a glitch: it and the edge pair around it are removed.
  double glitch_fraction = 0.05;
};

struct EdgeScan {
  std::vector<Edge> edges;   // alternating kinds, in time order
  TwoLevels levels;          // the levels the edges were found between
  std::size_t glitches = 0;  // short pulses removed
};

// Edges of a two-level output signal. Crossing times are interpolated linearly
// between the two samples either side of the midpoint. NaN samples break the
// signal: no edge is interpolated across them.
EdgeScan output_edges(const TimeBase& time, std::span<const double> out_V,
                      const EdgeOptions& options = {});
// The same between levels the caller has already found with two_levels (levels.h), which
// saves the passes over the samples that finding them again would cost.
EdgeScan output_edges(const TimeBase& time, std::span<const double> out_V, const TwoLevels& levels,
                      const EdgeOptions& options = {});

// Edges from a capacitor-node sawtooth: a falling edge at each maximum, a
// rising edge at each minimum. Each turnaround time is where quadratics fitted
// to the samples on either side intersect, which is far less noisy than the
// extreme sample; Edge::cap_V is the voltage there.
EdgeScan sawtooth_edges(const TimeBase& time, std::span<const double> cap_V,
                        const EdgeOptions& options = {});

// Refines edges found on the output pin with the capacitor node: each edge
// moves to where quadratics fitted to the capacitor samples on either side
// meet (within a sample of it), which times it to a fraction of a sample, and
// Edge::cap_V becomes the turnaround voltage there. Where the far side is too
// short to fit (a near-instant discharge) the time stays and cap_V comes from
// the curve before the edge; where neither side fits, the edge is unchanged.
void refine_with_cap(const TimeBase& time, std::span<const double> cap_V, std::vector<Edge>& edges);

}  // namespace benchtau
