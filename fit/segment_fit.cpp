// benchtau: the segment fits: windows, noise scale, two passes, and the joint fits.
#include "fit/segment_fit.h"

#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <memory>
#include <optional>
#include <stdexcept>
#include <thread>
#include <vector>

#include <ceres/loss_function.h>
#include <Eigen/Dense>

#include "fit/exponential_segment.h"
#include "fit/noise_scale.h"
#include "fit/segment_solver.h"

namespace benchtau {
namespace {

using detail::RawSegment;
using detail::SolveSettings;

// Fits the windows listed on their own, each from its previous fit when that converged.
// Segments are independent problems, so they are dealt round-robin to the threads (each slot
// of raws is written by one thread only).
// A segment not fitted before starts from its phase's seed when there is one.
struct PhaseSeed {
  double log_tau = 0.0, vinf_V = 0.0;
};
using PhaseSeeds = std::array<std::optional<PhaseSeed>, 2>;  // charging, discharging

void fit_each(const SegmentSamples& s, std::span<const std::size_t> which, const SolveSettings& st,
              std::vector<RawSegment>& raws, int threads, const PhaseSeeds& seeds = {}) {
  const std::size_t n = which.size();
  // A handful of segments is not worth a thread.
  const std::size_t step = n < 8 ? 1 : static_cast<std::size_t>(std::max(1, threads));
  auto work = [&](std::size_t from) {
    for (std::size_t j = from; j < n; j += step) {
      const std::size_t k = which[j];
      const SegmentWindow& w = s.windows[k];
      std::array<double, 3> start = raws[k].params;
      bool have_start = raws[k].converged;
      const auto& seed = seeds[w.phase == Phase::charging ? 0 : 1];
      const auto x = s.x(w), y = s.y(w);
      if (!have_start && seed && !x.empty()) {
        // The amplitude by least squares over the first few samples, tau and Vinf held: one
        // sample's noise alone would leave the start a hundred or so in chi-square off, and
        // cost the solver a pass or two. Weighted by the curve, so a segment only a few
        // samples per tau long leans on its first samples, not on its amplified tail.
        const double inv_tau = std::exp(-seed->log_tau);
        const std::size_t m = std::min<std::size_t>(x.size(), 16);
        double ye = 0.0, ee = 0.0;
        for (std::size_t i = 0; i < m; ++i) {
          const double e = std::exp(-x[i] * inv_tau);
          ye += (y[i] - seed->vinf_V) * e;
          ee += e * e;
        }
        start = {seed->log_tau, seed->vinf_V, ye / ee};
        have_start = std::isfinite(start[2]);
      }
      raws[k] = detail::solve_segment(x, y, st, have_start ? &start : nullptr);
    }
  };
  if (step == 1) {
    work(0);
    return;
  }
  std::vector<std::exception_ptr> errors(step);
  {
    std::vector<std::jthread> pool;
    for (std::size_t t = 1; t < step; ++t) {
      pool.emplace_back([&, t] {
        try {
          work(t);
        } catch (...) {
          errors[t] = std::current_exception();
        }
      });
    }
    try {
      work(0);
    } catch (...) {
      errors[0] = std::current_exception();
    }
  }  // joins
  for (const std::exception_ptr& e : errors)
    if (e) std::rethrow_exception(e);
}

// Up to m window indices spread evenly over the record.
std::vector<std::size_t> spread(std::size_t n, std::size_t m) {
  std::vector<std::size_t> ids;
  const std::size_t take = std::min(n, m);
  for (std::size_t j = 0; j < take; ++j) ids.push_back(j * n / take);
  return ids;
}

// The noise sigma from the first pass's residuals: a MAD (robust to glitches), scaled up for
// the 3 parameters each segment's fit spent (the residuals of a fit are smaller than the
// noise by sqrt((n - p) / n)).
double residual_sigma_V(const SegmentSamples& s, const std::vector<RawSegment>& raws) {
  std::size_t fitted = 0;
  for (std::size_t k = 0; k < raws.size(); ++k)
    if (raws[k].converged) fitted += s.windows[k].used;
  std::vector<double> r;
  r.reserve(fitted);
  std::size_t params = 0;
  for (std::size_t k = 0; k < raws.size(); ++k) {
    if (!raws[k].converged) continue;
    const auto& [log_tau, vinf, amp] = raws[k].params;
    const SegmentWindow& w = s.windows[k];
    const auto x = s.x(w), y = s.y(w);
    for (std::size_t i = 0; i < x.size(); ++i)
      r.push_back(segment_curve_V(log_tau, vinf, amp, x[i]) - y[i]);
    params += 3;
  }
  if (r.size() <= params) return 0.0;
  const double dof = static_cast<double>(r.size()) / static_cast<double>(r.size() - params);
  return mad_sigma(r) * std::sqrt(dof);
}

double median(std::vector<double> v) {
  if (v.empty()) return std::nan("");
  const auto mid = v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2);
  std::nth_element(v.begin(), mid, v.end());
  return *mid;
}

// Each phase's median (ln tau, Vinf) over the segments of the first pass that converged: a
// start for the rest within the spread of tau and Vinf over the record, so that none needs a
// guess of its own (two passes over its samples). None for a phase with under 8 such segments.
PhaseSeeds phase_seeds(const SegmentSamples& s, const std::vector<RawSegment>& raws) {
  PhaseSeeds seeds;
  for (const Phase phase : {Phase::charging, Phase::discharging}) {
    std::vector<double> log_taus, vinfs;
    for (std::size_t k = 0; k < raws.size(); ++k) {
      if (!raws[k].converged || s.windows[k].phase != phase) continue;
      log_taus.push_back(raws[k].params[0]);
      vinfs.push_back(raws[k].params[1]);
    }
    if (log_taus.size() < 8) continue;
    seeds[phase == Phase::charging ? 0 : 1] = PhaseSeed{median(log_taus), median(vinfs)};
  }
  return seeds;
}

// For the closed-form joint solver, a start within second order of its minimum (so that it
// needs two or three passes over the samples rather than six): the segments fitted well on
// their own, combined by what each says about (ln tau, Vinf) (the inverse of its 2 x 2
// marginal covariance, the usual inverse-variance weighting), and each one's amplitude moved
// to that point along its regression on (ln tau, Vinf) in its own covariance. Null when no
// segment was fitted well.
std::unique_ptr<detail::PhaseStart> closed_start(const std::vector<RawSegment>& raws,
                                                 std::span<const std::size_t> ids) {
  Eigen::Matrix2d info = Eigen::Matrix2d::Zero();
  Eigen::Vector2d weighted = Eigen::Vector2d::Zero();
  std::size_t ok = 0;
  for (std::size_t k : ids) {
    const RawSegment& raw = raws[k];
    if (raw.status != FitStatus::ok) continue;
    const Eigen::Matrix2d w = raw.covariance.topLeftCorner<2, 2>().inverse();
    if (!w.allFinite()) continue;
    info += w;
    weighted += w * Eigen::Vector2d(raw.params[0], raw.params[1]);
    ++ok;
  }
  if (ok == 0) return nullptr;
  const Eigen::Vector2d theta = info.ldlt().solve(weighted);
  if (!theta.allFinite()) return nullptr;
  auto start = std::make_unique<detail::PhaseStart>();
  start->log_tau = theta(0);
  start->vinf_V = theta(1);
  start->amp_V.assign(ids.size(), std::nan(""));
  for (std::size_t j = 0; j < ids.size(); ++j) {
    const RawSegment& raw = raws[ids[j]];
    if (raw.status != FitStatus::ok) continue;
    const Eigen::Matrix3d& c = raw.covariance;
    const Eigen::Vector2d d = theta - Eigen::Vector2d(raw.params[0], raw.params[1]);
    const Eigen::RowVector2d slope =
        c.block<1, 2>(2, 0) * c.topLeftCorner<2, 2>().inverse();  // E[A | theta]
    start->amp_V[j] = raw.params[2] + slope.dot(d);
  }
  return start;
}

PhaseFit fit_phase(Phase phase, const SegmentSamples& s, const std::vector<RawSegment>& raws,
                   const SolveSettings& st) {
  // Every segment with enough samples that is not flat takes part, identifiable on its own or
  // not: a short segment still says something about a shared tau. The start is the median of
  // the segments fitted well on their own, or failing that of wherever the others ended.
  std::vector<std::size_t> ids;
  std::vector<double> log_taus, vinfs, other_log_taus, other_vinfs;
  for (std::size_t k = 0; k < raws.size(); ++k) {
    const RawSegment& raw = raws[k];
    if (s.windows[k].phase != phase || raw.status == FitStatus::too_few_samples ||
        raw.status == FitStatus::flat)
      continue;
    ids.push_back(k);
    if (!std::isfinite(raw.params[0]) || !std::isfinite(raw.params[1])) continue;
    (raw.status == FitStatus::ok ? log_taus : other_log_taus).push_back(raw.params[0]);
    (raw.status == FitStatus::ok ? vinfs : other_vinfs).push_back(raw.params[1]);
  }
  if (log_taus.empty()) {
    log_taus = std::move(other_log_taus);
    vinfs = std::move(other_vinfs);
  }
  return detail::solve_phase(phase, s, ids, median(log_taus), median(vinfs), st,
                             closed_start(raws, ids).get());
}

void check(const SegmentFitOptions& o) {
  if (!(o.huber_sigmas >= 0.0) || !std::isfinite(o.huber_sigmas))
    throw std::invalid_argument("fit_segments: huber_sigmas must be 0 or more");
  if (o.fixed_sigma_V && !(*o.fixed_sigma_V > 0.0 && std::isfinite(*o.fixed_sigma_V)))
    throw std::invalid_argument("fit_segments: a fixed sigma must be positive");
  if (o.min_samples < 4)
    throw std::invalid_argument("fit_segments: min_samples must be at least 4 (3 parameters)");
  if (o.threads < 1) throw std::invalid_argument("fit_segments: threads must be at least 1");
}

}  // namespace

