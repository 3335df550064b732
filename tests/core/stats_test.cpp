// benchtau: summary statistics and the straight-line fit.
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "src/core/stats.h"

using namespace benchtau;

TEST_CASE("describe: mean, sample standard deviation, extremes, NaN skipped") {
  // Sample standard deviation of 2, 4, 4, 4, 5, 5, 7, 9 is sqrt(32/7): the
  // textbook example of the (n - 1) estimator.
  const std::vector<double> v{2, 4, 4, NAN, 4, 5, 5, 7, 9};
  const Stat s = describe(v);
  CHECK(s.n == 8);
  CHECK(s.mean == Approx(5.0));
  CHECK(s.std == Approx(std::sqrt(32.0 / 7.0)));
  CHECK(s.min == 2.0);
  CHECK(s.max == 9.0);
  CHECK(describe(std::vector<double>{3.0}).std == 0.0);
  CHECK(std::isnan(describe(std::vector<double>{}).mean));
}

TEST_CASE("fit_line recovers a slope and its standard error") {
  // y = 1 + 2x + e with e alternating +-0.1: residual variance 0.01 * n/(n-2).
  std::vector<double> x, y;
  for (int i = 0; i < 10; ++i) {
    x.push_back(i);
    y.push_back(1.0 + 2.0 * i + (i % 2 ? 0.1 : -0.1));
  }
  const LineFit f = fit_line(x, y);
  CHECK(f.slope == Approx(2.0).margin(0.02));
  CHECK(f.intercept == Approx(1.0).margin(0.1));
  double sxx = 0, mx = 4.5;
  for (double xi : x) sxx += (xi - mx) * (xi - mx);
  double ss = 0;
  for (int i = 0; i < 10; ++i) {
    const double r = y[i] - (f.intercept + f.slope * x[i]);
    ss += r * r;
  }
  CHECK(f.slope_sigma == Approx(std::sqrt(ss / 8.0 / sxx)));
  CHECK(std::isnan(fit_line(std::vector<double>{1, 2}, std::vector<double>{1, 2}).slope_sigma));
}

TEST_CASE("rms_successive_difference is cycle-to-cycle jitter") {
  const std::vector<double> p{1.0, 1.1, 1.0, 1.1};
  CHECK(rms_successive_difference(p) == Approx(0.1));
  CHECK(std::isnan(rms_successive_difference(std::vector<double>{1.0})));
}
