// benchtau: a branch-free natural logarithm that a compiler can run several lanes at a time.
#pragma once

#include <bit>
#include <cstdint>

namespace benchtau {

// ln(x) for a positive, finite, normal x, within an ulp or two of std::log
// (a test sweeps it). Anything else gives a meaningless number: callers mask
// such lanes out. No branch and no library call, so a loop over an array of
// these vectorises, which std::log's does not.
//
// Method: the published argument reduction and polynomial of fdlibm's e_log.c
// (Sun Microsystems, 1993): x = 2^k m with m in [sqrt(1/2), sqrt(2)),
// s = (m - 1) / (m + 1), ln m = 2s + s R(s^2) with a degree-14 minimax R.
// Coefficients as published there (quoted from memory; the sweep checks them).
[[gnu::always_inline]] inline double log_kernel(double x) {
  constexpr std::uint64_t kMantissa = 0x000fffffffffffffULL;
  constexpr std::uint64_t kSqrt2Mantissa = 0x6a09e667f3bcdULL;  // sqrt(2) = 0x3ff6a09e667f3bcd
  const auto bits = std::bit_cast<std::uint64_t>(x);
  const std::uint64_t mantissa = bits & kMantissa;
  const std::uint64_t above = mantissa > kSqrt2Mantissa ? 1 : 0;  // m / 2, k + 1
  const double m = std::bit_cast<double>(mantissa | ((0x3ffULL - above) << 52));
  // k as a double without an integer conversion: 2^52 + e read as a double is exact.
  constexpr double kTwo52 = 4503599627370496.0;
  const double k =
      std::bit_cast<double>(((bits >> 52) + above) | 0x4330000000000000ULL) - (kTwo52 + 1023.0);

  constexpr double ln2_hi = 6.93147180369123816490e-01, ln2_lo = 1.90821492927058770002e-10;
  constexpr double lg1 = 6.666666666666735130e-01, lg2 = 3.999999999940941908e-01,
                   lg3 = 2.857142874366239149e-01, lg4 = 2.222219843214978396e-01,
                   lg5 = 1.818357216161805012e-01, lg6 = 1.531383769920937332e-01,
                   lg7 = 1.479819860511658591e-01;
  const double f = m - 1.0;
  const double s = f / (2.0 + f);
  const double z = s * s, w = z * z;
  const double r = z * (lg1 + w * (lg3 + w * (lg5 + w * lg7))) + w * (lg2 + w * (lg4 + w * lg6));
  const double half_f2 = 0.5 * f * f;
  return k * ln2_hi - ((half_f2 - (s * (half_f2 + r) + k * ln2_lo)) - f);
}

}  // namespace benchtau
