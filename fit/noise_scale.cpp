// benchtau: quantisation step and robust noise sigmas.
#include "fit/noise_scale.h"

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <vector>

namespace benchtau {
namespace {

// 1 / Phi^-1(3/4): the MAD of a Gaussian is 0.6745 sigma (standard result).
constexpr double kMadToSigma = 1.4826;
// Differences read, spread over the record: 50 000 find an ADC's step (a cluster of
// 250 equal ones) and give a first-pass MAD sigma good to about 0.5 %, while sorting them
// stays a millisecond or two (200 000 cost a sixth of a million-sample fit).
constexpr std::size_t kMaxDifferences = 50000;

double median_in_place(std::span<double> v) {
  const std::size_t mid = v.size() / 2;
  std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(mid), v.end());
  double m = v[mid];
  if (v.size() % 2 == 0) {
    m = 0.5 * (m + *std::max_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(mid)));
  }
  return m;
}

// Successive differences sampled in blocks spread over the record, so that a long record
// costs no more than a short one and still sees all of it.
template <typename F>
void for_spread_pairs(std::size_t n, std::size_t want, F&& f) {
  if (n < 2) return;
  const std::size_t pairs = n - 1;
  if (pairs <= want) {
    for (std::size_t i = 0; i + 1 < n; ++i) f(i);
    return;
  }
  constexpr std::size_t kBlock = 1000;
  const std::size_t blocks = std::max<std::size_t>(1, want / kBlock);
  const std::size_t stride = pairs / blocks;
  for (std::size_t b = 0; b < blocks; ++b)
    for (std::size_t i = b * stride; i < b * stride + kBlock && i + 1 < n; ++i) f(i);
}

}  // namespace

double quantisation_step_V(std::span<const double> values_V) {
  std::vector<double> d;
  d.reserve(std::min(values_V.size(), kMaxDifferences + 1000));
  for_spread_pairs(values_V.size(), kMaxDifferences, [&](std::size_t i) {
    const double a = std::fabs(values_V[i + 1] - values_V[i]);
    if (std::isfinite(a) && a > 0.0) d.push_back(a);
  });
  if (d.size() < 20) return 0.0;
  std::sort(d.begin(), d.end());
  const std::size_t common = std::max<std::size_t>(5, d.size() / 200);
  // Walk clusters of (nearly) equal differences from the smallest up.
  for (std::size_t i = 0; i < d.size();) {
    std::size_t j = i;
    while (j < d.size() && d[j] - d[i] <= 1e-6 * d[i]) ++j;
    if (j - i >= common) {
      const double q = d[i + (j - i) / 2];
      std::size_t multiples = 0;
      for (double x : d) {
        const double k = x / q;
        if (std::fabs(k - std::round(k)) <= 1e-3 * std::max(1.0, k)) ++multiples;
      }
      return static_cast<double>(multiples) >= 0.95 * static_cast<double>(d.size()) ? q : 0.0;
    }
    i = j;
  }
  return 0.0;
}

double mad_sigma(std::span<double> scratch) {
  if (scratch.empty()) return 0.0;
  const double m = median_in_place(scratch);
  for (double& x : scratch) x = std::fabs(x - m);
  return kMadToSigma * median_in_place(scratch);
}

double second_difference_sigma_V(std::span<const double> values_V) {
  std::vector<double> d;
  d.reserve(std::min(values_V.size(), kMaxDifferences + 1000));
  const std::size_t n = values_V.size();
  for_spread_pairs(n > 0 ? n - 1 : 0, kMaxDifferences, [&](std::size_t i) {
    const double s = values_V[i] - 2.0 * values_V[i + 1] + values_V[i + 2];
    if (std::isfinite(s)) d.push_back(s);
  });
  // Var(y0 - 2 y1 + y2) = 6 sigma^2 for independent noise.
  return mad_sigma(d) / std::sqrt(6.0);
}

}  // namespace benchtau
