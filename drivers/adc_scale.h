// benchtau: ADC counts to volts at the node, from the reference, bit depth and input divider.
#pragma once

#include <cmath>
#include <cstdint>

namespace benchtau {

// One count is vref_V / 2^bits at the ADC pin (the ideal converter's step, as
// data sheets give it; common practice), and the node is divider times the ADC
// pin (a 2:1 divider in front of the ADC is divider 2).
struct AdcScale {
  double vref_V = 5.0;
  int bits = 10;
  double divider = 1.0;

  double volts_per_count() const { return vref_V / std::ldexp(1.0, bits) * divider; }
  // The largest count the converter can give.
  std::uint32_t full_scale() const { return (1u << bits) - 1u; }
};

}  // namespace benchtau
