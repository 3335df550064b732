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
// exp(-x / tau) costs one std::exp per 32 samples: within a block, successive samples are
// one step further along, and exp(-(x + dx) / tau) = exp(-x / tau) exp(-dx / tau). For a step
// of the segment's mean spacing h plus a small d (the rounding of times read from a file),
// exp(-dx / tau) = q (1 - d / tau) with q = exp(-h / tau), to (d / tau)^2 / 2 < 1e-18; any
// other step (a gap where a NaN was skipped, uneven times) takes its own std::exp. Restarting
// every block keeps the rounding of the running product below about 32 ulp.
#include <cmath>
#include <cstddef>
#include <span>

#include <Eigen/Core>

namespace benchtau::detail {

struct SegmentNormal {
  Eigen::Matrix3d jtj = Eigen::Matrix3d::Zero();
  Eigen::Vector3d jtr = Eigen::Vector3d::Zero();
  double cost = 0.0;       // sum of the (loss-shaped) residuals squared, in sigmas^2
  double raw_ss_V2 = 0.0;  // sum of the plain residuals squared, in volts^2
  bool finite = false;     // false: the point cannot be evaluated (then nothing else holds)
};

// huber_a: the Huber threshold in sigmas, 0 for plain least squares.
inline SegmentNormal segment_normal(std::span<const double> x, std::span<const double> y,
                                    double log_tau, double vinf, double amp, double inv_sigma,
                                    double huber_a) {
  SegmentNormal out;
  const std::size_t n = x.size();
  const double inv_tau = std::exp(-log_tau);
  if (n == 0 || !std::isfinite(inv_tau) || !(inv_tau > 0.0) || !std::isfinite(vinf) ||
      !std::isfinite(amp))
    return out;
  constexpr std::size_t kBlock = 32;
  const double h = n > 1 ? (x[n - 1] - x[0]) / static_cast<double>(n - 1) : 0.0;
  const double q = std::exp(-h * inv_tau);
  const double b = huber_a * huber_a;
  double s00 = 0, s01 = 0, s02 = 0, s11 = 0, s12 = 0, s22 = 0, g0 = 0, g1 = 0, g2 = 0;
  double cost = 0, raw = 0;
  double e = 1.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double z = x[i] * inv_tau;
    if (i % kBlock == 0) {
      e = std::exp(-z);
    } else {
      const double dx = x[i] - x[i - 1];
      const double u = (dx - h) * inv_tau;
      e *= std::fabs(u) < 1e-9 ? q * (1.0 - u) : std::exp(-dx * inv_tau);
    }
    const double dv = vinf + amp * e - y[i];
    raw += dv * dv;
    double r = dv * inv_sigma;
    // The Jacobian row over inv_sigma: d/d ln(tau) = A e z (0 where e underflows), 1, e.
    const double u0 = e == 0.0 ? 0.0 : amp * e * z;
    double w = 1.0;
    const double s = r * r;
    if (huber_a > 0.0 && s > b) {
      // Ceres's HuberLoss: rho = 2 a |r| - a^2, rho' = a / |r|; the scale rho' |r| / sqrt(rho).
      const double root = std::sqrt(2.0 * huber_a * std::fabs(r) - b);
      w = huber_a / root;
      r = std::copysign(root, r);
    }
    const double w2 = w * w, wr = w * r;
    s00 += w2 * u0 * u0;
    s01 += w2 * u0;
    s02 += w2 * u0 * e;
    s11 += w2;
    s12 += w2 * e;
    s22 += w2 * e * e;
    g0 += wr * u0;
    g1 += wr;
    g2 += wr * e;
    cost += r * r;
  }
  const double is2 = inv_sigma * inv_sigma;
  out.jtj << s00, s01, s02, s01, s11, s12, s02, s12, s22;
  out.jtj *= is2;
  out.jtr << g0 * inv_sigma, g1 * inv_sigma, g2 * inv_sigma;
  out.cost = cost;
  out.raw_ss_V2 = raw;
  out.finite = std::isfinite(cost) && out.jtj.allFinite() && out.jtr.allFinite();
  return out;
}

}  // namespace benchtau::detail
