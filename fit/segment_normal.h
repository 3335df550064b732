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
#include <cmath>
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
  constexpr std::size_t kLanes = 4;  // independent sums, so that no add waits on the last
  const double h = n > 1 ? (x[n - 1] - x[0]) / static_cast<double>(n - 1) : 0.0;
  // q^j, j < kBlock: the decay over j mean steps.
  double q_pow[kBlock];
  q_pow[0] = 1.0;
  const double q = std::exp(-h * inv_tau);
  for (std::size_t j = 1; j < kBlock; ++j) q_pow[j] = q_pow[j - 1] * q;
  const double b = huber_a * huber_a;

  // Sums over the samples of the Jacobian row (A e z, 1, e) and the plain residual r, as if
  // every sample were on the quadratic part of the loss; samples past the Huber threshold are
  // put right afterwards (few: 5 % of Gaussian noise at 2 sigma).
  double s00[kLanes] = {}, s01[kLanes] = {}, s02[kLanes] = {}, s12[kLanes] = {}, s22[kLanes] = {},
         g0[kLanes] = {}, g1[kLanes] = {}, g2[kLanes] = {}, rr[kLanes] = {};
  double f00 = 0, f01 = 0, f02 = 0, f11 = 0, f12 = 0, f22 = 0, h0 = 0, h1 = 0, h2 = 0, fcost = 0;
  double n00 = 0, n01 = 0, n02 = 0, n11 = 0, n12 = 0, n22 = 0;
  double e[kBlock], r[kBlock], u0[kBlock];
  for (std::size_t start = 0; start < n; start += kBlock) {
    const std::size_t m = std::min(kBlock, n - start);
    const double* xb = x.data() + start;
    const double* yb = y.data() + start;
    const double eb = std::exp(-xb[0] * inv_tau);
    bool uneven = false;
    for (std::size_t j = 0; j < m; ++j) {
      // The sample's offset from the block's even grid, in units of tau.
      const double u = ((xb[j] - xb[0]) - static_cast<double>(j) * h) * inv_tau;
      e[j] = eb * q_pow[j] * (1.0 - u);
      uneven |= !(std::fabs(u) < 1e-9);
    }
    if (uneven) {
      for (std::size_t j = 0; j < m; ++j) {
        const double u = ((xb[j] - xb[0]) - static_cast<double>(j) * h) * inv_tau;
        if (!(std::fabs(u) < 1e-9)) e[j] = std::exp(-xb[j] * inv_tau);
      }
    }
    for (std::size_t j = 0; j < m; ++j) {
      const std::size_t l = j % kLanes;
      const double ej = e[j];
      const double p = amp * ej * (xb[j] * inv_tau);  // d/d ln(tau), over inv_sigma
      const double rj = (vinf + amp * ej - yb[j]) * inv_sigma;
      r[j] = rj;
      u0[j] = p;
      s00[l] += p * p;
      s01[l] += p;
      s02[l] += p * ej;
      s12[l] += ej;
      s22[l] += ej * ej;
      g0[l] += rj * p;
      g1[l] += rj;
      g2[l] += rj * ej;
      rr[l] += rj * rj;
    }
    if (huber_a > 0.0) {
      for (std::size_t j = 0; j < m; ++j) {
        const double rj = r[j];
        if (!(rj * rj > b)) continue;
        // Ceres's HuberLoss: rho = 2 a |r| - a^2, rho' = a / |r|; r becomes sign(r) sqrt(rho)
        // and the row is scaled by rho' |r| / sqrt(rho) = a / sqrt(rho).
        const double root = std::sqrt(2.0 * huber_a * std::fabs(rj) - b);
        const double w = huber_a / root, w2m1 = w * w - 1.0;
        const double shaped = std::copysign(root, rj), dg = w * shaped - rj;
        const double p = u0[j], ej = e[j];
        f00 += w2m1 * p * p;
        f01 += w2m1 * p;
        f02 += w2m1 * p * ej;
        f11 += w2m1;
        f12 += w2m1 * ej;
        f22 += w2m1 * ej * ej;
        n00 += p * p;
        n01 += p;
        n02 += p * ej;
        n11 += 1.0;
        n12 += ej;
        n22 += ej * ej;
        h0 += dg * p;
        h1 += dg;
        h2 += dg * ej;
        fcost += shaped * shaped - rj * rj;
      }
    }
  }
  const auto sum = [](const double(&v)[kLanes]) { return (v[0] + v[1]) + (v[2] + v[3]); };
  const double is2 = inv_sigma * inv_sigma;
  const double c00 = sum(s00), c01 = sum(s01), c02 = sum(s02), c11 = static_cast<double>(n),
               c12 = sum(s12), c22 = sum(s22);
  out.jtj << c00 + f00, c01 + f01, c02 + f02, c01 + f01, c11 + f11, c12 + f12, c02 + f02, c12 + f12,
      c22 + f22;
  out.jtj *= is2;
  out.hessian << c00 - n00, c01 - n01, c02 - n02, c01 - n01, c11 - n11, c12 - n12, c02 - n02,
      c12 - n12, c22 - n22;
  out.hessian *= is2;
  out.jtr << (sum(g0) + h0) * inv_sigma, (sum(g1) + h1) * inv_sigma, (sum(g2) + h2) * inv_sigma;
  const double plain = sum(rr);
  out.cost = plain + fcost;
  out.raw_ss_V2 = plain / is2;
  out.finite = std::isfinite(out.cost) && out.jtj.allFinite() && out.hessian.allFinite() &&
               out.jtr.allFinite();
  return out;
}

}  // namespace benchtau::detail
