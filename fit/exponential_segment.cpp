// benchtau: residuals and analytic derivatives of one exponential segment.
#include "fit/exponential_segment.h"

#include <cmath>
#include <limits>
#include <stdexcept>

namespace benchtau {

ExponentialSegmentCost::ExponentialSegmentCost(std::span<const double> x_s,
                                               std::span<const double> y_V, double sigma_V,
                                               const ceres::LossFunction* per_sample_loss)
    : x_s_(x_s), y_V_(y_V), inv_sigma_(1.0 / sigma_V), loss_(per_sample_loss) {
  if (x_s.size() != y_V.size())
    throw std::invalid_argument("ExponentialSegmentCost: times and values differ in length");
  if (x_s.empty()) throw std::invalid_argument("ExponentialSegmentCost: no samples");
  if (x_s.size() > static_cast<std::size_t>(std::numeric_limits<int>::max()))
    throw std::invalid_argument("ExponentialSegmentCost: too many samples for one block");
  if (!(sigma_V > 0.0) || !std::isfinite(sigma_V))
    throw std::invalid_argument("ExponentialSegmentCost: sigma must be positive and finite");
  set_num_residuals(static_cast<int>(x_s.size()));
}

bool ExponentialSegmentCost::Evaluate(double const* const* parameters, double* residuals,
                                      double** jacobians) const {
  const double log_tau = parameters[0][0];
  const double vinf = parameters[1][0];
  const double amp = parameters[2][0];
  if (!std::isfinite(log_tau) || !std::isfinite(vinf) || !std::isfinite(amp)) return false;
  const double inv_tau = std::exp(-log_tau);  // may be inf or 0 far from any sensible tau

  double* d_log_tau = jacobians ? jacobians[0] : nullptr;
  double* d_vinf = jacobians ? jacobians[1] : nullptr;
  double* d_amp = jacobians ? jacobians[2] : nullptr;

  for (std::size_t i = 0; i < x_s_.size(); ++i) {
    const double x = x_s_[i];
    const double z = x == 0.0 ? 0.0 : x * inv_tau;
    const double e = std::exp(-z);
    double r = (vinf + amp * e - y_V_[i]) * inv_sigma_;
    // d e / d ln(tau) = e z; where e underflows, z may be inf, and the product is 0.
    double g_log_tau = e == 0.0 ? 0.0 : amp * e * z * inv_sigma_;
    double g_vinf = inv_sigma_;
    double g_amp = e * inv_sigma_;
    if (loss_ != nullptr) {
      const double s = r * r;
      double rho[3];
      loss_->Evaluate(s, rho);
      if (rho[0] != s) {
        // r -> sign(r) sqrt(rho(s)); dr'/dr = rho'(s) r / r'. At r = 0 the limit is
        // sqrt(rho'(0)).
        const double root = std::sqrt(rho[0]);
        const double scale = s == 0.0 ? std::sqrt(rho[1]) : rho[1] * std::fabs(r) / root;
        r = std::copysign(root, r);
        g_log_tau *= scale;
        g_vinf *= scale;
        g_amp *= scale;
      }
    }
    if (!std::isfinite(r)) return false;
    residuals[i] = r;
    if (d_log_tau) d_log_tau[i] = g_log_tau;
    if (d_vinf) d_vinf[i] = g_vinf;
    if (d_amp) d_amp[i] = g_amp;
  }
  return true;
}

double segment_curve_V(double log_tau, double vinf_V, double amp_V, double x_s) {
  const double z = x_s == 0.0 ? 0.0 : x_s * std::exp(-log_tau);
  return vinf_V + amp_V * std::exp(-z);
}

}  // namespace benchtau
