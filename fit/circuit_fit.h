// benchtau: the maximum a posteriori fit of a circuit's effective values to its captures.
#pragma once

// The problem: unknowns x (circuit_parameters.h), each capture's figures (observations.h),
// and one prior per unknown. The cost is
//
//   sum over captures and figures of |whiten (model(x) - figure)|^2 + sum_i ((x_i - m_i) / w_i)^2
//
// where model(x) is the exact cycle (predict_cycle) of the design's circuit at x, and (m_i,
// w_i) the prior of the explanation being fitted. Ceres solves it in scaled coordinates
// z_i = (x_i - mu_i) / s_i, (mu_i, s_i) the as-designed prior, so that every unknown is of
// order one whatever its unit; derivatives are central differences of the exact model (a
// few dozen residuals, each an allocation-free closed form). The posterior covariance is
// ceres::Covariance at the minimum.
#include <cstddef>
#include <span>
#include <vector>

#include <Eigen/Core>

#include "fit/circuit_parameters.h"
#include "fit/observations.h"
#include "src/core/circuit.h"

namespace benchtau {

struct CircuitProblem {
  std::vector<FitParameter> params;
  std::vector<Circuit> circuits;         // per capture: the design's circuit, as wired
  std::vector<CaptureObservations> obs;  // per capture
  // A known resistor across one part in a capture (BoardChange), applied after x.
  struct Across {
    double CircuitValues::*field = nullptr;
    double ohm = kOpen;
  };
  std::vector<Across> across;  // per capture
};

// One explanation's fit: its priors (one per unknown), and a fault path held at fault_S.
struct FitSpec {
  std::vector<Prior> priors;
  FaultPath fault = FaultPath::none;
  double fault_S = 0.0;
};

struct CircuitFitResult {
  bool ok = false;          // converged, and the covariance exists
  std::vector<double> x;    // the unknowns at the minimum
  std::vector<double> z;    // the same in scaled coordinates (a start for the next fit)
  Eigen::MatrixXd cov_x;    // their posterior covariance
  double chi2_data = 0.0;   // the figures' part of the cost
  double chi2_prior = 0.0;  // the priors' part
  std::size_t figures = 0;  // residuals from the captures
  // ln of the Laplace approximation of the evidence, less a constant shared by every
  // explanation fitted to the same captures:
  //   -cost / 2 + ln det(cov_x) / 2 - sum_i ln w_i
  double log_evidence = 0.0;
  std::vector<CyclePrediction> cycles;  // per capture, at the minimum
};

// The as-designed priors of the unknowns.
std::vector<Prior> design_priors(std::span<const FitParameter> params);

// z_start: scaled starting point (empty: the design's values).
CircuitFitResult fit_circuit(const CircuitProblem& problem, const FitSpec& spec,
                             std::span<const double> z_start = {});

// The circuit of capture k at x, with a fault path and any known added resistor.
Circuit circuit_at(const CircuitProblem& problem, std::size_t k, std::span<const double> x,
                   FaultPath fault, double fault_S);

}  // namespace benchtau
