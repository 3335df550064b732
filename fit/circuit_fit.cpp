// benchtau: the circuit fit with Ceres: residuals of the exact cycle model against the figures.
#include "fit/circuit_fit.h"

#include <ceres/ceres.h>

#include <Eigen/Cholesky>
#include <cmath>

namespace benchtau {
namespace {

// The whole cost as one residual block over z: a capture's figures depend on every unknown,
// so there is no sparsity to give Ceres.
class CircuitCost {
 public:
  CircuitCost(const CircuitProblem& problem, const FitSpec& spec)
      : problem_(problem), spec_(spec), x_(problem.params.size()) {}

  bool operator()(double const* const* parameters, double* residuals) const {
    const double* z = parameters[0];
    const std::size_t n = problem_.params.size();
    for (std::size_t i = 0; i < n; ++i) {
      const Prior& d = problem_.params[i].prior;
      x_[i] = d.mean + d.sigma * z[i];
    }
    double* r = residuals;
    for (std::size_t k = 0; k < problem_.circuits.size(); ++k) {
      const CyclePrediction p =
          predict_cycle(circuit_at(problem_, k, x_, spec_.fault, spec_.fault_S));
      // A step that stops the oscillation has no cycle to compare: Ceres shortens it.
      if (!p.oscillates) return false;
      for (const ObservationBlock& b : problem_.obs[k].blocks) {
        const double e0 = predicted(b.q[0], p) - b.value[0];
        if (b.size == 1) {
          *r++ = b.whiten[0] * e0;
        } else {
          const double e1 = predicted(b.q[1], p) - b.value[1];
          *r++ = b.whiten[0] * e0;
          *r++ = b.whiten[2] * e0 + b.whiten[3] * e1;
        }
      }
    }
    for (std::size_t i = 0; i < n; ++i) {
      const Prior& h = spec_.priors[i];
      *r++ = (x_[i] - h.mean) / h.sigma;
    }
    for (double* q = residuals; q != r; ++q) {
      if (!std::isfinite(*q)) return false;
    }
    return true;
  }

 private:
  const CircuitProblem& problem_;
  const FitSpec& spec_;
  mutable std::vector<double> x_;
};

}  // namespace

std::vector<Prior> design_priors(std::span<const FitParameter> params) {
  std::vector<Prior> p;
  p.reserve(params.size());
  for (const FitParameter& f : params) p.push_back(f.prior);
  return p;
}

Circuit circuit_at(const CircuitProblem& problem, std::size_t k, std::span<const double> x,
                   FaultPath fault, double fault_S) {
  Circuit c = problem.circuits[k];
  apply_parameters(problem.params, x, k, fault, fault_S, c);
  if (k < problem.across.size() && problem.across[k].field != nullptr) {
    double& r = c.v.*problem.across[k].field;
    const double added = problem.across[k].ohm;
    r = r * added / (r + added);
  }
  return c;
}

CircuitFitResult fit_circuit(const CircuitProblem& problem, const FitSpec& spec,
                             std::span<const double> z_start) {
  CircuitFitResult out;
  const std::size_t n = problem.params.size();
  std::size_t figures = 0;
  for (const CaptureObservations& o : problem.obs) figures += residual_count(o);
  out.figures = figures;
  std::vector<double> z(n, 0.0);
  if (z_start.size() == n) z.assign(z_start.begin(), z_start.end());

  // Both live here and outlive the problem, which owns neither.
  CircuitCost functor(problem, spec);
  ceres::DynamicNumericDiffCostFunction<CircuitCost, ceres::CENTRAL> cost(
      &functor, ceres::DO_NOT_TAKE_OWNERSHIP);
  cost.AddParameterBlock(static_cast<int>(n));
  cost.SetNumResiduals(static_cast<int>(figures + n));
  ceres::Problem::Options po;
  po.cost_function_ownership = ceres::DO_NOT_TAKE_OWNERSHIP;
  ceres::Problem ceres_problem(po);
  ceres_problem.AddResidualBlock(&cost, nullptr, z.data());

  // A start where the circuit does not oscillate (a fault path at the top of its range) has
  // nothing to descend from; say so here rather than through the solver's log.
  {
    std::vector<double> r0(figures + n);
    const double* blocks0[] = {z.data()};
    if (!functor(blocks0, r0.data())) return out;
  }

  ceres::Solver::Options so;
  so.linear_solver_type = ceres::DENSE_QR;
  so.max_num_iterations = 100;
  so.function_tolerance = 1e-12;
  so.gradient_tolerance = 1e-12;
  so.parameter_tolerance = 1e-12;
  so.logging_type = ceres::SILENT;
  ceres::Solver::Summary summary;
  ceres::Solve(so, &ceres_problem, &summary);

  out.z = z;
  out.x.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    const Prior& d = problem.params[i].prior;
    out.x[i] = d.mean + d.sigma * z[i];
  }
  const bool solved = summary.termination_type == ceres::CONVERGENCE ||
                      summary.termination_type == ceres::NO_CONVERGENCE;
  if (!solved || !std::isfinite(summary.final_cost)) return out;

  // Split the cost into the figures' part and the priors' part.
  std::vector<double> r(figures + n);
  double cost_total = 0.0;
  ceres_problem.Evaluate(ceres::Problem::EvaluateOptions(), &cost_total, &r, nullptr, nullptr);
  for (std::size_t i = 0; i < figures; ++i) out.chi2_data += r[i] * r[i];
  for (std::size_t i = figures; i < r.size(); ++i) out.chi2_prior += r[i] * r[i];

  ceres::Covariance::Options co;
  co.algorithm_type = ceres::DENSE_SVD;
  ceres::Covariance covariance(co);
  const std::vector<std::pair<const double*, const double*>> blocks = {{z.data(), z.data()}};
  if (!covariance.Compute(blocks, &ceres_problem)) return out;
  Eigen::MatrixXd cov_z(n, n);
  covariance.GetCovarianceBlock(z.data(), z.data(), cov_z.data());  // symmetric: order moot

  Eigen::VectorXd s(n);
  double log_w = 0.0, log_s = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    s(static_cast<Eigen::Index>(i)) = problem.params[i].prior.sigma;
    log_s += std::log(problem.params[i].prior.sigma);
    log_w += std::log(spec.priors[i].sigma);
  }
  out.cov_x = s.asDiagonal() * cov_z * s.asDiagonal();
  const Eigen::LDLT<Eigen::MatrixXd> ldlt(cov_z);
  if (ldlt.info() != Eigen::Success || !(ldlt.vectorD().minCoeff() > 0.0)) return out;
  const double log_det_z = ldlt.vectorD().array().log().sum();
  out.log_evidence = -0.5 * (out.chi2_data + out.chi2_prior) + 0.5 * log_det_z + log_s - log_w;
  for (std::size_t k = 0; k < problem.circuits.size(); ++k) {
    out.cycles.push_back(predict_cycle(circuit_at(problem, k, out.x, spec.fault, spec.fault_S)));
  }
  out.ok = true;
  return out;
}

}  // namespace benchtau
