// benchtau: a segment's cost linearised at a point and reduced to three rows, for covariances.
#pragma once

// At a point p0 (normally the minimum), a segment's Jacobian J (one row per sample, in noise
// sigmas; see exponential_segment.h) factors as J = Q R with R upper-triangular 3 x 3, and
// R'R = J'J. This cost function is
//
//   residual  r = R (p - p0)        (3 residuals, dimensionless, as the segment's)
//
// with the same parameter blocks in the same order: ln(tau_s), vinf_V, amp_V. A covariance
// depends on the Jacobian only through J'J, and rank(R) = rank(J), so ceres::Covariance over
// these blocks gives the full fit's covariance, and finds the same rank deficiencies, at a
// cost that does not grow with the samples: three rows per segment instead of hundreds.
//
// Ownership: it copies what it needs (R and p0) and keeps no reference to the segment.
#include <array>

#include <ceres/sized_cost_function.h>
#include <Eigen/Core>

#include "fit/exponential_segment.h"

namespace benchtau {

class LinearizedSegmentCost final : public ceres::SizedCostFunction<3, 1, 1, 1> {
 public:
  // Evaluates cost's Jacobian at p0 and factors it. Throws std::invalid_argument if the
  // segment has fewer than 3 samples or cannot be evaluated at p0.
  LinearizedSegmentCost(const ExponentialSegmentCost& cost, const std::array<double, 3>& p0);

  bool Evaluate(double const* const* parameters, double* residuals,
                double** jacobians) const override;

  // R, upper-triangular; R'R is the segment's J'J at p0.
  const Eigen::Matrix3d& factor() const { return r_; }

 private:
  Eigen::Matrix3d r_;
  std::array<double, 3> p0_;
};

}  // namespace benchtau
