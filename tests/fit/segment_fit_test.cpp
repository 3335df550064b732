// benchtau: the segment fits on synthetic captures: recovery, glitches, bad input, bookkeeping.
// Ceres's headers bring glog, whose CHECK macro would replace Catch's: include them first,
// so that catch.hpp's definition is the one left standing.
#include <ceres/loss_function.h>

#include <catch2/catch.hpp>

#include <cmath>
#include <random>
#include <stdexcept>
#include <vector>

#include "fit/segment_solver.h"
#include "fit/segment_windows.h"
#include "fit_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

double z(const Estimate& e, double truth) { return (e.value - truth) / e.sigma; }

std::size_t accounted(const SegmentFitResult& r) {
  return r.used + r.unfitted + r.excluded + r.missing + r.outside;
}

// The index of the n-th (from 0) segment of a phase.
std::size_t nth(const SegmentFitResult& r, Phase phase, int n) {
  for (std::size_t k = 0; k < r.segments.size(); ++k)
    if (r.segments[k].window.phase == phase && n-- == 0) return k;
  FAIL("no such segment");
  return 0;
}

}  // namespace

TEST_CASE("an 8-bit noisy capture gives back the textbook tau and Vinf of both phases") {
  // Truth from the two-resistor relations (fit_test_support.h): charging (R1 + R2) C = 5.7 ms
  // toward 9 V, discharging R2 C = 4.7 ms toward 0 V, turning at 3 V and 6 V.
  for (std::uint64_t seed : {31, 32, 33}) {
    Bench b;
    b.seed = seed;
    b.cycles = 20;
    const SynthRecord rec = synth(b);
    const SegmentFitResult r = fit(rec);
    INFO("seed " << seed);
    REQUIRE(r.charging.status == FitStatus::ok);
    REQUIRE(r.discharging.status == FitStatus::ok);
    CHECK(std::fabs(z(r.charging.tau_s, kChargeTau_s)) < 4.0);
    CHECK(std::fabs(z(r.charging.vinf_V, kSupply_V)) < 4.0);
    CHECK(std::fabs(z(r.discharging.tau_s, kDischargeTau_s)) < 4.0);
    CHECK(std::fabs(z(r.discharging.vinf_V, 0.0)) < 4.0);
    // And the errors are small enough for that to mean something: under 1 % on tau.
    CHECK(r.charging.tau_s.sigma < 0.01 * kChargeTau_s);
    CHECK(r.discharging.tau_s.sigma < 0.01 * kDischargeTau_s);
    CHECK(r.charging.segments.size() >= 19);
    // Each segment on its own, too (about 40 of them: all within 4 sigma).
    for (const SegmentFit& s : r.segments) {
      REQUIRE(s.status == FitStatus::ok);
      const bool charging = s.window.phase == Phase::charging;
      CHECK(std::fabs(z(s.tau_s, charging ? kChargeTau_s : kDischargeTau_s)) < 4.0);
      CHECK(std::fabs(z(s.vinf_V, charging ? kSupply_V : 0.0)) < 4.0);
    }
    // The turnarounds are the curve at the measured edges, so beyond the fit's own error they
    // carry the edge's timing error times the slope: allow half a sample's worth.
    const double dt_s = rec.capture.time.dt_s;
    const double up_slope = (kSupply_V - 3.0) / kChargeTau_s;  // V/s at the 3 V start
    const double top_slope = (kSupply_V - 6.0) / kChargeTau_s;
    const double down_slope = 6.0 / kDischargeTau_s;
    CHECK(std::fabs(r.charging.start_V.value - 3.0) <
          4 * r.charging.start_V.sigma + up_slope * dt_s / 2);
    CHECK(std::fabs(r.charging.end_V.value - 6.0) <
          4 * r.charging.end_V.sigma + top_slope * dt_s / 2);
    CHECK(std::fabs(r.discharging.start_V.value - 6.0) <
          4 * r.discharging.start_V.sigma + down_slope * dt_s / 2);
  }
}

