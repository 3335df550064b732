// benchtau: the small statistics the measurement reports.
#pragma once

#include <cstddef>
#include <span>

namespace benchtau {

// Mean, sample standard deviation, extremes. NaNs are skipped; n counts the rest.
// All fields are NaN when n is 0; std is 0 when n is 1.
struct Stat {
  std::size_t n = 0;
  double mean = 0.0;
  double std = 0.0;
  double min = 0.0;
  double max = 0.0;
};

Stat describe(std::span<const double> values);

// Ordinary least squares y = a + b x, with the standard error of b from the
// residual scatter. Needs at least three points for a standard error; with
// fewer, slope_sigma is NaN.
struct LineFit {
  double intercept = 0.0;
  double slope = 0.0;
  double slope_sigma = 0.0;
  std::size_t n = 0;
};

LineFit fit_line(std::span<const double> x, std::span<const double> y);

// Root mean square of successive differences of values (cycle-to-cycle jitter
// when values are periods). NaN with fewer than two values.
double rms_successive_difference(std::span<const double> values);

}  // namespace benchtau
