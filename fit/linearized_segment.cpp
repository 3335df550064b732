// benchtau: a segment's Jacobian reduced to its triangular factor.
#include "fit/linearized_segment.h"

#include <stdexcept>
#include <vector>

#include <Eigen/QR>

namespace benchtau {

LinearizedSegmentCost::LinearizedSegmentCost(const ExponentialSegmentCost& cost,
                                             const std::array<double, 3>& p0)
    : p0_(p0) {
  const auto n = static_cast<Eigen::Index>(cost.samples());
  if (n < 3) throw std::invalid_argument("LinearizedSegmentCost: fewer samples than parameters");
  // One segment's Jacobian, column-major: each parameter block's column is contiguous.
  Eigen::MatrixXd j(n, 3);
  std::vector<double> residuals(static_cast<std::size_t>(n));
  const double* params[] = {&p0_[0], &p0_[1], &p0_[2]};
  double* columns[] = {j.col(0).data(), j.col(1).data(), j.col(2).data()};
  if (!cost.Evaluate(params, residuals.data(), columns))
    throw std::invalid_argument("LinearizedSegmentCost: the segment cannot be evaluated at p0");
  const Eigen::HouseholderQR<Eigen::MatrixXd> qr(j);
  r_ = qr.matrixQR().topRows(3).triangularView<Eigen::Upper>();
}

bool LinearizedSegmentCost::Evaluate(double const* const* parameters, double* residuals,
                                     double** jacobians) const {
  const Eigen::Vector3d d(parameters[0][0] - p0_[0], parameters[1][0] - p0_[1],
                          parameters[2][0] - p0_[2]);
  Eigen::Map<Eigen::Vector3d> r(residuals);
  r = r_ * d;
  if (jacobians) {
    for (int b = 0; b < 3; ++b) {
      if (!jacobians[b]) continue;
      Eigen::Map<Eigen::Vector3d> column(jacobians[b]);
      column = r_.col(b);
    }
  }
  return true;
}

}  // namespace benchtau
