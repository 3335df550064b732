// benchtau: an exact median of the time steps, by sampling and then one counting pass.
#include "drivers/median_step.h"

#include <algorithm>
#include <array>
#include <bit>
#include <cmath>
#include <cstdint>
#include <optional>
#include <thread>
#include <vector>

namespace benchtau::csv {
namespace {

double step(std::span<const double> t, std::size_t i) { return t[i + 1] - t[i]; }

// Positive doubles order like their bit patterns read as unsigned integers,
// so the k-th smallest step can be found 16 bits at a time with a histogram.
// The fallback when sampling does not pin the median down.
double kth_by_radix(std::span<const double> t, std::size_t k) {
  constexpr int digit_bits = 16;
  std::vector<std::size_t> histogram(std::size_t{1} << digit_bits);
  std::uint64_t prefix = 0;
  for (int pass = 0; pass < 64 / digit_bits; ++pass) {
    const int shift = 64 - digit_bits * (pass + 1);
    std::fill(histogram.begin(), histogram.end(), 0);
    for (std::size_t i = 0; i + 1 < t.size(); ++i) {
      const auto bits = std::bit_cast<std::uint64_t>(step(t, i));
      if (pass > 0 && (bits >> (shift + digit_bits)) != prefix) continue;
      ++histogram[(bits >> shift) & 0xFFFF];
    }
    std::size_t digit = 0;
    while (k >= histogram[digit]) k -= histogram[digit++];
    prefix = (prefix << digit_bits) | digit;
  }
  return std::bit_cast<double>(prefix);
}

// The steps of ranks lo and hi (lo <= hi <= lo + 1). A sorted sample of the
// steps brackets those ranks with [low, high]; one pass counts the steps below
// low, equal to low and equal to high (a clean capture has a few step values
// repeated millions of times), and gathers those strictly between. If both
// ranks land inside, they are read off exactly; otherwise the radix fallback.
std::array<double, 2> ranks(std::span<const double> t, std::size_t lo, std::size_t hi) {
  const std::size_t steps = t.size() - 1;
  constexpr std::size_t small = 1 << 16;
  if (steps <= small) {
    std::vector<double> all(steps);
    for (std::size_t i = 0; i < steps; ++i) all[i] = step(t, i);
    const auto nth = all.begin() + static_cast<std::ptrdiff_t>(lo);
    std::nth_element(all.begin(), nth, all.end());
    return {*nth, hi == lo ? *nth : *std::min_element(nth + 1, all.end())};
  }
  constexpr std::size_t samples = 1 << 14;
  std::vector<double> sample(samples);
  for (std::size_t j = 0; j < samples; ++j) sample[j] = step(t, j * (steps / samples));
  std::sort(sample.begin(), sample.end());
  // Four standard deviations of a sample quantile's rank, either side.
  const auto margin = static_cast<std::size_t>(4.0 * std::sqrt(static_cast<double>(samples)));
  const auto at = [&](std::size_t rank) { return rank / (steps / samples); };
  const double low = sample[at(lo) > margin ? at(lo) - margin : 0];
  const double high = sample[std::min(samples - 1, at(hi) + margin)];

  // The counting pass, over two halves of the steps side by side on a long record.
  struct Tally {
    std::size_t below = 0, at_low = 0, at_high = 0;
    std::vector<double> between;
    bool overflow = false;
  };
  const std::size_t cap = steps / 16;  // a half's share of steps / 8
  const auto count = [&](std::size_t begin, std::size_t end, Tally& y) {
    for (std::size_t i = begin; i < end; ++i) {
      const double s = step(t, i);
      if (s < low) {
        ++y.below;
      } else if (s == low) {
        ++y.at_low;
      } else if (s == high) {
        ++y.at_high;
      } else if (s < high) {
        if (y.between.size() == cap) {
          y.overflow = true;
          return;
        }
        y.between.push_back(s);
      }
    }
  };
  Tally first, second;
  if (std::thread::hardware_concurrency() > 1) {
    std::jthread other([&] { count(steps / 2, steps, second); });
    count(0, steps / 2, first);
  } else {
    count(0, steps / 2, first);
    count(steps / 2, steps, second);
  }
  if (first.overflow || second.overflow) return {kth_by_radix(t, lo), kth_by_radix(t, hi)};
  const std::size_t below = first.below + second.below, at_low = first.at_low + second.at_low,
                    at_high = first.at_high + second.at_high;
  std::vector<double>& between = first.between;
  between.insert(between.end(), second.between.begin(), second.between.end());
  // Only ranks lo and lo + 1 are wanted: select them, no sort.
  const std::size_t inside_lo = lo - std::min(lo, below + at_low);
  if (lo >= below + at_low && inside_lo < between.size()) {
    const auto nth = between.begin() + static_cast<std::ptrdiff_t>(inside_lo);
    std::nth_element(between.begin(), nth, between.end());
    if (nth + 1 != between.end()) std::iter_swap(nth + 1, std::min_element(nth + 1, between.end()));
  } else if (hi >= below + at_low && hi - below - at_low < between.size()) {
    // Rank lo is at low, so hi is the smallest of those between.
    std::iter_swap(between.begin(), std::min_element(between.begin(), between.end()));
  }
  // The step of a rank, if the pass pinned it down.
  const auto pick = [&](std::size_t rank) -> std::optional<double> {
    if (rank < below) return std::nullopt;
    rank -= below;
    if (rank < at_low) return low;
    rank -= at_low;
    if (rank < between.size()) return between[rank];
    rank -= between.size();
    if (rank < at_high) return high;
    return std::nullopt;
  };
  const auto a = pick(lo);
  const auto b = pick(hi);
  if (a && b) return {*a, *b};
  return {kth_by_radix(t, lo), kth_by_radix(t, hi)};
}

}  // namespace

double median_step(std::span<const double> t_s) {
  if (t_s.size() < 2) return 0.0;
  const std::size_t steps = t_s.size() - 1;
  const auto [a, b] = ranks(t_s, (steps - 1) / 2, steps / 2);
  return a == b ? a : 0.5 * (a + b);
}

}  // namespace benchtau::csv
