// benchtau: the exponential segment's analytic derivatives against finite differences.
// Ceres's headers bring glog, whose CHECK macro would replace Catch's: include them first,
// so that catch.hpp's definition is the one left standing.
#include <ceres/gradient_checker.h>
#include <ceres/loss_function.h>
#include <ceres/numeric_diff_options.h>

#include "fit/exponential_segment.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

using namespace benchtau;

namespace {

// 150 samples over 4 ms (26.8 us apart), following the probe point's own curve plus a fixed
// ripple of about a sigma, so that residuals are of order one as near a minimum: far from the
// data, rounding in the residual itself would swamp the finite differences.
struct Samples {
  std::vector<double> x_s, y_V;
};

Samples samples(double tau_s, double vinf_V, double amp_V, std::size_t n = 150,
                double span_s = 4e-3) {
  Samples s;
  for (std::size_t i = 0; i < n; ++i) {
    const double x = span_s * static_cast<double>(i) / static_cast<double>(n - 1);
    s.x_s.push_back(x);
    s.y_V.push_back(vinf_V + amp_V * std::exp(-x / tau_s) +
                    0.015 * std::sin(37.0 * static_cast<double>(i)));
  }
  return s;
}

struct Errors {
  bool checker_ok = false;     // GradientChecker's own verdict at the precision asked
  double relative = 0.0;       // worst |J - N| / max(|J|, |N|), entry by entry
  double column_scaled = 0.0;  // worst |J - N| / max over the column of |J|
  std::string log;             // the checker's table of bad entries, if any
};

// GradientChecker compares every Jacobian entry with finite differences. Entry by entry
// relative error is the strict test; where tau is far below the sample spacing most entries
// are exp(-hundreds) and only rounding is left of them in the differences, so there the test
// is relative to the column's largest entry.
Errors probe(const ceres::CostFunction& cost, double log_tau, double vinf, double amp,
             double initial_step = 1e-3) {
  ceres::NumericDiffOptions nd;
  nd.ridders_relative_initial_step_size = initial_step;
  const std::vector<const ceres::Manifold*>* euclidean = nullptr;
  const ceres::GradientChecker checker(&cost, euclidean, nd);
  const double p0[] = {log_tau}, p1[] = {vinf}, p2[] = {amp};
  const double* params[] = {p0, p1, p2};
  ceres::GradientChecker::ProbeResults res;
  Errors e;
  e.checker_ok = checker.Probe(params, 1e-7, &res);
  e.log = res.error_log;
  REQUIRE(res.return_value);
  for (std::size_t b = 0; b < 3; ++b) {
    const auto& j = res.jacobians[b];
    const auto& n = res.numeric_jacobians[b];
    const double col = j.cwiseAbs().maxCoeff();
    for (Eigen::Index i = 0; i < j.rows(); ++i) {
      const double err = std::fabs(j(i, 0) - n(i, 0));
      const double mag = std::max(std::fabs(j(i, 0)), std::fabs(n(i, 0)));
      if (mag > 0.0) e.relative = std::max(e.relative, err / mag);
      e.column_scaled = std::max(e.column_scaled, err / col);
    }
  }
  return e;
}

}  // namespace

TEST_CASE("the segment's Jacobian matches finite differences from small to large tau") {
  // tau from a tenth of the segment to a thousand segments: every entry checked on its own.
  for (double tau_s : {4e-4, 1e-3, 5.7e-3, 0.2, 4.0}) {
    for (double amp_V : {-6.0, 0.5}) {
      INFO("tau " << tau_s << " s, A " << amp_V << " V");
      const Samples s = samples(tau_s, 9.0, amp_V);
      const ExponentialSegmentCost cost(s.x_s, s.y_V, 0.015);
      REQUIRE(cost.num_residuals() == 150);
      REQUIRE(cost.parameter_block_sizes() == std::vector<int32_t>{1, 1, 1});
      const Errors e = probe(cost, std::log(tau_s), 9.0, amp_V);
      INFO(e.log);
      CHECK(e.checker_ok);
      CHECK(e.relative < 1e-7);
    }
  }
  // tau of a fortieth of the segment, of one and of a tenth of a sample interval: the curve
  // is gone (to below rounding) after the first samples.
  for (double tau_s : {1e-4, 2.7e-5, 2.7e-6}) {
    INFO("tau " << tau_s << " s");
    const Samples s = samples(tau_s, 9.0, -6.0);
    const ExponentialSegmentCost cost(s.x_s, s.y_V, 0.015);
    CHECK(probe(cost, std::log(tau_s), 9.0, -6.0).column_scaled < 1e-7);
  }
}

TEST_CASE("the per-sample Huber loss keeps the Jacobian exact, inliers and outliers alike") {
  const ceres::HuberLoss huber(2.0);
  for (double tau_s : {4e-4, 5.7e-3, 4.0}) {
    INFO("tau " << tau_s << " s");
    Samples s = samples(tau_s, 9.0, -6.0);
    s.y_V[20] += 1.5;  // glitches: a hundred sigmas out
    s.y_V[21] -= 0.8;
    s.y_V[90] += 0.05;  // a few sigmas: past the threshold
    const ExponentialSegmentCost cost(s.x_s, s.y_V, 0.015, &huber);
    // Steps small enough not to straddle the loss's kink at 2 sigma (Huber's rho is only
    // once differentiable there, and an extrapolation across it is not a derivative).
    const Errors e = probe(cost, std::log(tau_s), 9.0, -6.0, 1e-5);
    INFO(e.log);
    CHECK(e.checker_ok);
    CHECK(e.relative < 1e-7);
  }
}

TEST_CASE("robust residuals square to Huber's rho, as Ceres defines it") {
  // ceres/loss_function.h: rho(s) = s for s <= 1, 2 sqrt(s) - 1 otherwise, scaled to
  // a^2 rho(s / a^2). The block's sum of squares must equal sum rho(r_i^2).
  Samples s = samples(5.7e-3, 9.0, -6.0, 10);
  s.y_V[3] += 0.3;
  const double sigma = 0.01, a = 2.0;
  const ceres::HuberLoss huber(a);
  const ExponentialSegmentCost plain(s.x_s, s.y_V, sigma);
  const ExponentialSegmentCost robust(s.x_s, s.y_V, sigma, &huber);
  const double p0[] = {std::log(5e-3)}, p1[] = {9.0}, p2[] = {-6.0};
  const double* params[] = {p0, p1, p2};
  std::vector<double> r(10), rr(10);
  REQUIRE(plain.Evaluate(params, r.data(), nullptr));
  REQUIRE(robust.Evaluate(params, rr.data(), nullptr));
  std::size_t outliers = 0;
  for (std::size_t i = 0; i < r.size(); ++i) {
    const double si = r[i] * r[i];
    const double rho = si <= a * a ? si : 2.0 * a * std::sqrt(si) - a * a;
    CHECK(rr[i] * rr[i] == Approx(rho).epsilon(1e-12));
    CHECK(std::signbit(rr[i]) == std::signbit(r[i]));
    if (si > a * a) ++outliers;
  }
  CHECK(outliers >= 1);
}

TEST_CASE("the cost function refuses inconsistent input") {
  const std::vector<double> x = {0.0, 1e-3}, y = {1.0};
  CHECK_THROWS_AS(ExponentialSegmentCost(x, y, 0.01), std::invalid_argument);
  CHECK_THROWS_AS(ExponentialSegmentCost(x, x, 0.0), std::invalid_argument);
  CHECK_THROWS_AS(ExponentialSegmentCost({}, {}, 0.01), std::invalid_argument);
}