std::string_view status_name(FitStatus status) {
  switch (status) {
    case FitStatus::ok:
      return "ok";
    case FitStatus::too_few_samples:
      return "too_few_samples";
    case FitStatus::flat:
      return "flat";
    case FitStatus::not_identifiable:
      return "not_identifiable";
    case FitStatus::tau_undetermined:
      return "tau_undetermined";
    case FitStatus::no_convergence:
      return "no_convergence";
  }
  return "unknown";
}

SegmentFitResult fit_segments(const TimeBase& time, std::span<const double> cap_V,
                              std::span<const Edge> edges, const SegmentFitOptions& o) {
  check(o);
  const SegmentSamples s = segment_samples(time, cap_V, edges, o.window);
  SegmentFitResult r;
  r.outside = s.outside;

  // The noise floor: an ADC's rounding alone is uniform over one step, sigma step/sqrt(12).
  // Without a step (unquantised data), a tiny fraction of the span keeps sigma finite.
  r.step_V = quantisation_step_V(cap_V);
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (double v : cap_V)
    if (std::isfinite(v)) lo = std::min(lo, v), hi = std::max(hi, v);
  const double span_V = hi > lo ? hi - lo : 1.0;
  r.sigma_floor_V = std::max(r.step_V / std::sqrt(12.0), 1e-9 * span_V);

  SolveSettings st;
  st.min_samples = o.min_samples;
  st.flat_sigmas = o.flat_sigmas;
  st.max_relative_tau_error = o.max_relative_tau_error;
  st.threads = o.threads;
  // Residuals are in sigmas, so Huber's threshold a is in sigmas too.
  const ceres::HuberLoss huber(o.huber_sigmas > 0.0 ? o.huber_sigmas : 1.0);
  st.loss = o.huber_sigmas > 0.0 ? &huber : nullptr;
  st.huber_a = o.huber_sigmas;

  std::vector<RawSegment> raws(s.windows.size());
  const std::vector<std::size_t> all = spread(s.windows.size(), s.windows.size());
  if (o.fixed_sigma_V) {
    st.sigma_V = *o.fixed_sigma_V;
    fit_each(s, all, st, raws, o.threads);
  } else {
    // First pass on a sigma from the data alone, without covariances; then the MAD of its
    // residuals, and the real pass. The first pass needs residuals, not every segment: 256
    // segments spread over the record give tens of thousands, a MAD good to about 1 %.
    st.sigma_V = std::max(r.sigma_floor_V, second_difference_sigma_V(cap_V));
    st.covariance = false;
    fit_each(s, spread(s.windows.size(), 256), st, raws, o.threads);
    st.sigma_V = std::max(r.sigma_floor_V, residual_sigma_V(s, raws));
    st.covariance = true;
    fit_each(s, all, st, raws, o.threads, phase_seeds(s, raws));
  }
  r.noise_sigma_V = st.sigma_V;

  double ss = 0.0;
  std::size_t fitted = 0;
  r.segments.reserve(s.windows.size());
  for (std::size_t k = 0; k < s.windows.size(); ++k) {
    const SegmentWindow& w = s.windows[k];
    r.segments.push_back(detail::report_segment(w, raws[k]));
    r.excluded += w.excluded;
    r.missing += w.missing;
    const bool unfitted =
        raws[k].status == FitStatus::too_few_samples || raws[k].status == FitStatus::flat;
    (unfitted ? r.unfitted : r.used) += w.used;
    if (raws[k].converged) {
      ss += raws[k].rms_V * raws[k].rms_V * static_cast<double>(w.used);
      fitted += w.used;
    }
  }
  if (fitted > 0) r.rms_V = std::sqrt(ss / static_cast<double>(fitted));

  r.charging.phase = Phase::charging;
  r.discharging.phase = Phase::discharging;
  if (o.joint && o.threads > 1) {
    // The two phases are independent problems: one a thread.
    std::exception_ptr error;
    {
      std::jthread other([&] {
        try {
          r.discharging = fit_phase(Phase::discharging, s, raws, st);
        } catch (...) {
          error = std::current_exception();
        }
      });
      r.charging = fit_phase(Phase::charging, s, raws, st);
    }  // joins
    if (error) std::rethrow_exception(error);
  } else if (o.joint) {
    r.charging = fit_phase(Phase::charging, s, raws, st);
    r.discharging = fit_phase(Phase::discharging, s, raws, st);
  }
  return r;
}

}  // namespace benchtau
