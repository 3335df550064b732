// benchtau: the least-squares cost of one exponential segment of the capacitor node.
#pragma once

// One charge or discharge segment of the timing capacitor, sampled at times x_i (seconds
// since the segment's reference time t0, normally its start edge) with values y_i (volts):
//
//   model     V(x) = Vinf + A exp(-x / tau)
//   residual  r_i  = (Vinf + A exp(-x_i / tau) - y_i) / sigma        (dimensionless)
//
// Parameter blocks, in this order, each of size 1:
//   0  log_tau  ln(tau_s), tau in seconds
//   1  vinf_V   the voltage the segment runs toward, volts
//   2  amp_V    A = V(t0) - Vinf, volts
// They are separate blocks so that several segments can share log_tau and vinf_V while each
// keeps its own amp_V. The amplitude absorbs the segment's start time: an edge is timed only
// to a fraction of a sample, and moving t0 by d only rescales A by exp(d / tau).
//
// Why ln(tau): tau > 0 holds for every value the solver tries, without bounds (a bounded
// parameter sitting on its bound has no meaningful covariance), the residual is closer to
// linear in ln(tau) than in tau over the range a fit explores, and a standard error on ln(tau)
// is directly tau's relative standard error.
//
// Robust loss, per sample: Ceres applies a LossFunction to the squared norm of a whole
// residual block, and a segment is one block (one block per sample would cost an allocation
// and a virtual call per sample). So the loss, if given, is applied here to each sample:
// r_i becomes sign(r_i) sqrt(rho(r_i^2)) with its derivatives scaled to match, so that
// sum_i r_i^2 over the block equals sum_i rho(r_i^2) exactly and the minimum is that of the
// per-sample robust problem.
//
// Ownership: nothing is copied or owned. x_s, y_V and the loss must outlive this cost
// function, and it must outlive any ceres::Problem it is added to (add it with
// Problem::Options::cost_function_ownership = DO_NOT_TAKE_OWNERSHIP).
#include <span>

#include <ceres/loss_function.h>
#include <ceres/sized_cost_function.h>

namespace benchtau {

class ExponentialSegmentCost final : public ceres::SizedCostFunction<ceres::DYNAMIC, 1, 1, 1> {
 public:
  // x_s and y_V have the same size (at least 1); sigma_V > 0; per_sample_loss may be null
  // (plain least squares). Throws std::invalid_argument otherwise.
  ExponentialSegmentCost(std::span<const double> x_s, std::span<const double> y_V, double sigma_V,
                         const ceres::LossFunction* per_sample_loss = nullptr);

  bool Evaluate(double const* const* parameters, double* residuals,
                double** jacobians) const override;

  std::size_t samples() const { return x_s_.size(); }

 private:
  std::span<const double> x_s_;
  std::span<const double> y_V_;
  double inv_sigma_;
  const ceres::LossFunction* loss_;
};

// The model curve, for reports and checks: Vinf + A exp(-x / tau).
double segment_curve_V(double log_tau, double vinf_V, double amp_V, double x_s);

}  // namespace benchtau
