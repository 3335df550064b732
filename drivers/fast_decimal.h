// benchtau: the common short decimal numbers, parsed exactly without a library call.
#pragma once

#include <array>
#include <cstdint>

namespace benchtau::csv {

// Appends the digits at q to m and moves q past them; two a step when there
// is no end to check, which halves the loop's tests.
template <bool Bounded>
[[gnu::always_inline]] inline void read_digits(const char*& q, const char* end, std::uint64_t& m) {
  const auto digit = [](char c) { return static_cast<unsigned>(c - '0'); };
  if constexpr (Bounded) {
    while (q < end && digit(*q) < 10) m = m * 10 + digit(*q++);
  } else {
    (void)end;
    while (true) {
      const unsigned d0 = digit(q[0]);
      if (d0 >= 10) return;
      const unsigned d1 = digit(q[1]);  // q[0] is a digit, so q[1] is still before the end
      if (d1 >= 10) {
        m = m * 10 + d0;
        ++q;
        return;
      }
      m = m * 100 + d0 * 10 + d1;
      q += 2;
    }
  }
}

// Parses [-]digits[.digits][(e|E)[+|-]digits] when the digits form an integer
// m <= 2^53 and the decimal exponent e lies within [-22, 22]. Then m and 10^|e|
// are exact doubles and one multiply or divide rounds correctly (Clinger's
// fast path, W. D. Clinger, "How to Read Floating Point Numbers Accurately",
// PLDI 1990), so the result is bit-identical to std::from_chars. Anything else
// (more digits, a larger exponent, "nan", a '+') returns false and leaves the
// number to std::from_chars. On success p moves past the number.
//
// Bounded false drops the checks against end: for bytes known to hold a byte
// that ends any number (a '\n') before they end.
template <bool Bounded = true>
[[gnu::always_inline]] inline bool parse_short_decimal(const char*& p, const char* end,
                                                       double& out) {
  const auto more = [end](const char* at) {
    if constexpr (Bounded) {
      return at < end;
    } else {
      (void)end;
      (void)at;
      return true;
    }
  };
  static constexpr std::array<double, 23> powers{1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                                 1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                                 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
  const auto digit = [](char c) { return static_cast<unsigned>(c - '0'); };
  const char* q = p;
  const bool negative = more(q) && *q == '-';
  if (negative) ++q;
  // Leading zeros count as digits too: simpler, and 19 digits of any kind
  // still fit in 64 bits (unsigned arithmetic wraps harmlessly beyond).
  std::uint64_t m = 0;
  const char* first = q;
  read_digits<Bounded>(q, end, m);
  std::ptrdiff_t digits = q - first;
  int exponent = 0;
  if (more(q) && *q == '.') {
    const char* frac = ++q;
    read_digits<Bounded>(q, end, m);
    exponent = -static_cast<int>(q - frac);
    digits += q - frac;
  }
  if (digits == 0 || digits > 19) return false;
  if (more(q) && (*q == 'e' || *q == 'E')) {
    ++q;
    bool exp_negative = false;
    if (more(q) && (*q == '-' || *q == '+')) {
      exp_negative = *q == '-';
      ++q;
    }
    if (!more(q) || digit(*q) >= 10) return false;
    int e = 0;
    while (more(q) && digit(*q) < 10) {
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
