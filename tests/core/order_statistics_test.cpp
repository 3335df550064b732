// benchtau: percentiles by selection against percentiles from a full sort.
#include <catch2/catch.hpp>

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <vector>

#include "src/core/order_statistics.h"
#include "src/core/random.h"

using namespace benchtau;

namespace {

constexpr std::array<double, 9> kWanted{0.0, 0.1, 1.0, 5.0, 50.0, 95.0, 99.0, 99.9, 100.0};

// The definition, straight: sort, then interpolate linearly at rank
// p / 100 (n - 1). It is NumPy's default (its "linear" method), and method 7
// of Hyndman and Fan's survey of sample quantiles (from memory).
std::vector<double> by_sorting(std::vector<double> x) {
  std::erase_if(x, [](double v) { return std::isnan(v); });
  std::sort(x.begin(), x.end());
  std::vector<double> out;
  for (double p : kWanted) {
    const double pos = p / 100.0 * static_cast<double>(x.size() - 1);
    const auto i = static_cast<std::size_t>(std::floor(pos));
    const double f = pos - static_cast<double>(i);
    out.push_back(i + 1 < x.size() && f > 0.0 ? x[i] + f * (x[i + 1] - x[i]) : x[i]);
  }
  return out;
}

std::vector<double> by_selection(std::vector<double> x) {
  std::vector<double> out(kWanted.size());
  percentiles_of(x, kWanted, out);
  return out;
}

}  // namespace

TEST_CASE("percentiles by selection equal those of a full sort") {
  Xoshiro256 rng(99, 0);
  for (std::size_t n : {1UL, 2UL, 3UL, 10UL, 1000UL, 8191UL, 8192UL, 50000UL, 300001UL}) {
    std::vector<double> normal(n), skewed(n), ties(n), holes(n);
    for (std::size_t i = 0; i < n; ++i) {
      normal[i] = standard_normal(rng);
      skewed[i] = std::exp(2.0 * standard_normal(rng));
      ties[i] = std::floor(4.0 * rng.uniform());  // four values only
      holes[i] = rng.uniform() < 0.3 ? std::numeric_limits<double>::quiet_NaN() : normal[i];
    }
    // Sorted input and reverse-sorted input are the usual traps for selection.
    std::vector<double> sorted = normal;
    std::sort(sorted.begin(), sorted.end());
    std::vector<double> reversed(sorted.rbegin(), sorted.rend());
    // Large values at the start of each 64th of the array, where the sample's
    // runs are read, mislead the brackets, so that they miss their ranks and
    // the selection over all the values must take over.
    std::vector<double> misleading = normal;
    for (std::size_t i = 0; i < n; ++i) {
      const std::size_t seg = std::max<std::size_t>(1, n / 64);
      if (i % seg < (seg * 15 + 99) / 100) misleading[i] = 1000.0 + static_cast<double>(i);
    }
    for (const std::vector<double>* x :
         {&normal, &skewed, &ties, &holes, &sorted, &reversed, &misleading}) {
      if (x == &holes && std::all_of(x->begin(), x->end(), [](double v) { return std::isnan(v); }))
        continue;
      INFO("n = " << n);
      CHECK(by_selection(*x) == by_sorting(*x));
    }
  }
}

TEST_CASE("percentiles of a constant, and of nothing") {
  CHECK(by_selection(std::vector<double>(20000, 2.5)) == std::vector<double>(kWanted.size(), 2.5));
  const std::vector<double> none =
      by_selection(std::vector<double>(10, std::numeric_limits<double>::quiet_NaN()));
  for (double v : none) CHECK(std::isnan(v));
  // Two values: the median is their mean, the 95th percentile 95 % of the way.
  const std::vector<double> two = by_selection({1.0, 3.0});
  CHECK(two[4] == 2.0);
  CHECK(two[5] == Approx(2.9));
}
