// benchtau: an exact median by radix selection over the bits of positive doubles.
#include "drivers/median_step.h"

#include <array>
#include <bit>
#include <cstdint>
#include <vector>

namespace benchtau::csv {
namespace {

// Positive doubles order like their bit patterns read as unsigned integers,
// so the k-th smallest step can be found 16 bits at a time with a histogram.
double kth_step(std::span<const double> t, std::size_t k) {
  constexpr int digit_bits = 16;
  std::vector<std::size_t> histogram(std::size_t{1} << digit_bits);
  std::uint64_t prefix = 0;
  for (int pass = 0; pass < 64 / digit_bits; ++pass) {
    const int shift = 64 - digit_bits * (pass + 1);
    std::fill(histogram.begin(), histogram.end(), 0);
    for (std::size_t i = 1; i < t.size(); ++i) {
      const auto bits = std::bit_cast<std::uint64_t>(t[i] - t[i - 1]);
      if (pass > 0 && (bits >> (shift + digit_bits)) != prefix) continue;
      ++histogram[(bits >> shift) & 0xFFFF];
    }
    std::size_t digit = 0;
    while (k >= histogram[digit]) k -= histogram[digit++];
    prefix = (prefix << digit_bits) | digit;
  }
  return std::bit_cast<double>(prefix);
}

}  // namespace

double median_step(std::span<const double> t_s) {
  if (t_s.size() < 2) return 0.0;
  const std::size_t steps = t_s.size() - 1;
  const double lower = kth_step(t_s, (steps - 1) / 2);
  if (steps % 2 == 1) return lower;
  return 0.5 * (lower + kth_step(t_s, steps / 2));
}

}  // namespace benchtau::csv
