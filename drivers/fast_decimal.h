// benchtau: the common short decimal numbers, parsed exactly without a library call.
#pragma once

#include <array>
#include <bit>
#include <cstdint>
#include <cstring>

namespace benchtau::csv {

namespace detail {

// How many of the 8 bytes of w, from the first, are ASCII digits.
inline unsigned leading_digits(std::uint64_t w) {
  const std::uint64_t t = w - 0x3030303030303030ULL;  // digits become 0..9
  const std::uint64_t bad = (t | (t + 0x7676767676767676ULL)) & 0x8080808080808080ULL;
  return bad == 0 ? 8 : static_cast<unsigned>(std::countr_zero(bad)) / 8;
}

// The value of the first n (1..8) digit bytes of w: shifted so that they end
// the word behind zero bytes, then combined pairwise (8 -> 4 -> 2 -> 1).
inline std::uint64_t digits_value(std::uint64_t w, unsigned n) {
  w <<= (8 - n) * 8;
  w = ((w & 0x0F0F0F0F0F0F0F0FULL) * 2561) >> 8;
  w = ((w & 0x00FF00FF00FF00FFULL) * 6553601) >> 16;
  return ((w & 0x0000FFFF0000FFFFULL) * 42949672960001ULL) >> 32;
}

// Appends the digits at q to m, eight at a time where the bytes allow; returns
// how many there were. m wraps beyond 19 digits, which the caller refuses.
[[gnu::always_inline]] inline std::ptrdiff_t read_digits(const char*& q, const char* end,
                                                         std::uint64_t& m) {
  static constexpr std::array<std::uint64_t, 9> scale{1,      10,      100,      1000,     10000,
                                                      100000, 1000000, 10000000, 100000000};
  const char* first = q;
  if constexpr (std::endian::native == std::endian::little) {
    while (end - q >= 8) {
      std::uint64_t w;
      std::memcpy(&w, q, 8);
      const unsigned n = leading_digits(w);
      if (n == 0) return q - first;
      m = m * scale[n] + digits_value(w, n);
      q += n;
      if (n < 8) return q - first;
    }
  }
  while (q < end && static_cast<unsigned>(*q - '0') < 10)
    m = m * 10 + static_cast<unsigned>(*q++ - '0');
  return q - first;
}

}  // namespace detail

// Parses [-]digits[.digits][(e|E)[+|-]digits] when the digits form an integer
// m <= 2^53 and the decimal exponent e lies within [-22, 22]. Then m and 10^|e|
// are exact doubles and one multiply or divide rounds correctly (Clinger's
// fast path, W. D. Clinger, "How to Read Floating Point Numbers Accurately",
// PLDI 1990), so the result is bit-identical to std::from_chars. Anything else
// (more digits, a larger exponent, "nan", a '+') returns false and leaves the
// number to std::from_chars. On success p moves past the number.
[[gnu::always_inline]] inline bool parse_short_decimal(const char*& p, const char* end,
                                                       double& out) {
  static constexpr std::array<double, 23> powers{1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                                 1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                                 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
  const auto digit = [](char c) { return static_cast<unsigned>(c - '0'); };
  const char* q = p;
  const bool negative = q < end && *q == '-';
  if (negative) ++q;
  // Leading zeros count as digits too: simpler, and 19 digits of any kind
  // still fit in 64 bits (unsigned arithmetic wraps harmlessly beyond).
  std::uint64_t m = 0;
  std::ptrdiff_t digits = detail::read_digits(q, end, m);
  int exponent = 0;
  if (q < end && *q == '.') {
    ++q;
    const std::ptrdiff_t fraction = detail::read_digits(q, end, m);
    exponent = -static_cast<int>(fraction);
    digits += fraction;
  }
  if (digits == 0 || digits > 19) return false;
  if (q < end && (*q == 'e' || *q == 'E')) {
    ++q;
    bool exp_negative = false;
    if (q < end && (*q == '-' || *q == '+')) {
      exp_negative = *q == '-';
      ++q;
    }
    if (q >= end || digit(*q) >= 10) return false;
    int e = 0;
    while (q < end && digit(*q) < 10) {
      if (e > 1000) return false;
      e = e * 10 + static_cast<int>(digit(*q++));
    }
    exponent += exp_negative ? -e : e;
  }
  if (m > (std::uint64_t{1} << 53)) return false;
  double v = static_cast<double>(m);
  if (m != 0) {
    if (exponent < -22 || exponent > 22) return false;
    v = exponent < 0 ? v / powers[static_cast<unsigned>(-exponent)]
                     : v * powers[static_cast<unsigned>(exponent)];
  }
  out = negative ? -v : v;
  p = q;
  return true;
}

}  // namespace benchtau::csv
