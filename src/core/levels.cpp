// benchtau: channel spread and two-level detection from histograms.
#include "src/core/levels.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstring>
#include <limits>
#include <span>
#include <tuple>
#include <utility>
#include <vector>

namespace benchtau {
namespace {

// Two samples at a time in the GNU vector extension (GCC and Clang), one SSE2 register on
// any x86-64: lanes that no step waits on, and no branch on a NaN (it compares false
// everywhere).
using Lanes = double __attribute__((vector_size(2 * sizeof(double))));
using LaneMask = long long __attribute__((vector_size(2 * sizeof(long long))));

Lanes load_lanes(const double* p) {
  Lanes v;
  std::memcpy(&v, p, sizeof v);
  return v;
}
Lanes all_lanes(double v) { return Lanes{v, v}; }
bool any_lane(LaneMask m) { return (m[0] | m[1]) != 0; }

// Fine enough that an 8-bit capture's codes land in distinct bins, small
// enough to stay in cache.
constexpr std::size_t kBins = 8192;

// Counts over [lo, hi] in kBins bins; quantiles interpolate inside a bin.
class Histogram {
 public:
  Histogram(double lo, double hi) : lo_(lo), hi_(hi), counts_(kBins, 0) {
    width_ = (hi_ > lo_) ? (hi_ - lo_) / static_cast<double>(kBins) : 1.0;
    per_width_ = 1.0 / width_;
  }

  void add(double v) {
    auto bin = static_cast<std::size_t>((v - lo_) * per_width_);
    counts_[std::min(bin, kBins - 1)]++;
    ++total_;
  }

  // Every number of values. Two sets of counts, alternate samples, merged
  // after: a slow signal puts run after run of samples in one bin, and each
  // count would otherwise wait for the one before it.
  void add_all(std::span<const double> values) {
    std::vector<std::size_t> other(kBins, 0);
    std::size_t i = 0;
    const std::size_t n = values.size();
    std::size_t counted = 0;
    for (; i + 1 < n; i += 2) {
      const double a = values[i], b = values[i + 1];
      if (!std::isnan(a)) {
        counts_[std::min(static_cast<std::size_t>((a - lo_) * per_width_), kBins - 1)]++;
        ++counted;
      }
      if (!std::isnan(b)) {
        other[std::min(static_cast<std::size_t>((b - lo_) * per_width_), kBins - 1)]++;
        ++counted;
      }
    }
    if (i < n && !std::isnan(values[i])) {
      counts_[std::min(static_cast<std::size_t>((values[i] - lo_) * per_width_), kBins - 1)]++;
      ++counted;
    }
    for (std::size_t b = 0; b < kBins; ++b) counts_[b] += other[b];
    total_ += counted;
  }

  std::size_t total() const { return total_; }

  // Value below which a fraction q of the counted samples lie.
  double quantile(double q) const {
    if (total_ == 0) return std::numeric_limits<double>::quiet_NaN();
    if (hi_ <= lo_) return lo_;
    const double target = q * static_cast<double>(total_);
    double seen = 0.0;
    for (std::size_t b = 0; b < kBins; ++b) {
      const auto c = static_cast<double>(counts_[b]);
      if (seen + c >= target && c > 0) {
        const double within = (target - seen) / c;
        return lo_ + (static_cast<double>(b) + within) * width_;
      }
      seen += c;
    }
    return hi_;
  }

