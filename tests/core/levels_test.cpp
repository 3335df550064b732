// benchtau: a channel's spread: extremes, finite count and the rail runs, against a direct count.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstddef>
#include <limits>
#include <vector>

#include "src/core/levels.h"

using namespace benchtau;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// The rule of levels.h said the plainest way: runs of three or more samples equal to level,
// a run counted only when the signal crossed mid since the last one (and before the first).
struct Runs {
  double fraction = 0.0;
  std::size_t runs = 0;
};
Runs direct_runs(const std::vector<double>& v, double level, double mid, std::size_t finite) {
  std::size_t in_runs = 0, runs = 0, i = 0;
  bool crossed = true;
  while (i < v.size()) {
    if (v[i] != level) {
      if ((level < mid && v[i] > mid) || (level > mid && v[i] < mid)) crossed = true;
      ++i;
      continue;
    }
    std::size_t j = i;
    while (j < v.size() && v[j] == level) ++j;
    if (j - i >= 3) {
      in_runs += j - i;
      if (crossed) ++runs;
      crossed = false;
    }
    i = j;
  }
  return {static_cast<double>(in_runs) / static_cast<double>(finite), runs};
}

// A sawtooth between 1 V and 4 V cut at 3.5 V (flat runs at the top), with its bottom held
// at exactly 1 V for a few samples now and then, and a NaN in every 97 samples. Runs start
// and end at every offset, so they cross every boundary of whatever blocks a pass takes.
std::vector<double> clipped_sawtooth(std::size_t n, std::size_t period) {
  std::vector<double> v(n);
  for (std::size_t i = 0; i < n; ++i) {
    const double phase = static_cast<double>(i % period) / static_cast<double>(period);
    v[i] = std::min(3.5, 1.0 + 3.0 * phase + 1e-3 * static_cast<double>(i % 7));
    if (i % period < 1 + (i / period) % 5) v[i] = 1.0;  // bottom runs of 1 to 5 samples
    if (i % 97 == 13) v[i] = kNaN;
  }
  return v;
}

// A floor at exactly 1 V held for 10 samples between bumps that alternate between high (150
// samples, to 3 V, across the middle) and low (50 samples, to 1.5 V, not across it), with a
// single 4 V sample at the very end as the top: whether a floor run counts depends on a
// crossing that happens far from any extreme sample.
std::vector<double> floor_and_bumps(std::size_t bumps) {
  std::vector<double> v;
  for (std::size_t b = 0; b < bumps; ++b) {
    v.insert(v.end(), 10, 1.0);
    const bool high = b % 2 == 0;
    const double peak_V = high ? 3.0 : 1.5;
    const std::size_t length = high ? 150 : 50;
    for (std::size_t i = 0; i < length; ++i) {
      const double x = (static_cast<double>(i) + 0.5) / static_cast<double>(length);
      v.push_back(1.01 + (peak_V - 1.01) * std::sin(3.14159 * x));
    }
  }
  v.push_back(4.0);
  return v;
}

}  // namespace

TEST_CASE("a floor run counts only after a crossing, however far from the extremes") {
  const std::vector<double> v = floor_and_bumps(40);
  const ChannelSpread s = channel_spread(v);
  REQUIRE(s.min_V == 1.0);
  REQUIRE(s.median_V > 1.5);
  REQUIRE(s.median_V < 3.0);
  // Every floor run after a high bump counts, and the first (crossed starts true): 21 of 40.
  CHECK(s.at_min_runs == 21);
  CHECK(s.at_min_runs == direct_runs(v, 1.0, s.median_V, s.finite).runs);
  CHECK(s.at_min_fraction == Approx(400.0 / static_cast<double>(v.size())));
}

TEST_CASE("a channel's extremes, finite count and rail runs match a direct count") {
  for (const std::size_t period : {std::size_t{29}, std::size_t{64}, std::size_t{301}}) {
    for (const std::size_t n :
         {std::size_t{5}, std::size_t{63}, std::size_t{1000}, std::size_t{20011}}) {
      const std::vector<double> v = clipped_sawtooth(n, period);
      const ChannelSpread s = channel_spread(v);
      std::size_t finite = 0;
      double lo = std::numeric_limits<double>::infinity(), hi = -lo;
      for (double x : v) {
        if (std::isnan(x)) continue;
        ++finite;
        lo = std::min(lo, x);
        hi = std::max(hi, x);
      }
      INFO("period " << period << ", " << n << " samples");
      CHECK(s.finite == finite);
      CHECK(s.min_V == lo);
      CHECK(s.max_V == hi);
      const Runs top = direct_runs(v, hi, s.median_V, finite);
      const Runs bottom = direct_runs(v, lo, s.median_V, finite);
      CHECK(s.at_max_runs == top.runs);
      CHECK(s.at_max_fraction == Approx(top.fraction).margin(1e-15));
      CHECK(s.at_min_runs == bottom.runs);
      CHECK(s.at_min_fraction == Approx(bottom.fraction).margin(1e-15));
      if (n >= 1000) CHECK(s.at_max_runs > 1);  // the case is not empty
    }
  }
}

TEST_CASE("a channel of NaN only has no spread, and a constant one no rail runs counted twice") {
  const ChannelSpread none = channel_spread(std::vector<double>(300, kNaN));
  CHECK(none.finite == 0);
  CHECK(std::isnan(none.min_V));
  CHECK(std::isnan(none.median_V));

  const ChannelSpread flat = channel_spread(std::vector<double>(300, 2.5));
  CHECK(flat.finite == 300);
  CHECK(flat.min_V == 2.5);
  CHECK(flat.max_V == 2.5);
  CHECK(flat.at_max_runs == 0);  // no swing: no runs are looked for
}
