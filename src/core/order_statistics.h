// benchtau: exact percentiles of a large set of draws, selected in place.
#pragma once

#include <cstddef>
#include <span>

namespace benchtau {

// The percentiles (each in [0, 100]) of the values of x that are not NaN,
// each interpolated linearly between the two nearest order statistics at
// rank p / 100 (count - 1), as NumPy's default does. Reorders x. out[i] is
// NaN when x holds no number.
//
// The order statistics are exact. A sample of x (64 runs spread over it)
// brackets each wanted rank by value, one pass over x counts what lies below each bracket and
// keeps what lies inside it, and std::nth_element picks the ranks among the
// kept values; a bracket that misses its rank (rare) falls back to
// std::nth_element over all the values.
//
// count, when known, is how many values of x are not NaN (it saves a pass).
inline constexpr std::size_t kCountUnknown = static_cast<std::size_t>(-1);
void percentiles_of(std::span<double> x, std::span<const double> percents, std::span<double> out,
                    std::size_t count = kCountUnknown);

}  // namespace benchtau