TEST_CASE("the noise sigma is estimated from the residuals, with the rounding floor") {
  // 20 mV of Gaussian noise through 39.06 mV steps: the rounding adds step^2 / 12 of variance
  // (uniform error, a standard result that holds when the noise dithers the rounding, as
  // half a step does), so sigma = sqrt(0.02^2 + 0.039^2 / 12) = 22.96 mV.
  Bench b;
  b.seed = 41;
  b.cycles = 20;
  const SegmentFitResult r = fit(synth(b));
  const double step_V = 10.0 / 256.0;
  CHECK(r.step_V == Approx(step_V));
  CHECK(r.sigma_floor_V == Approx(step_V / std::sqrt(12.0)));
  CHECK(r.noise_sigma_V == Approx(std::sqrt(0.02 * 0.02 + step_V * step_V / 12.0)).epsilon(0.05));
  CHECK(r.rms_V == Approx(r.noise_sigma_V).epsilon(0.05));
  // Without noise the rounding alone is left. Its error is uniform over a step, whose MAD is
  // step / 4, so the MAD sigma reads 1.4826 / 4 = 0.371 steps: 28 % above the true
  // step / sqrt(12). It errs on the safe side (wider intervals), and the floor is never crossed.
  b.noise_V = 0.0;
  const SegmentFitResult q = fit(synth(b));
  CHECK(q.noise_sigma_V >= q.sigma_floor_V);
  CHECK(q.noise_sigma_V == Approx(1.4826 / 4.0 * step_V).epsilon(0.1));
}

TEST_CASE("a glitch in a segment: the Huber loss fits through it, plain least squares does not") {
  Bench b;
  b.seed = 3;
  const SynthRecord rec = synth(b);
  const std::vector<Edge> edges = measured_edges(rec);
  std::vector<double> v(cap(rec).begin(), cap(rec).end());
  const SegmentFitResult clean = fit_segments(rec.capture.time, v, edges);
  const std::size_t k = nth(clean, Phase::charging, 1);
  const SegmentWindow& w = clean.segments[k].window;
  const std::size_t mid = (w.first + w.end) / 2;
  for (std::size_t i = mid; i < mid + 3; ++i) v[i] += 1.5;  // three samples, 65 sigma up

  const SegmentFitResult robust = fit_segments(rec.capture.time, v, edges);
  SegmentFitOptions plain_options;
  plain_options.huber_sigmas = 0.0;
  const SegmentFitResult plain = fit_segments(rec.capture.time, v, edges, plain_options);
  const SegmentFit& c = clean.segments[k];
  const SegmentFit& h = robust.segments[k];
  const SegmentFit& p = plain.segments[k];
  INFO("tau: clean " << c.tau_s.value << " +- " << c.tau_s.sigma << ", Huber " << h.tau_s.value
                     << " +- " << h.tau_s.sigma << ", plain " << p.tau_s.value << " +- "
                     << p.tau_s.sigma);
  REQUIRE(h.status == FitStatus::ok);
  REQUIRE(p.status == FitStatus::ok);
  CHECK(std::fabs(z(h.tau_s, kChargeTau_s)) < 3.0);
  CHECK(std::fabs(h.tau_s.value - c.tau_s.value) < c.tau_s.sigma);
  CHECK(std::fabs(z(h.vinf_V, kSupply_V)) < 3.0);
  CHECK(std::fabs(z(p.tau_s, kChargeTau_s)) > 10.0);  // visibly biased
  CHECK(std::fabs(z(p.vinf_V, kSupply_V)) > 10.0);
  // The robust sigma does not notice three samples; the joint fits see the same contrast.
  CHECK(robust.noise_sigma_V == Approx(clean.noise_sigma_V).epsilon(0.01));
  CHECK(std::fabs(robust.charging.tau_s.value - clean.charging.tau_s.value) <
        0.5 * clean.charging.tau_s.sigma);
  CHECK(std::fabs(plain.charging.tau_s.value - clean.charging.tau_s.value) >
        3.0 * clean.charging.tau_s.sigma);
}

TEST_CASE("NaN samples are skipped and counted, and the fit stands") {
  Bench b;
  b.seed = 51;
  const SynthRecord rec = synth(b);
  const std::vector<Edge> edges = measured_edges(rec);
  std::vector<double> v(cap(rec).begin(), cap(rec).end());
  const SegmentFitResult clean = fit_segments(rec.capture.time, v, edges);
  for (std::size_t i = 0; i < v.size(); i += 17) v[i] = std::nan("");
  const SegmentFitResult r = fit_segments(rec.capture.time, v, edges);
  std::size_t nan_in_windows = 0;
  for (const SegmentFit& s : r.segments)
    for (std::size_t i = s.window.first; i < s.window.end; ++i) nan_in_windows += std::isnan(v[i]);
  CHECK(r.missing == nan_in_windows);
  CHECK(r.missing > 150);
  CHECK(r.used == clean.used - r.missing);
  CHECK(accounted(r) == v.size());
  REQUIRE(r.charging.status == FitStatus::ok);
  CHECK(std::fabs(r.charging.tau_s.value - clean.charging.tau_s.value) < r.charging.tau_s.sigma);
  CHECK(std::fabs(z(r.charging.tau_s, kChargeTau_s)) < 4.0);
  for (const SegmentFit& s : r.segments) CHECK(std::isfinite(s.tau_s.value));
}

