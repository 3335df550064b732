// benchtau: mean, spread, straight-line fit.
#include "src/core/stats.h"

#include <cmath>
#include <limits>

namespace benchtau {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}

Stat describe(std::span<const double> values) {
  Stat s;
  // Welford's update: one pass, no loss of precision on long records.
  double mean = 0.0, m2 = 0.0;
  for (double v : values) {
    if (std::isnan(v)) continue;
    if (s.n == 0) {
      s.min = s.max = v;
    } else {
      s.min = std::fmin(s.min, v);
      s.max = std::fmax(s.max, v);
    }
    ++s.n;
    const double delta = v - mean;
    mean += delta / static_cast<double>(s.n);
    m2 += delta * (v - mean);
  }
  if (s.n == 0) return {0, kNaN, kNaN, kNaN, kNaN};
  s.mean = mean;
  s.std = s.n > 1 ? std::sqrt(m2 / static_cast<double>(s.n - 1)) : 0.0;
  return s;
}

LineFit fit_line(std::span<const double> x, std::span<const double> y) {
  LineFit f;
  const std::size_t n = std::min(x.size(), y.size());
  f.n = n;
  if (n < 2) return {kNaN, kNaN, kNaN, n};
  double mx = 0.0, my = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    mx += x[i];
    my += y[i];
  }
  mx /= static_cast<double>(n);
  my /= static_cast<double>(n);
  double sxx = 0.0, sxy = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    sxx += (x[i] - mx) * (x[i] - mx);
    sxy += (x[i] - mx) * (y[i] - my);
  }
  if (sxx <= 0.0) return {kNaN, kNaN, kNaN, n};
  f.slope = sxy / sxx;
  f.intercept = my - f.slope * mx;
  if (n < 3) {
    f.slope_sigma = kNaN;
    return f;
  }
  double ss = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double r = y[i] - (f.intercept + f.slope * x[i]);
    ss += r * r;
  }
  f.slope_sigma = std::sqrt(ss / static_cast<double>(n - 2) / sxx);
  return f;
}

double rms_successive_difference(std::span<const double> values) {
  if (values.size() < 2) return kNaN;
  double ss = 0.0;
  for (std::size_t i = 1; i < values.size(); ++i) {
    const double d = values[i] - values[i - 1];
    ss += d * d;
  }
  return std::sqrt(ss / static_cast<double>(values.size() - 1));
}

}  // namespace benchtau