 private:
  double lo_, hi_, width_, per_width_;
  std::vector<std::size_t> counts_;
  std::size_t total_ = 0;
};

// Samples equal to level that sit in runs of three or more, as a share of
// the finite samples, and how many such runs there are, counting a run only
// when the signal has crossed mid since the last one (once per cycle at most).
struct FlatRuns {
  double level, mid;
  std::size_t in_runs = 0, run = 0, runs = 0;
  bool crossed = true;
  void close() {
    if (run >= 3) {
      in_runs += run;
      if (crossed) ++runs;
      crossed = false;
    }
    run = 0;
  }
  void add(double v) {
    if (v == level) {
      ++run;
      return;
    }
    close();
    if ((level < mid && v > mid) || (level > mid && v < mid)) crossed = true;
  }
};

// Both levels' runs in one pass over the values.
std::pair<std::pair<double, std::size_t>, std::pair<double, std::size_t>> flat_runs(
    std::span<const double> values, double lo, double hi, double mid, std::size_t finite) {
  FlatRuns a{lo, mid}, b{hi, mid};
  // Most samples are at neither extreme and close no run: for them only the
  // crossing flags move, without a branch.
  const bool a_below = (lo < mid), a_above = (lo > mid);
  const bool b_below = (hi < mid), b_above = (hi > mid);
  const auto one = [&](double v) {
    if (v != lo && v != hi && a.run == 0 && b.run == 0) {
      a.crossed |= (a_below & (v > mid)) | (a_above & (v < mid));
      b.crossed |= (b_below & (v > mid)) | (b_above & (v < mid));
      return;
    }
    a.add(v);
    b.add(v);
  };
  // A block with neither extreme in it, and no run open, moves the crossing flags only, and
  // only by whether its largest sample lies above mid or its smallest below: vector lanes
  // find both without a branch a sample. Any other block goes one sample at a time.
  constexpr std::size_t kBlock = 64;
  const Lanes v_lo = all_lanes(lo), v_hi = all_lanes(hi);
  const std::size_t n = values.size();
  std::size_t i = 0;
  for (; i + kBlock <= n; i += kBlock) {
    const double* p = values.data() + i;
    if (a.run == 0 && b.run == 0) {
      Lanes low = all_lanes(std::numeric_limits<double>::infinity()), high = -low;
      LaneMask hit{};
      for (std::size_t j = 0; j < kBlock; j += 2) {
        const Lanes v = load_lanes(p + j);
        hit |= (v == v_lo) | (v == v_hi);
        low = v < low ? v : low;  // NaN compares false: it moves neither
        high = v > high ? v : high;
      }
      if (!any_lane(hit)) {
        const double block_low = std::min(low[0], low[1]);
        const double block_high = std::max(high[0], high[1]);
        a.crossed |= (a_below & (block_high > mid)) | (a_above & (block_low < mid));
        b.crossed |= (b_below & (block_high > mid)) | (b_above & (block_low < mid));
        continue;
      }
    }
    for (std::size_t j = 0; j < kBlock; ++j) one(p[j]);
  }
  for (; i < n; ++i) one(values[i]);
  a.close();
  b.close();
  const auto share = [finite](const FlatRuns& f) {
    return std::pair{static_cast<double>(f.in_runs) / static_cast<double>(finite), f.runs};
  };
  return {share(a), share(b)};
}

}  // namespace

ChannelSpread channel_spread(std::span<const double> values) {
  ChannelSpread s;
  double lo = std::numeric_limits<double>::infinity();
  double hi = -lo;
  // Four sets of two lanes of running extremes and counts, so that no step
  // waits on the one before. NaN compares false: it counts nowhere and moves
  // neither.
  constexpr std::size_t kSets = 4;
  std::array<Lanes, kSets> lows, highs;
  lows.fill(all_lanes(lo));
  highs.fill(all_lanes(hi));
  std::array<LaneMask, kSets> counts{};  // minus the count: a true comparison is -1
  const std::size_t n = values.size();
  std::size_t i = 0;
  for (; i + 2 * kSets <= n; i += 2 * kSets) {
    for (std::size_t k = 0; k < kSets; ++k) {
      const Lanes v = load_lanes(values.data() + i + 2 * k);
      counts[k] += v == v;
      lows[k] = v < lows[k] ? v : lows[k];
      highs[k] = v > highs[k] ? v : highs[k];
    }
  }
  for (std::size_t k = 0; k < kSets; ++k) {
    for (std::size_t j = 0; j < 2; ++j) {
      lo = std::min(lo, lows[k][j]);
      hi = std::max(hi, highs[k][j]);
      s.finite += static_cast<std::size_t>(-counts[k][j]);
    }
  }
  for (; i < n; ++i) {
    const double v = values[i];
    s.finite += static_cast<std::size_t>(v == v);
    lo = v < lo ? v : lo;
    hi = v > hi ? v : hi;
  }
  if (s.finite == 0) {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    s.min_V = s.max_V = s.p_low_V = s.p_high_V = s.median_V = nan;
    return s;
  }
  s.min_V = lo;
  s.max_V = hi;
  Histogram h(lo, hi);
  h.add_all(values);
  s.p_low_V = h.quantile(0.001);
  s.p_high_V = h.quantile(0.999);
  s.median_V = h.quantile(0.5);
  if (hi > lo) {
    const auto [at_min, at_max] = flat_runs(values, lo, hi, s.median_V, s.finite);
    std::tie(s.at_min_fraction, s.at_min_runs) = at_min;
    std::tie(s.at_max_fraction, s.at_max_runs) = at_max;
  }
  return s;
}

TwoLevels two_levels(std::span<const double> values, const ChannelSpread& spread) {
  TwoLevels t;
  if (spread.finite == 0 || !(spread.p_high_V > spread.p_low_V)) {
    t.low_V = t.high_V = spread.median_V;
    return t;
  }
  const double mid = 0.5 * (spread.p_low_V + spread.p_high_V);
  Histogram below(spread.min_V, mid), above(mid, spread.max_V);
  for (double v : values) {
    if (std::isnan(v)) continue;
    (v < mid ? below : above).add(v);
  }
  t.low_V = below.quantile(0.5);
  t.high_V = above.quantile(0.5);
  if (below.total() == 0 || above.total() == 0) {
    t.low_V = t.high_V = spread.median_V;
    return t;
  }
  const double band_lo = t.low_V + 0.25 * t.swing_V();
  const double band_hi = t.low_V + 0.75 * t.swing_V();
  std::size_t in_band = 0;
  for (double v : values)
    if (v > band_lo && v < band_hi) ++in_band;
  t.mid_band_fraction = static_cast<double>(in_band) / static_cast<double>(spread.finite);
  return t;
}

double roughness(std::span<const double> values, const ChannelSpread& spread) {
  const double swing = spread.p_high_V - spread.p_low_V;
  if (!(swing > 0.0)) return 0.0;
  std::vector<double> steps;
  const std::size_t stride = std::max<std::size_t>(1, values.size() / 20000);
  for (std::size_t i = stride; i < values.size(); i += stride) {
    const double d = std::fabs(values[i] - values[i - 1]);
    if (!std::isnan(d)) steps.push_back(d);
  }
  if (steps.empty()) return 0.0;
  std::nth_element(steps.begin(), steps.begin() + static_cast<std::ptrdiff_t>(steps.size() / 2),
                   steps.end());
  return steps[steps.size() / 2] / swing;
}

}  // namespace benchtau