TEST_CASE("fewer samples than parameters, a flat segment: a flag and no numbers") {
  SECTION("segments too short") {
    // 5 samples a segment: 2 skipped after the edge and 1 before the next leave 2.
    const Manual m = alternating(5, 6, 1e-5, [](bool charging, double x, std::size_t) {
      return charging ? 9.0 - 6.0 * std::exp(-x / 1e-4) : 6.0 * std::exp(-x / 1e-4);
    });
    const SegmentFitResult r = fit_segments(m.time, m.cap_V, m.edges);
    REQUIRE(r.segments.size() == 6);
    for (const SegmentFit& s : r.segments) {
      CHECK(s.window.used == 2);
      CHECK(s.status == FitStatus::too_few_samples);
      CHECK(std::isnan(s.tau_s.value));
      CHECK(std::isnan(s.rms_V));
    }
    CHECK(r.charging.status == FitStatus::too_few_samples);
    CHECK(r.charging.segments.empty());
    CHECK(std::isnan(r.charging.tau_s.value));
    CHECK(r.unfitted == 12);
    CHECK(r.used == 0);
    CHECK(accounted(r) == m.cap_V.size());
  }
  SECTION("a flat segment among good ones") {
    std::mt19937_64 rng(9);
    std::normal_distribution<double> noise(0.0, 0.01);
    const Manual m = alternating(150, 6, 2.5e-5, [&](bool charging, double x, std::size_t i) {
      const double v =
          charging ? 9.0 - 6.0 * std::exp(-x / kChargeTau_s) : 6.0 * std::exp(-x / kDischargeTau_s);
      return (i > 450 && i <= 600 ? 4.5 : v) + noise(rng);  // the fourth segment stuck
    });
    const SegmentFitResult r = fit_segments(m.time, m.cap_V, m.edges);
    REQUIRE(r.segments.size() == 6);
    CHECK(r.segments[3].status == FitStatus::flat);
    CHECK(std::isnan(r.segments[3].tau_s.value));
    CHECK(std::isnan(r.segments[3].vinf_V.value));
    for (std::size_t k : {0, 1, 2, 4, 5}) CHECK(r.segments[k].status == FitStatus::ok);
    CHECK(r.discharging.segments.size() == 2);  // the flat one is left out of the joint fit
    CHECK(r.discharging.status == FitStatus::ok);
    CHECK(r.unfitted == r.segments[3].window.used);
    CHECK(accounted(r) == m.cap_V.size());
  }
  SECTION("no edges at all") {
    const std::vector<double> v(1000, 4.2);
    TimeBase t;
    t.dt_s = 1e-5;
    const SegmentFitResult r = fit_segments(t, v, {});
    CHECK(r.segments.empty());
    CHECK(r.charging.status == FitStatus::too_few_samples);
    CHECK(r.discharging.status == FitStatus::too_few_samples);
    CHECK(r.outside == 1000);
    CHECK(std::isnan(r.rms_V));
  }
}

TEST_CASE("the samples next to each edge are left out by the stated rule") {
  // 150 samples a segment: max(2, ceil(0.02 * 150) = 3) after the start edge, 1 before the end.
  const Manual m = alternating(150, 4, 2.5e-5, [](bool charging, double x, std::size_t) {
    return charging ? 9.0 - 6.0 * std::exp(-x / kChargeTau_s)
                    : 6.0 * std::exp(-x / kDischargeTau_s);
  });
  const SegmentFitResult r = fit_segments(m.time, m.cap_V, m.edges);
  REQUIRE(r.segments.size() == 4);
  for (std::size_t k = 0; k < 4; ++k) {
    const SegmentWindow& w = r.segments[k].window;
    CHECK(w.first == m.edges[k].index + 3);
    CHECK(w.end == m.edges[k + 1].index - 1);
    CHECK(w.excluded == 4);
    CHECK(w.used == 146);
    CHECK(w.start_s == m.edges[k].t_s);
    CHECK(w.end_s == m.edges[k + 1].t_s);
  }
  CHECK(r.outside == 1);  // the sample before the first edge
  CHECK(accounted(r) == m.cap_V.size());
}

