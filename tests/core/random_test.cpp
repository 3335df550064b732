// benchtau: the Monte Carlo random numbers: uniform and normal against their distributions.
#include <catch2/catch.hpp>

#include <array>
#include <cmath>
#include <set>

#include "src/core/random.h"

using namespace benchtau;

TEST_CASE("streams are fixed by seed and stream index, and differ between them") {
  Xoshiro256 a(1, 0), b(1, 0), c(1, 1), d(2, 0);
  std::set<std::uint64_t> firsts;
  for (int i = 0; i < 100; ++i) {
    const std::uint64_t x = a.next();
    CHECK(x == b.next());
    firsts.insert(x);
  }
  CHECK(firsts.size() == 100);
  CHECK(Xoshiro256(1, 0).next() != c.next());
  CHECK(Xoshiro256(1, 0).next() != d.next());
  // splitmix64's mix is a bijection with no fixed point at small inputs.
  CHECK(mix64(0) == 0);  // zero maps to zero: the reason streams add a constant first
  CHECK(mix64(1) != 1);
}

TEST_CASE("uniform draws fill 0 to 1 evenly and never reach 1") {
  Xoshiro256 rng(3, 0);
  constexpr int kBins = 20, kN = 200000;
  std::array<int, kBins> count{};
  double lowest = 1.0, highest = 0.0;
  for (int i = 0; i < kN; ++i) {
    const double u = rng.uniform();
    lowest = std::min(lowest, u);
    highest = std::max(highest, u);
    ++count[static_cast<std::size_t>(u * kBins)];
  }
  CHECK(lowest >= 0.0);
  CHECK(highest < 1.0);
  // Chi-square with 19 degrees of freedom: its 99.9 % point is about 43.8
  // (statistical tables, from memory).
  double chi2 = 0.0;
  const double expect = static_cast<double>(kN) / kBins;
  for (int c : count) chi2 += (c - expect) * (c - expect) / expect;
  CHECK(chi2 < 43.8);
}

TEST_CASE("the ziggurat normal has the normal distribution's moments and tails") {
  Xoshiro256 rng(5, 0);
  constexpr int kN = 1000000;
  double sum = 0.0, sum2 = 0.0, sum4 = 0.0;
  int within1 = 0, within2 = 0, beyond3 = 0, beyond4 = 0;
  for (int i = 0; i < kN; ++i) {
    const double z = standard_normal(rng);
    sum += z;
    sum2 += z * z;
    sum4 += z * z * z * z;
    within1 += std::fabs(z) < 1.0;
    within2 += std::fabs(z) < 2.0;
    beyond3 += std::fabs(z) > 3.0;
    beyond4 += std::fabs(z) > 4.0;
  }
  const double n = kN;
  // Standard errors: 1/sqrt(n) for the mean, sqrt(2/n) for the variance,
  // sqrt(96/n) for the fourth moment (which is 3 for a normal).
  CHECK(std::fabs(sum / n) < 4.0 / std::sqrt(n));
  CHECK(std::fabs(sum2 / n - 1.0) < 4.0 * std::sqrt(2.0 / n));
  CHECK(std::fabs(sum4 / n - 3.0) < 4.0 * std::sqrt(96.0 / n));
  // The normal distribution's probabilities, from erf (the 68-95-99.7 rule).
  const auto inside = [](double k) { return std::erf(k / std::sqrt(2.0)); };
  const auto close = [&](int count, double p) {
    return std::fabs(count / n - p) < 4.0 * std::sqrt(p * (1.0 - p) / n);
  };
  CHECK(close(within1, inside(1.0)));
  CHECK(close(within2, inside(2.0)));
  CHECK(close(beyond3, 1.0 - inside(3.0)));  // exercises the wedges and the tail
  CHECK(close(beyond4, 1.0 - inside(4.0)));
}

TEST_CASE("truncated normals stay within their limit") {
  Xoshiro256 rng(11, 0);
  double worst = 0.0;
  for (int i = 0; i < 200000; ++i) worst = std::max(worst, std::fabs(truncated_normal(rng, 3.0)));
  CHECK(worst <= 3.0);
  CHECK(worst > 2.9);
}
