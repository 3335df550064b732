// benchtau: the batch path's logarithm against the C library's.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdint>

#include "src/core/log_kernel.h"
#include "src/core/random.h"

using namespace benchtau;

namespace {

// How many units in the last place of want got lies from it.
double ulps(double got, double want) {
  const double ulp = std::nextafter(std::fabs(want), INFINITY) - std::fabs(want);
  return std::fabs(got - want) / ulp;
}

}  // namespace

TEST_CASE("log_kernel is within an ulp of std::log over the doubles the Monte Carlo meets") {
  // The reference is glibc's log (correctly rounded in practice). Two ranges:
  // ratios near 1, where the cycle's logarithms live, and 2^-1000 .. 2^1000.
  Xoshiro256 rng(11, 0);
  double worst = 0.0;
  for (int i = 0; i < 400000; ++i) {
    const double x =
        i % 2 == 0 ? 0.5 + 1.5 * rng.uniform() : std::exp2(-1000.0 + 2000.0 * rng.uniform());
    const double want = std::log(x);
    if (want == 0.0) continue;
    worst = std::max(worst, ulps(log_kernel(x), want));
  }
  CHECK(worst <= 1.0);
}

TEST_CASE("log_kernel is exact where the answer is: ln 1 = 0, and k ln 2 at powers of two") {
  CHECK(log_kernel(1.0) == 0.0);
  for (int k = -1020; k <= 1020; k += 17) {
    const double x = std::ldexp(1.0, k);
    INFO("2^" << k);
    CHECK(log_kernel(x) == std::log(x));
  }
  // Each side of the reduction's switch at sqrt(2).
  const double root2 = std::sqrt(2.0);
  for (const double x : {std::nextafter(root2, 0.0), root2, std::nextafter(root2, 2.0)}) {
    CHECK(ulps(log_kernel(x), std::log(x)) <= 1.0);
  }
}
