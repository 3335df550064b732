// benchtau: the linearised segment: its Jacobian, and R'R against the segment's own J'J.
// Ceres's headers bring glog, whose CHECK would replace Catch's: they come first.
#include <ceres/gradient_checker.h>
#include <ceres/loss_function.h>
#include <Eigen/Dense>

#include "fit/exponential_segment.h"
#include "fit/linearized_segment.h"

#include <catch2/catch.hpp>

#include <array>
#include <cmath>
#include <vector>

using namespace benchtau;

namespace {

struct Samples {
  std::vector<double> x_s, y_V;
};

// 120 samples of a charging curve (tau 5.7 ms, 9 V, from 3 V) over 4 ms with a ripple,
// two of them glitched so that a Huber loss acts on them.
Samples samples() {
  Samples s;
  for (int i = 0; i < 120; ++i) {
    const double x = 4e-3 * i / 119.0;
    s.x_s.push_back(x);
    s.y_V.push_back(9.0 - 6.0 * std::exp(-x / 5.7e-3) + 0.02 * std::sin(3.0 * i));
  }
  s.y_V[40] += 0.9;
  s.y_V[41] -= 0.7;
  return s;
}

Eigen::MatrixXd jacobian(const ExponentialSegmentCost& cost, const std::array<double, 3>& p) {
  const auto n = static_cast<Eigen::Index>(cost.samples());
  Eigen::MatrixXd j(n, 3);
  Eigen::VectorXd r(n);
  const double* params[] = {&p[0], &p[1], &p[2]};
  double* cols[] = {j.col(0).data(), j.col(1).data(), j.col(2).data()};
  REQUIRE(cost.Evaluate(params, r.data(), cols));
  return j;
}

}  // namespace

TEST_CASE("R'R of the linearised segment equals the segment's J'J, with and without Huber") {
  const Samples s = samples();
  const ceres::HuberLoss huber(2.0);
  for (const ceres::LossFunction* loss : {static_cast<const ceres::LossFunction*>(nullptr),
                                          static_cast<const ceres::LossFunction*>(&huber)}) {
    const ExponentialSegmentCost cost(s.x_s, s.y_V, 0.02, loss);
    const std::array<double, 3> p0 = {std::log(5.5e-3), 8.9, -5.9};
    const LinearizedSegmentCost lin(cost, p0);
    const Eigen::MatrixXd j = jacobian(cost, p0);
    const Eigen::Matrix3d jtj = j.transpose() * j;
    const Eigen::Matrix3d rtr = lin.factor().transpose() * lin.factor();
    CHECK((rtr - jtj).norm() < 1e-10 * jtj.norm());
    CHECK(lin.factor()(1, 0) == 0.0);  // upper-triangular
    CHECK(lin.factor()(2, 0) == 0.0);
    CHECK(lin.factor()(2, 1) == 0.0);
  }
}

TEST_CASE("the linearised segment's Jacobian matches finite differences") {
  const Samples s = samples();
  const ExponentialSegmentCost cost(s.x_s, s.y_V, 0.02);
  const std::array<double, 3> p0 = {std::log(5.5e-3), 8.9, -5.9};
  const LinearizedSegmentCost lin(cost, p0);
  const ceres::NumericDiffOptions nd;
  const std::vector<const ceres::Manifold*>* euclidean = nullptr;
  const ceres::GradientChecker checker(&lin, euclidean, nd);
  for (const std::array<double, 3>& p : {p0, std::array<double, 3>{-4.0, 2.0, 1.0}}) {
    const double* params[] = {&p[0], &p[1], &p[2]};
    ceres::GradientChecker::ProbeResults res;
    const bool ok = checker.Probe(params, 1e-9, &res);
    INFO(res.error_log);
    CHECK(ok);
  }
  // At p0 the residual is zero, and it grows as R (p - p0).
  const double q[] = {p0[0] + 1e-3, p0[1], p0[2]};
  const double* params[] = {&q[0], &q[1], &q[2]};
  double r[3];
  REQUIRE(lin.Evaluate(params, r, nullptr));
  CHECK(r[0] == Approx(lin.factor()(0, 0) * 1e-3).epsilon(1e-9));
  CHECK(r[1] == 0.0);
  CHECK(r[2] == 0.0);
}

TEST_CASE("a segment with fewer samples than parameters cannot be linearised") {
  const std::vector<double> x = {0.0, 1e-3}, y = {3.0, 3.5};
  const ExponentialSegmentCost cost(x, y, 0.02);
  CHECK_THROWS_AS(LinearizedSegmentCost(cost, {std::log(5e-3), 9.0, -6.0}), std::invalid_argument);
}
