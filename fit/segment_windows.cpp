// benchtau: segment windows between edges, and the samples gathered for the fits.
#include "fit/segment_windows.h"

#include <algorithm>
#include <cmath>
#include <memory>
#include <stdexcept>
#include <thread>

namespace benchtau {
namespace {

constexpr std::size_t kSideBySide = 200000;  // samples

// The first sample strictly after t_s, starting the search at the edge's own index (which
// the edge finders set to the first sample after the edge, within a sample of it).
std::size_t first_after(const TimeBase& time, std::size_t n, std::size_t hint, double t_s) {
  std::size_t i = std::min(hint, n);
  while (i > 0 && time.at(i - 1) > t_s) --i;
  while (i < n && time.at(i) <= t_s) ++i;
  return i;
}

}  // namespace

SegmentSamples segment_samples(const TimeBase& time, std::span<const double> cap_V,
                               std::span<const Edge> edges, const WindowRule& rule) {
  const std::size_t n = cap_V.size();
  if (!time.uniform() && time.t_s.size() != n)
    throw std::invalid_argument("segment_samples: explicit times and values differ in length");
  if (time.uniform() && !(time.dt_s > 0.0))
    throw std::invalid_argument("segment_samples: the sample interval must be positive");

  SegmentSamples out;
  std::size_t covered = 0;
  for (std::size_t k = 0; k + 1 < edges.size(); ++k) {
    const Edge& a = edges[k];
    const Edge& b = edges[k + 1];
    if (a.kind == b.kind || !(b.t_s > a.t_s)) continue;  // not a whole segment
    SegmentWindow w;
    w.phase = a.kind == EdgeKind::rising ? Phase::charging : Phase::discharging;
    w.start_edge = k;
    w.start_s = a.t_s;
    w.end_s = b.t_s;
    // The segment's samples are those in (start_s, end_s].
    const std::size_t s0 = first_after(time, n, a.index, a.t_s);
    const std::size_t s1 = first_after(time, n, b.index, b.t_s);
    const std::size_t len = s1 > s0 ? s1 - s0 : 0;
    covered += len;
    const auto skip_after = std::max(
        rule.skip_after_min,
        static_cast<std::size_t>(std::ceil(rule.skip_after_fraction * static_cast<double>(len))));
    w.first = std::min(s0 + skip_after, s1);
    w.end = std::max(w.first, s1 >= rule.skip_before ? s1 - rule.skip_before : 0);
    w.excluded = len - (w.end - w.first);
    out.windows.push_back(w);
  }
  out.outside = n - std::min(n, covered);

  // Counting each window's samples and gathering them are passes over the
  // whole record: on a long one, two halves of the windows side by side.
  auto halves = [&](auto&& job) {
    const std::size_t count = out.windows.size(), half = count / 2;
    if (n >= kSideBySide && std::thread::hardware_concurrency() > 1) {
      std::jthread other([&] { job(half, count); });
      job(0, half);
    } else {
      job(0, count);
    }
  };
  halves([&](std::size_t begin, std::size_t end) {
    for (std::size_t k = begin; k < end; ++k) {
      SegmentWindow& w = out.windows[k];
      std::size_t used = 0;
      for (std::size_t i = w.first; i < w.end; ++i) used += std::isfinite(cap_V[i]) ? 1 : 0;
      w.used = used;
      w.missing = (w.end - w.first) - used;
    }
  });
  std::size_t total_used = 0;
  bool gaps = false;
  for (SegmentWindow& w : out.windows) {
    w.offset = total_used;
    total_used += w.used;
    gaps |= w.missing > 0;
  }

  out.cap_V = cap_V;
  out.x_s = std::make_unique_for_overwrite<double[]>(total_used);
  if (gaps) out.gap_y_V = std::make_unique_for_overwrite<double[]>(total_used);
  halves([&](std::size_t begin, std::size_t end) {
    for (std::size_t k = begin; k < end; ++k) {
      const SegmentWindow& w = out.windows[k];
      double* x = out.x_s.get() + w.offset;
      if (w.missing == 0) {
        if (time.uniform()) {
          for (std::size_t i = w.first; i < w.end; ++i) *x++ = time.at(i) - w.start_s;
        } else {
          const double* t = time.t_s.data();
          for (std::size_t i = w.first; i < w.end; ++i) *x++ = t[i] - w.start_s;
        }
      } else {
        double* y = out.gap_y_V.get() + w.offset;
        for (std::size_t i = w.first; i < w.end; ++i) {
          if (!std::isfinite(cap_V[i])) continue;
          *x++ = time.at(i) - w.start_s;
          *y++ = cap_V[i];
        }
      }
    }
  });
  return out;
}

}  // namespace benchtau
