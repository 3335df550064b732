// benchtau: the Ceres problems behind the segment fits: one segment, or one phase jointly.
#pragma once

// Internal to fit/: segment_fit.cpp decides which samples, which sigma and which loss; these
// functions build the problem, solve it and read the covariance. Parameters are in the order
// of exponential_segment.h: ln(tau_s), vinf_V, amp_V. The loss, if any, is applied per sample
// and is not owned; it must outlive the call.
#include <array>
#include <cstddef>
#include <span>
#include <vector>

#include <ceres/loss_function.h>
#include <Eigen/Core>

#include "fit/segment_fit.h"
#include "fit/segment_windows.h"

namespace benchtau::detail {

struct SolveSettings {
  double sigma_V = 1.0;
  const ceres::LossFunction* loss = nullptr;
  // The threshold a of loss when loss is ceres::HuberLoss(a) (0 with no loss): the fits then
  // run in closed form (segment_normal.h), with Ceres as the fallback for any fit that does not
  // end in a clean, well-conditioned minimum. A loss of another kind: set closed_form false.
  double huber_a = 0.0;
  bool closed_form = true;
  std::size_t min_samples = 6;
  double flat_sigmas = 5.0;
  double max_relative_tau_error = 0.2;
  int threads = 1;         // Ceres's own threads, for the joint problem
  bool covariance = true;  // false: skip it (a first pass); a converged fit then reads ok
};

// One segment's fit as the solver left it.
struct RawSegment {
  FitStatus status = FitStatus::too_few_samples;
  bool converged = false;          // params hold a minimum (even when not identifiable)
  std::array<double, 3> params{};  // ln(tau_s), vinf_V, amp_V
  Eigen::Matrix3d covariance = Eigen::Matrix3d::Constant(0.0);  // valid for ok, tau_undetermined
  double rms_V = 0.0;
  int iterations = 0;
};

// A starting point from the data alone: tau from the means of the segment's three thirds
// (for an exponential, successive differences of equal, equally spaced window means shrink
// by exp(-h / tau) exactly), then Vinf and A by linear least squares at that tau.
std::array<double, 3> initial_guess(std::span<const double> x_s, std::span<const double> y_V);

// Fits one segment, from start if given (else from initial_guess).
RawSegment solve_segment(std::span<const double> x_s, std::span<const double> y_V,
                         const SolveSettings& settings,
                         const std::array<double, 3>* start = nullptr);

// The public figures of one segment's fit: tau, Vinf, A and the curve at both edges, with
// standard errors by the delta method from the 3 x 3 covariance.
SegmentFit report_segment(const SegmentWindow& window, const RawSegment& raw);

// A start for the closed-form joint solver, nearer its minimum than the medians: amp_V holds
// one amplitude per window fitted (NaN where none is known).
struct PhaseStart {
  double log_tau = 0.0;
  double vinf_V = 0.0;
  std::vector<double> amp_V;
};

// All the given windows of one phase at once, sharing ln(tau) and Vinf, from the given start
// (the closed-form solver from closed_start instead, when given). ids index samples.windows.
PhaseFit solve_phase(Phase phase, const SegmentSamples& samples, std::span<const std::size_t> ids,
                     double log_tau0, double vinf0_V, const SolveSettings& settings,
                     const PhaseStart* closed_start = nullptr);

}  // namespace benchtau::detail
