// benchtau: exponential fits of every charge and discharge segment of the capacitor node.
#pragma once

// What the caller provides: the capacitor node's samples (volts; NaN for missing, skipped),
// their time base, and the switching edges in time order (Measurement::edges). Each whole
// segment between two edges follows
//
//   V(t) = Vinf + A exp(-(t - t0) / tau),   t0 = the segment's start edge,
//
// and is fitted twice: on its own (tau, Vinf, A), and jointly with the other segments of its
// phase, sharing tau and Vinf while each keeps its own A (see exponential_segment.h for the
// residual and the parameter order). The loss is Huber on residuals in noise sigmas; sigma is
// estimated from the residuals unless fixed. Standard errors are the Laplace approximation at
// the minimum: ceres::Covariance of the parameters, carried to derived figures (tau from
// ln tau, the turnaround voltages) to first order; a phase's mean turnarounds combine its
// tau-and-Vinf covariance with each segment's own J'J (segment_solver.cpp says how, and the
// tests check it against a dense inverse). They count the samples' noise only: a
// turnaround voltage also moves with its edge's timing error (slope times that error).
// Results are plain values, in seconds and volts; an estimate that cannot be known is NaN
// with a status saying why, never a made-up number.
#include <cstddef>
#include <limits>
#include <optional>
#include <span>
#include <string_view>
#include <vector>

#include "fit/segment_windows.h"
#include "src/core/capture.h"
#include "src/core/edges.h"

namespace benchtau {

enum class FitStatus {
  ok,
  too_few_samples,   // fewer usable samples than SegmentFitOptions::min_samples (or no segment)
  flat,              // no change across the segment beyond the noise: tau has no meaning
  not_identifiable,  // ceres::Covariance found the Jacobian rank-deficient where the fit ended
  tau_undetermined,  // the covariance exists, but tau's relative error exceeds the limit
  no_convergence,    // the solver failed or ran out of iterations
};

std::string_view status_name(FitStatus status);

// A value with its 1-sigma standard error; both NaN when not known.
struct Estimate {
  double value = std::numeric_limits<double>::quiet_NaN();
  double sigma = std::numeric_limits<double>::quiet_NaN();
};

// One segment fitted on its own: one cycle's half, so drift over the record shows.
struct SegmentFit {
  SegmentWindow window;  // which samples were fitted
  FitStatus status = FitStatus::too_few_samples;
  Estimate tau_s;
  Estimate vinf_V;
  Estimate amp_V;    // V(t0) - Vinf
  Estimate start_V;  // the curve at the start edge (a turnaround voltage)
  Estimate end_V;    // the curve at the end edge (the next turnaround voltage)
  double rms_V = std::numeric_limits<double>::quiet_NaN();  // residual RMS
  int iterations = 0;
};

// All segments of one phase fitted together with shared tau and Vinf.
struct PhaseFit {
  Phase phase = Phase::charging;
  FitStatus status = FitStatus::too_few_samples;
  std::vector<std::size_t> segments;  // indices into SegmentFitResult::segments, as fitted
  std::vector<double> amp_V;          // each one's own amplitude in the joint fit
  Estimate tau_s;
  Estimate vinf_V;
  Estimate start_V;  // the curve at the segments' start edges, mean over the segments
  Estimate end_V;    // the curve at their end edges, mean over the segments
  // Covariance of ln(tau) and Vinf in the joint fit (the circuit fit needs both together).
  double cov_log_tau_vinf = std::numeric_limits<double>::quiet_NaN();
  double rms_V = std::numeric_limits<double>::quiet_NaN();
  std::size_t used = 0;  // samples in the joint fit
  int iterations = 0;
};

struct SegmentFitOptions {
  // Huber threshold in noise sigmas; 0 for plain least squares. 2 sigma leaves 95 % of
  // Gaussian samples on the quadratic part, so the fit loses little on clean data (about 1 %
  // of efficiency, from memory; 1.345 sigma is the usual 95 %-efficiency choice), and caps a
  // glitch's pull at 2 sigma instead of its full size.
  double huber_sigmas = 2.0;
  // Use this noise sigma instead of estimating it (one pass, no refit).
  std::optional<double> fixed_sigma_V;
  WindowRule window;
  // A segment needs this many usable samples: 3 parameters, and a few degrees of freedom
  // left for the noise and the covariance to mean anything.
  std::size_t min_samples = 6;
  // A segment whose first and last thirds differ by less than this many standard errors of
  // that difference is flat.
  double flat_sigmas = 5.0;
  // Above this relative standard error of tau, the likelihood in ln(tau) is far from
  // quadratic over the 1-sigma interval (and a weakly determined fit may sit in a spurious
  // minimum), so the interval stops meaning 68 %: tau is reported as undetermined.
  double max_relative_tau_error = 0.2;
  int threads = 2;
  bool joint = true;  // also fit each phase jointly
};

struct SegmentFitResult {
  std::vector<SegmentFit> segments;  // in time order
  PhaseFit charging;
  PhaseFit discharging;
  double noise_sigma_V = 0.0;  // the sigma of the final pass
  double step_V = 0.0;         // the quantisation step found in the data (0: none)
  double sigma_floor_V = 0.0;  // step / sqrt(12), or a tiny fraction of the span without a step
  double rms_V = std::numeric_limits<double>::quiet_NaN();  // residual RMS, per-segment fits
  // Where every sample went; the five add up to cap_V.size().
  std::size_t used = 0;      // fitted (in segments that were fitted at all)
  std::size_t unfitted = 0;  // in segments left unfitted: too few samples, or flat
  std::size_t excluded = 0;  // skipped next to edges (WindowRule)
  std::size_t missing = 0;   // NaN within the segments' windows
  std::size_t outside = 0;   // outside every whole segment
};

// Throws std::invalid_argument when the time base does not match the values, or an option is
// out of range.
SegmentFitResult fit_segments(const TimeBase& time, std::span<const double> cap_V,
                              std::span<const Edge> edges, const SegmentFitOptions& options = {});

}  // namespace benchtau
