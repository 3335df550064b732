// benchtau: solving one segment or one phase with Ceres, and reading the covariance.
#include "fit/segment_solver.h"

#include <algorithm>
#include <cmath>
#include <deque>
#include <memory>
#include <optional>
#include <utility>
#include <vector>

#include <ceres/ceres.h>
#include <Eigen/Dense>
#include <Eigen/Eigenvalues>

#include "fit/exponential_segment.h"
#include "fit/linearized_segment.h"
#include "fit/segment_normal.h"

namespace benchtau::detail {
namespace {

ceres::Solver::Options solver_options(ceres::LinearSolverType type, int threads) {
  ceres::Solver::Options o;
  o.linear_solver_type = type;
  // A sound segment converges in under ten iterations; one that needs fifty is chasing tau
  // off to infinity along a straight line, and should stop and say so.
  o.max_num_iterations = 50;
  // Tight, so that two independent solvers land on the same minimum to well under 1e-6.
  o.function_tolerance = 1e-14;
  o.gradient_tolerance = 1e-16;
  o.parameter_tolerance = 1e-13;
  o.num_threads = std::max(1, threads);
  o.logging_type = ceres::SILENT;
  o.minimizer_progress_to_stdout = false;
  return o;
}

ceres::Problem::Options problem_options() {
  // The cost functions live on our side (a local or a deque) and outlive the problem.
  ceres::Problem::Options o;
  o.cost_function_ownership = ceres::DO_NOT_TAKE_OWNERSHIP;
  o.loss_function_ownership = ceres::DO_NOT_TAKE_OWNERSHIP;
  return o;
}

double mean(std::span<const double> v) {
  double s = 0.0;
  for (double x : v) s += x;
  return s / static_cast<double>(v.size());
}

// Raw residual RMS in volts (before any loss) and the sum of squares, for the noise estimate.
double rms_V(std::span<const double> x, std::span<const double> y, double log_tau, double vinf,
             double amp) {
  double ss = 0.0;
  for (std::size_t i = 0; i < x.size(); ++i) {
    const double r = segment_curve_V(log_tau, vinf, amp, x[i]) - y[i];
    ss += r * r;
  }
  return std::sqrt(ss / static_cast<double>(x.size()));
}

bool converged(const ceres::Solver::Summary& s) { return s.termination_type == ceres::CONVERGENCE; }

Estimate estimate(double value, double variance) {
  return {value, variance >= 0.0 ? std::sqrt(variance) : std::nan("")};
}

// Amplitude by linear least squares with tau and Vinf held: A = sum e (y - V) / sum e^2.
double amplitude_at(std::span<const double> x, std::span<const double> y, double log_tau,
                    double vinf) {
  double num = 0.0, den = 0.0;
  const double inv_tau = std::exp(-log_tau);
  for (std::size_t i = 0; i < x.size(); ++i) {
    const double e = std::exp(-x[i] * inv_tau);
    num += e * (y[i] - vinf);
    den += e * e;
  }
  return den > 0.0 ? num / den : 0.0;
}

// The mean turnaround voltages f = g_t' theta + sum_k g_k A_k (theta = ln tau, Vinf) of a
// joint fit depend on every amplitude. No residual block holds two amplitudes, so in
// J'J = [B E; E' D] the amplitude block D is diagonal (d_k), and the block inverse reduces
// their variance to
//   Var f = (g_t - h)' C (g_t - h) + sum_k g_k^2 / d_k,   h = sum_k g_k e_k / d_k,
// with C = cov(theta) and e_k, d_k read off each segment's own J'J (jtj[k]). Checked against
// a dense inverse of the whole J'J in the tests.
Estimate mean_turnaround(const SegmentSamples& s, std::span<const std::size_t> ids, double log_tau,
                         double vinf, std::span<const double> amp, const Eigen::Matrix2d& c,
                         std::span<const Eigen::Matrix3d> jtj, bool at_end) {
  const std::size_t n = ids.size();
  const double tau = std::exp(log_tau);
  Eigen::Vector2d g_t(0.0, 1.0), h = Eigen::Vector2d::Zero();
  double value = vinf, var_amp = 0.0;
  const double inv_n = 1.0 / static_cast<double>(n);
  for (std::size_t k = 0; k < n; ++k) {
    const double len_s = s.windows[ids[k]].length_s();
    const double e = at_end ? std::exp(-len_s / tau) : 1.0;
    const double g = e * inv_n;
    value += amp[k] * g;
    if (at_end) g_t(0) += amp[k] * e * (len_s / tau) * inv_n;  // d/d ln(tau)
    const double d = jtj[k](2, 2);
    h += g / d * jtj[k].block<2, 1>(0, 2);
    var_amp += g * g / d;
  }
  return estimate(value, (g_t - h).dot(c * (g_t - h)) + var_amp);
}

// The closed-form solvers below: Levenberg-Marquardt on the normal equations of
// segment_normal.h, with Ceres's damping rules (the diagonal clamped to [1e-6, 1e32], Nielsen's
// update) but a lighter start, 1e-8 of J'J's diagonal instead of 1e-4: the starting points are
// good, and a nearly pure Gauss-Newton step saves an iteration or two. Tolerances are as tight
// as solver_options'.
// Either gives up (nullopt) on anything but a clean minimum: out of iterations, a point that
// cannot be evaluated, a J'J far from full rank (reciprocal condition under 1e-10, a margin
// over the 1e-14 at which ceres::Covariance refuses), or tau's error over the limit. Then
// the Ceres problem decides, as it always did.
constexpr int kMaxIterations = 50;
constexpr double kInitialDamping = 1e-8;

Eigen::Vector3d clamped_diagonal(const Eigen::Matrix3d& a) {
  return a.diagonal().cwiseMax(1e-6).cwiseMin(1e32);
}

// Well enough conditioned that a covariance from it means what Ceres's would.
template <int N>
bool well_conditioned(const Eigen::Matrix<double, N, N>& a) {
  if (!a.allFinite()) return false;
  Eigen::SelfAdjointEigenSolver<Eigen::Matrix<double, N, N>> es(a, Eigen::EigenvaluesOnly);
  const auto& ev = es.eigenvalues();
  return es.info() == Eigen::Success && ev(0) > 1e-10 * ev(N - 1);
}

// The LM bookkeeping shared by both solvers: whether a step is worth taking and how the
// damping moves (Nielsen's rule, as in Ceres).
struct Damping {
  double mu = kInitialDamping;
  double nu = 2.0;
  // Returns true when the step is accepted.
  bool update(double actual, double predicted) {
    const double rho = predicted > 0.0 ? actual / predicted : -1.0;
    if (rho > 1e-3) {
      mu *= std::max(1.0 / 3.0, 1.0 - std::pow(2.0 * rho - 1.0, 3));
      nu = 2.0;
      return true;
    }
    mu *= nu;
    nu *= 2.0;
    return false;
  }
};

std::optional<RawSegment> closed_segment(std::span<const double> x, std::span<const double> y,
                                         const SolveSettings& st, std::array<double, 3> p) {
  const double inv_sigma = 1.0 / st.sigma_V;
  const auto eval = [&](const Eigen::Vector3d& q) {
    return segment_normal(x, y, q(0), q(1), q(2), inv_sigma, st.huber_a);
  };
  Eigen::Vector3d v(p[0], p[1], p[2]);
  SegmentNormal now = eval(v);
  if (!now.finite) return std::nullopt;
  Damping damping;
  int iterations = 1;
  for (;; ++iterations) {
    if (iterations > kMaxIterations || damping.mu > 1e32) return std::nullopt;
    Eigen::Matrix3d a = now.hessian;
    a.diagonal() += damping.mu * clamped_diagonal(now.hessian);
    const Eigen::Vector3d step = a.ldlt().solve(-now.jtr);
    if (!step.allFinite()) return std::nullopt;
    // cost(v + step) ~ cost + 2 step'J'r + step'J'J step.
    const double predicted = -(2.0 * step.dot(now.jtr) + step.dot(now.hessian * step));
    if (step.norm() <= 1e-13 * (v.norm() + 1e-13) || predicted <= 1e-14 * now.cost) break;
    const SegmentNormal next = eval(v + step);
    if (!next.finite) {
      damping.update(0.0, 1.0);  // refused: more damping, a shorter step
      continue;
    }
    const double actual = now.cost - next.cost;
    if (damping.update(actual, predicted)) {
      v += step;
      now = next;
      if (actual <= 1e-14 * (now.cost + actual)) break;
    }
  }
  RawSegment out;
  out.params = {v(0), v(1), v(2)};
  out.converged = true;
  out.iterations = iterations;
  out.rms_V = std::sqrt(now.raw_ss_V2 / static_cast<double>(x.size()));
  out.status = FitStatus::ok;
  if (!st.covariance) return out;
  if (!well_conditioned<3>(now.jtj)) return std::nullopt;
  out.covariance = now.jtj.inverse();
  if (!(std::sqrt(out.covariance(0, 0)) <= st.max_relative_tau_error)) return std::nullopt;
  return out;
}

// One phase: theta = (ln tau, Vinf) shared, one amplitude per segment. Each LM step
// eliminates the amplitudes (J'J's amplitude block is diagonal), solves the 2 x 2 Schur
// complement for theta, and back-substitutes; cov(theta) is that complement's inverse.
std::optional<PhaseFit> closed_phase(Phase phase, const SegmentSamples& s,
                                     std::span<const std::size_t> ids, double log_tau, double vinf,
                                     const SolveSettings& st, std::span<const double> amp0) {
  const std::size_t n = ids.size();
  const double inv_sigma = 1.0 / st.sigma_V;
  std::vector<double> amp(n), trial_amp(n), step_amp(n);
  std::vector<SegmentNormal> now(n), next(n);
  std::size_t used = 0;
  for (std::size_t k = 0; k < n; ++k) {
    // Plain least squares for each amplitude with tau and Vinf held: -J'r / J'J at A = 0.
    const SegmentWindow& w = s.windows[ids[k]];
    used += w.used;
    if (k < amp0.size() && std::isfinite(amp0[k])) {
      amp[k] = amp0[k];
      continue;
    }
    const SegmentNormal at0 = segment_normal(s.x(w), s.y(w), log_tau, vinf, 0.0, inv_sigma, 0.0);
    if (!at0.finite || !(at0.jtj(2, 2) > 0.0)) return std::nullopt;
    amp[k] = -at0.jtr(2) / at0.jtj(2, 2);
  }
  const auto eval = [&](double lt, double vi, const std::vector<double>& a,
                        std::vector<SegmentNormal>& out) {
    double cost = 0.0;
    for (std::size_t k = 0; k < n; ++k) {
      const SegmentWindow& w = s.windows[ids[k]];
      out[k] = segment_normal(s.x(w), s.y(w), lt, vi, a[k], inv_sigma, st.huber_a);
      if (!out[k].finite) return std::nan("");
      cost += out[k].cost;
    }
    return cost;
  };
  double cost = eval(log_tau, vinf, amp, now);
  if (!std::isfinite(cost)) return std::nullopt;
  Damping damping;
  int iterations = 1;
  for (;; ++iterations) {
    if (iterations > kMaxIterations || damping.mu > 1e32) return std::nullopt;
    Eigen::Matrix2d b = Eigen::Matrix2d::Zero();
    Eigen::Vector2d g = Eigen::Vector2d::Zero();
    for (const SegmentNormal& m : now) {
      b += m.hessian.topLeftCorner<2, 2>();
      g += m.jtr.head<2>();
    }
    Eigen::Matrix2d schur = b;
    schur.diagonal() += damping.mu * b.diagonal().cwiseMax(1e-6).cwiseMin(1e32);
    Eigen::Vector2d rhs = -g;
    for (const SegmentNormal& m : now) {
      const double d = m.hessian(2, 2) * (1.0 + damping.mu);
      const Eigen::Vector2d e = m.hessian.block<2, 1>(0, 2);
      schur -= e * e.transpose() / d;
      rhs += e * m.jtr(2) / d;
    }
    const Eigen::Vector2d step = schur.ldlt().solve(rhs);
    if (!step.allFinite()) return std::nullopt;
    double step2 = step.squaredNorm(), param2 = log_tau * log_tau + vinf * vinf;
    double step_dot_g = step.dot(g), quad = step.dot(b * step);
    for (std::size_t k = 0; k < n; ++k) {
      const SegmentNormal& m = now[k];
      const double d = m.hessian(2, 2) * (1.0 + damping.mu);
      const Eigen::Vector2d e = m.hessian.block<2, 1>(0, 2);
      step_amp[k] = (-m.jtr(2) - e.dot(step)) / d;
      if (!std::isfinite(step_amp[k])) return std::nullopt;
      step2 += step_amp[k] * step_amp[k];
      param2 += amp[k] * amp[k];
      step_dot_g += step_amp[k] * m.jtr(2);
      quad += 2.0 * step_amp[k] * e.dot(step) + m.hessian(2, 2) * step_amp[k] * step_amp[k];
    }
    const double predicted = -(2.0 * step_dot_g + quad);
    if (std::sqrt(step2) <= 1e-13 * (std::sqrt(param2) + 1e-13) || predicted <= 1e-14 * cost) break;
    for (std::size_t k = 0; k < n; ++k) trial_amp[k] = amp[k] + step_amp[k];
    const double trial = eval(log_tau + step(0), vinf + step(1), trial_amp, next);
    if (!std::isfinite(trial)) {
      damping.update(0.0, 1.0);
      continue;
    }
    const double actual = cost - trial;
    if (damping.update(actual, predicted)) {
      log_tau += step(0);
      vinf += step(1);
      amp.swap(trial_amp);
      now.swap(next);
      cost = trial;
      if (actual <= 1e-14 * (cost + actual)) break;
    }
  }

  // cov(theta): the inverse of the undamped Schur complement at the minimum.
  std::vector<Eigen::Matrix3d> jtj(n);
  Eigen::Matrix2d schur = Eigen::Matrix2d::Zero();
  double ss = 0.0;
  for (std::size_t k = 0; k < n; ++k) {
    jtj[k] = now[k].jtj;
    const double d = jtj[k](2, 2);
    if (!(d > 0.0)) return std::nullopt;
    const Eigen::Vector2d e = jtj[k].block<2, 1>(0, 2);
    schur += jtj[k].topLeftCorner<2, 2>() - e * e.transpose() / d;
    ss += now[k].raw_ss_V2;
  }
  if (!well_conditioned<2>(schur)) return std::nullopt;
  const Eigen::Matrix2d c = schur.inverse();
  if (!(std::sqrt(c(0, 0)) <= st.max_relative_tau_error)) return std::nullopt;

  PhaseFit f;
  f.phase = phase;
  f.segments.assign(ids.begin(), ids.end());
  f.status = FitStatus::ok;
  f.iterations = iterations;
  f.used = used;
  f.rms_V = std::sqrt(ss / static_cast<double>(used));
  const double tau = std::exp(log_tau);
  f.tau_s = {tau, tau * std::sqrt(c(0, 0))};
  f.vinf_V = estimate(vinf, c(1, 1));
  f.cov_log_tau_vinf = c(0, 1);
  f.start_V = mean_turnaround(s, ids, log_tau, vinf, amp, c, jtj, false);
  f.end_V = mean_turnaround(s, ids, log_tau, vinf, amp, c, jtj, true);
  f.amp_V = std::move(amp);
  return f;
}

}  // namespace

std::array<double, 3> initial_guess(std::span<const double> x, std::span<const double> y) {
  const std::size_t m = x.size() / 3;
  const double span_s = x.back() - x.front();
  double tau = span_s > 0.0 ? span_s : 1.0;
  if (m >= 1) {
    const double x1 = mean(x.subspan(0, m)), x3 = mean(x.subspan(2 * m, m));
    const double d1 = mean(y.subspan(m, m)) - mean(y.subspan(0, m));
    const double d2 = mean(y.subspan(2 * m, m)) - mean(y.subspan(m, m));
    const double ratio = d1 / d2;
    if (d1 * d2 > 0.0 && ratio > 1.0 && std::isfinite(ratio))
      tau = 0.5 * (x3 - x1) / std::log(ratio);  // the mean of the two window spacings
  }
  // Noise can make the ratio large (tau far too short) or near 1 (far too long).
  if (span_s > 0.0) tau = std::clamp(tau, span_s / 50.0, 1e6 * span_s);
  // Vinf and A by least squares at that tau (2 x 2 normal equations). Where tau is so long
  // that exp(-x / tau) and the constant are one column, start from tau = the span instead:
  // A = 0 would be a stationary point (no slope in ln(tau)) and the solver would stay there.
  double vinf = mean(y), amp = 0.0;
  for (int attempt = 0; attempt < 2; ++attempt) {
    // The sums come from the normal equations at Vinf = A = 0 with sigma 1: there J'J holds
    // n, sum e and sum e^2, and -J'r holds sum y and sum e y.
    const SegmentNormal at0 = segment_normal(x, y, std::log(tau), 0.0, 0.0, 1.0, 0.0);
    const double s1 = at0.jtj(1, 1), se = at0.jtj(1, 2), see = at0.jtj(2, 2);
    const double sy = -at0.jtr(1), sey = -at0.jtr(2);
    const double det = s1 * see - se * se;
    if (det > 1e-12 * s1 * see) {
      vinf = (see * sy - se * sey) / det;
      amp = (s1 * sey - se * sy) / det;
      break;
    }
    if (!(span_s > 0.0)) break;
    tau = span_s;
  }
  return {std::log(tau), vinf, amp};
}

RawSegment solve_segment(std::span<const double> x, std::span<const double> y,
                         const SolveSettings& st, const std::array<double, 3>* start) {
  RawSegment out;
  if (x.size() < std::max<std::size_t>(st.min_samples, 3)) return out;  // too_few_samples
  {
    const std::size_t m = x.size() / 3;
    const double change = mean(y.subspan(x.size() - m, m)) - mean(y.subspan(0, m));
    if (std::fabs(change) <=
        st.flat_sigmas * st.sigma_V * std::sqrt(2.0 / static_cast<double>(m))) {
      out.status = FitStatus::flat;
      return out;
    }
  }
  out.params = start ? *start : initial_guess(x, y);
  if (st.closed_form) {
    if (std::optional<RawSegment> fast = closed_segment(x, y, st, out.params)) return *fast;
    // A start from elsewhere (a phase's seed) that does not end in a clean minimum: the
    // segment's own guess next, before the general solver from the start as given.
    if (start) {
      if (std::optional<RawSegment> fast = closed_segment(x, y, st, initial_guess(x, y))) {
        return *fast;
      }
    }
  }

  ExponentialSegmentCost cost(x, y, st.sigma_V, st.loss);  // declared first: outlives problem
  ceres::Problem problem(problem_options());
  double* p = out.params.data();
  problem.AddResidualBlock(&cost, nullptr, p, p + 1, p + 2);
  ceres::Solver::Summary summary;
  ceres::Solve(solver_options(ceres::DENSE_QR, 1), &problem, &summary);
  out.iterations = static_cast<int>(summary.iterations.size());
  const bool finite = std::isfinite(p[0]) && std::isfinite(p[1]) && std::isfinite(p[2]);
  out.converged = converged(summary) && finite;
  // Out of iterations, the usual reason is a valley with no bottom (tau running off along a
  // straight line): if the covariance there shows it (rank-deficient, or tau's error past the
  // limit), say so rather than just "failed".
  const bool out_of_iterations = summary.termination_type == ceres::NO_CONVERGENCE && finite;
  if (!out.converged && !(out_of_iterations && st.covariance)) {
    out.status = FitStatus::no_convergence;
    return out;
  }
  if (out.converged) out.rms_V = rms_V(x, y, p[0], p[1], p[2]);
  if (!st.covariance) {
    out.status = FitStatus::ok;
    return out;
  }

  // A small dense problem: the SVD both inverts J'J and tells a rank-deficient Jacobian
  // (condition number above 1e7) from a merely large covariance.
  ceres::Covariance::Options co;
  co.algorithm_type = ceres::DENSE_SVD;
  ceres::Covariance covariance(co);
  const std::vector<const double*> blocks = {p, p + 1, p + 2};
  if (!covariance.Compute(blocks, &problem)) {
    out.status = FitStatus::not_identifiable;
    return out;
  }
  covariance.GetCovarianceMatrix(blocks, out.covariance.data());  // symmetric: order moot
  const double se_log_tau = std::sqrt(out.covariance(0, 0));
  if (se_log_tau > st.max_relative_tau_error)
    out.status = FitStatus::tau_undetermined;  // converged or not, the data leave tau open
  else
    out.status = out.converged ? FitStatus::ok : FitStatus::no_convergence;
  return out;
}

SegmentFit report_segment(const SegmentWindow& window, const RawSegment& raw) {
  SegmentFit f;
  f.window = window;
  f.status = raw.status;
  f.iterations = raw.iterations;
  if (raw.converged) f.rms_V = raw.rms_V;
  if (raw.status != FitStatus::ok) return f;
  const auto& [log_tau, vinf, amp] = raw.params;
  const Eigen::Matrix3d& c = raw.covariance;
  const double tau = std::exp(log_tau);
  f.tau_s = {tau, tau * std::sqrt(c(0, 0))};  // d tau = tau d ln(tau)
  f.vinf_V = estimate(vinf, c(1, 1));
  f.amp_V = estimate(amp, c(2, 2));
  const Eigen::Vector3d g_start(0.0, 1.0, 1.0);
  f.start_V = estimate(vinf + amp, g_start.dot(c * g_start));
  const double e = std::exp(-window.length_s() / tau);
  const Eigen::Vector3d g_end(amp * e * window.length_s() / tau, 1.0, e);
  f.end_V = estimate(vinf + amp * e, g_end.dot(c * g_end));
  return f;
}

PhaseFit solve_phase(Phase phase, const SegmentSamples& s, std::span<const std::size_t> ids,
                     double log_tau0, double vinf0_V, const SolveSettings& st,
                     const PhaseStart* closed_start) {
  PhaseFit f;
  f.phase = phase;
  f.segments.assign(ids.begin(), ids.end());
  const std::size_t n = ids.size();
  if (n == 0 || !std::isfinite(log_tau0) || !std::isfinite(vinf0_V)) return f;
  if (st.closed_form) {
    const bool given = closed_start != nullptr && std::isfinite(closed_start->log_tau) &&
                       std::isfinite(closed_start->vinf_V);
    const std::optional<PhaseFit> fast =
        given ? closed_phase(phase, s, ids, closed_start->log_tau, closed_start->vinf_V, st,
                             closed_start->amp_V)
              : closed_phase(phase, s, ids, log_tau0, vinf0_V, st, {});
    if (fast) return std::move(*fast);
  }

  double log_tau = log_tau0, vinf = vinf0_V;
  bool solved = false;
  std::vector<double> amp(n);
  std::deque<ExponentialSegmentCost> costs;  // built in place; addresses stay put
  for (std::size_t k = 0; k < n; ++k) {
    const SegmentWindow& w = s.windows[ids[k]];
    amp[k] = amplitude_at(s.x(w), s.y(w), log_tau, vinf);
    costs.emplace_back(s.x(w), s.y(w), st.sigma_V, st.loss);
    f.used += w.used;
  }
  {
    ceres::Problem problem(problem_options());
    auto ordering = std::make_shared<ceres::ParameterBlockOrdering>();
    for (std::size_t k = 0; k < n; ++k) {
      problem.AddResidualBlock(&costs[k], nullptr, &log_tau, &vinf, &amp[k]);
      ordering->AddElementToGroup(&amp[k], 0);  // eliminated first: one per residual block
    }
    ordering->AddElementToGroup(&log_tau, 1);
    ordering->AddElementToGroup(&vinf, 1);
    // The amplitudes are the Schur complement's eliminated blocks; what is left is 2 x 2.
    ceres::Solver::Options so = solver_options(ceres::DENSE_SCHUR, st.threads);
    so.linear_solver_ordering = ordering;
    ceres::Solver::Summary summary;
    ceres::Solve(so, &problem, &summary);
    f.iterations = static_cast<int>(summary.iterations.size());
    solved = converged(summary);
    // Out of iterations: the covariance below may still say why (as for one segment).
    const bool finite =
        std::isfinite(log_tau) && std::isfinite(vinf) &&
        std::all_of(amp.begin(), amp.end(), [](double a) { return std::isfinite(a); });
    if (!finite || !(solved || summary.termination_type == ceres::NO_CONVERGENCE)) {
      f.status = FitStatus::no_convergence;
      return f;
    }
  }

  // The covariance, on the same parameters with each segment reduced to its 3 x 3 factor
  // (linearized_segment.h): the same J'J and rank, without factoring a million rows.
  std::deque<LinearizedSegmentCost> reduced;
  ceres::Problem problem(problem_options());
  for (std::size_t k = 0; k < n; ++k) {
    reduced.emplace_back(costs[k], std::array<double, 3>{log_tau, vinf, amp[k]});
    problem.AddResidualBlock(&reduced.back(), nullptr, &log_tau, &vinf, &amp[k]);
  }
  ceres::Covariance::Options co;
  co.algorithm_type = ceres::SPARSE_QR;  // rank-revealing, and the Jacobian is sparse
  co.num_threads = std::max(1, st.threads);
  ceres::Covariance covariance(co);
  const std::vector<std::pair<const double*, const double*>> pairs = {
      {&log_tau, &log_tau}, {&log_tau, &vinf}, {&vinf, &vinf}};
  if (!covariance.Compute(pairs, &problem)) {  // rank(J) is checked over every column
    f.status = FitStatus::not_identifiable;
    return f;
  }
  Eigen::Matrix2d c;
  covariance.GetCovarianceBlock(&log_tau, &log_tau, &c(0, 0));
  covariance.GetCovarianceBlock(&log_tau, &vinf, &c(0, 1));
  covariance.GetCovarianceBlock(&vinf, &vinf, &c(1, 1));
  c(1, 0) = c(0, 1);
  if (std::sqrt(c(0, 0)) > st.max_relative_tau_error) {
    f.status = FitStatus::tau_undetermined;
    return f;
  }
  if (!solved) {
    f.status = FitStatus::no_convergence;
    return f;
  }
  f.status = FitStatus::ok;
  f.amp_V = amp;
  double ss = 0.0;
  for (std::size_t k = 0; k < n; ++k) {
    const SegmentWindow& w = s.windows[ids[k]];
    const double r = rms_V(s.x(w), s.y(w), log_tau, vinf, amp[k]);
    ss += r * r * static_cast<double>(w.used);
  }
  f.rms_V = std::sqrt(ss / static_cast<double>(f.used));
  const double tau = std::exp(log_tau);
  f.tau_s = {tau, tau * std::sqrt(c(0, 0))};
  f.vinf_V = estimate(vinf, c(1, 1));
  f.cov_log_tau_vinf = c(0, 1);

  std::vector<Eigen::Matrix3d> jtj(n);
  for (std::size_t k = 0; k < n; ++k)
    jtj[k] = reduced[k].factor().transpose() * reduced[k].factor();
  f.start_V = mean_turnaround(s, ids, log_tau, vinf, amp, c, jtj, false);
  f.end_V = mean_turnaround(s, ids, log_tau, vinf, amp, c, jtj, true);
  return f;
}

}  // namespace benchtau::detail