TEST_CASE("explicit sample times give the same fit as the uniform time base they spell out") {
  Bench b;
  b.seed = 61;
  b.cycles = 6;
  const SynthRecord rec = synth(b);
  const std::vector<Edge> edges = measured_edges(rec);
  TimeBase explicit_times = rec.capture.time;
  for (std::size_t i = 0; i < rec.capture.samples(); ++i)
    explicit_times.t_s.push_back(rec.capture.time.at(i));
  const SegmentFitResult u = fit_segments(rec.capture.time, cap(rec), edges);
  const SegmentFitResult e = fit_segments(explicit_times, cap(rec), edges);
  REQUIRE(e.charging.status == FitStatus::ok);
  // Each segment is solved on one thread: bit for bit the same. The joint fits sum over
  // segments on two threads in whatever order they finish, so only to rounding.
  REQUIRE(e.segments.size() == u.segments.size());
  for (std::size_t k = 0; k < e.segments.size(); ++k) {
    CHECK(e.segments[k].tau_s.value == u.segments[k].tau_s.value);
    CHECK(e.segments[k].end_V.sigma == u.segments[k].end_V.sigma);
  }
  CHECK(e.charging.tau_s.value == Approx(u.charging.tau_s.value).epsilon(1e-9));
  CHECK(e.discharging.vinf_V.sigma == Approx(u.discharging.vinf_V.sigma).epsilon(1e-9));
}

TEST_CASE("inconsistent input is refused with an exception, not fitted") {
  TimeBase t;
  t.dt_s = 1e-5;
  t.t_s = {0.0, 1e-5, 2e-5};  // explicit times for three samples, but four values
  const std::vector<double> v = {1.0, 2.0, 3.0, 4.0};
  CHECK_THROWS_AS(fit_segments(t, v, {}), std::invalid_argument);
  TimeBase zero;
  CHECK_THROWS_AS(fit_segments(zero, v, {}), std::invalid_argument);
  TimeBase ok;
  ok.dt_s = 1e-5;
  SegmentFitOptions o;
  o.fixed_sigma_V = -1.0;
  CHECK_THROWS_AS(fit_segments(ok, v, {}, o), std::invalid_argument);
  o = {};
  o.min_samples = 3;
  CHECK_THROWS_AS(fit_segments(ok, v, {}, o), std::invalid_argument);
  o = {};
  o.huber_sigmas = std::nan("");
  CHECK_THROWS_AS(fit_segments(ok, v, {}, o), std::invalid_argument);
}

TEST_CASE("a segment started from its phase's seed ends where its own guess leads") {
  // Over 256 segments, so most start from their phase's median of the first pass: each must
  // reach the same minimum as a fit of that segment alone from its own guess. The solver
  // stops within about 1e-6 of a standard error of it; 1e-4 leaves room for the path taken.
  Bench b;
  b.cycles = 200;
  const SynthRecord rec = synth(b);
  const SegmentFitResult r = fit(rec);
  REQUIRE(r.segments.size() > 300);
  const SegmentSamples s = segment_samples(rec.capture.time, cap(rec), measured_edges(rec), {});
  REQUIRE(s.windows.size() == r.segments.size());
  const ceres::HuberLoss huber(2.0);
  detail::SolveSettings st;
  st.sigma_V = r.noise_sigma_V;
  st.loss = &huber;
  st.huber_a = 2.0;
  std::size_t compared = 0;
  for (std::size_t k = 0; k < s.windows.size(); ++k) {
    const SegmentFit& seeded = r.segments[k];
    const detail::RawSegment alone =
        detail::solve_segment(s.x(s.windows[k]), s.y(s.windows[k]), st);
    CHECK(alone.status == seeded.status);
    if (seeded.status != FitStatus::ok || alone.status != FitStatus::ok) continue;
    ++compared;
    INFO("segment " << k);
    // In units of each value's own standard error.
    const double tau = std::exp(alone.params[0]);
    CHECK(std::fabs(seeded.tau_s.value - tau) < 1e-4 * seeded.tau_s.sigma);
    CHECK(std::fabs(seeded.vinf_V.value - alone.params[1]) < 1e-4 * seeded.vinf_V.sigma);
    CHECK(std::fabs(seeded.amp_V.value - alone.params[2]) < 1e-4 * seeded.amp_V.sigma);
  }
  CHECK(compared > 300);
}
