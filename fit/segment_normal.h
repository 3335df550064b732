// benchtau: one segment's normal equations at a point, in a single pass over its samples.
#pragma once

// Internal to fit/: the hot loop of the closed-form solvers in segment_solver.cpp. For the
// segment's samples (x_s since its start edge, y_V) and a point (ln tau, Vinf, A), it sums
// what a Gauss-Newton step needs: J'J (3 x 3), J'r and the cost sum r^2, with r and J exactly
// those of ExponentialSegmentCost (exponential_segment.h): residuals in noise sigmas, the Huber
// loss applied per sample as sign(r) sqrt(rho(r^2)) with the Jacobian row scaled to match. So
// a minimum found from these sums is the Ceres problem's minimum, and J'J is the matrix
// ceres::Covariance inverts.
//
// exp(-x / tau) costs one std::exp per 32 samples: sample j of a block starting at x_b lies
// j h + d past it (h the segment's mean spacing, d the rounding of times read from a file),
// and exp(-x / tau) = exp(-x_b / tau) q^j (1 - d / tau) with q = exp(-h / tau), to
// (d / tau)^2 / 2 < 1e-18. A sample off that grid by more (a gap where a NaN was skipped,
// uneven times) takes its own std::exp. q^j by repeated products is good to about 32 ulp.
#include <cstddef>
#include <span>

#include <Eigen/Core>

namespace benchtau::detail {

struct SegmentNormal {
  Eigen::Matrix3d jtj = Eigen::Matrix3d::Zero();
  // The Gauss-Newton Hessian of the Huber cost itself: samples on the loss's linear part have
  // no curvature and drop out. Steps taken with it converge quadratically, where J'J (which
  // keeps them, scaled) converges only linearly, at a rate set by their share.
  Eigen::Matrix3d hessian = Eigen::Matrix3d::Zero();
  Eigen::Vector3d jtr = Eigen::Vector3d::Zero();
  double cost = 0.0;       // sum of the (loss-shaped) residuals squared, in sigmas^2
  double raw_ss_V2 = 0.0;  // sum of the plain residuals squared, in volts^2
  bool finite = false;     // false: the point cannot be evaluated (then nothing else holds)
};

// huber_a: the Huber threshold in sigmas, 0 for plain least squares.
SegmentNormal segment_normal(std::span<const double> x, std::span<const double> y, double log_tau,
                             double vinf, double amp, double inv_sigma, double huber_a);

}  // namespace benchtau::detail
