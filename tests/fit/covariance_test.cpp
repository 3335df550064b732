// benchtau: the fits' standard errors against an independent inverse of J'J, and the cases
// the data cannot identify.
// Ceres's headers bring glog, whose CHECK would replace Catch's: they come first.
#include <Eigen/Dense>

#include "fit/exponential_segment.h"
#include "fit_test_support.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <random>
#include <vector>

using namespace benchtau;
using namespace benchtau::test;

namespace {

// One segment's samples exactly as the fit took them.
struct Taken {
  std::vector<double> x_s, y_V;
};

Taken taken(const TimeBase& time, std::span<const double> cap_V, const SegmentWindow& w) {
  Taken t;
  for (std::size_t i = w.first; i < w.end; ++i) {
    if (!std::isfinite(cap_V[i])) continue;
    t.x_s.push_back(time.at(i) - w.start_s);
    t.y_V.push_back(cap_V[i]);
  }
  return t;
}

// The Jacobian of the joint problem, dense, columns (ln tau, Vinf, A_0 .. A_n-1), from the
// analytic derivatives of each segment's cost at the given point.
Eigen::MatrixXd joint_jacobian(const std::vector<Taken>& segs, double log_tau, double vinf,
                               const std::vector<double>& amp, double sigma,
                               const ceres::LossFunction* loss) {
  std::size_t rows = 0;
  for (const Taken& t : segs) rows += t.x_s.size();
  Eigen::MatrixXd j = Eigen::MatrixXd::Zero(static_cast<Eigen::Index>(rows),
                                            static_cast<Eigen::Index>(2 + segs.size()));
  Eigen::Index row = 0;
  for (std::size_t k = 0; k < segs.size(); ++k) {
    const ExponentialSegmentCost cost(segs[k].x_s, segs[k].y_V, sigma, loss);
    const auto n = static_cast<Eigen::Index>(segs[k].x_s.size());
    Eigen::VectorXd r(n), du(n), dv(n), da(n);
    const double p0[] = {log_tau}, p1[] = {vinf}, p2[] = {amp[k]};
    const double* params[] = {p0, p1, p2};
    double* jac[] = {du.data(), dv.data(), da.data()};
    REQUIRE(cost.Evaluate(params, r.data(), jac));
    j.block(row, 0, n, 1) = du;
    j.block(row, 1, n, 1) = dv;
    j.block(row, 2 + static_cast<Eigen::Index>(k), n, 1) = da;
    row += n;
  }
  return j;
}

double rel(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

// Checks a joint fit's figures against the inverse of J'J formed here with Eigen.
void check_joint_against_eigen(const SynthRecord& rec, std::span<const double> cap_V,
                               const SegmentFitResult& r, const PhaseFit& p,
                               const ceres::LossFunction* loss) {
  REQUIRE(p.status == FitStatus::ok);
  std::vector<Taken> segs;
  for (std::size_t id : p.segments)
    segs.push_back(taken(rec.capture.time, cap_V, r.segments[id].window));
  const double log_tau = std::log(p.tau_s.value);
  const Eigen::MatrixXd j =
      joint_jacobian(segs, log_tau, p.vinf_V.value, p.amp_V, r.noise_sigma_V, loss);
  const Eigen::MatrixXd c =
      (j.transpose() * j).ldlt().solve(Eigen::MatrixXd::Identity(j.cols(), j.cols()));
  CHECK(rel(p.tau_s.sigma, p.tau_s.value * std::sqrt(c(0, 0))) < 1e-6);
  CHECK(rel(p.vinf_V.sigma, std::sqrt(c(1, 1))) < 1e-6);
  // The mean turnaround voltages: gradients over every parameter, amplitudes included.
  const auto n = static_cast<Eigen::Index>(p.segments.size());
  Eigen::VectorXd g_start = Eigen::VectorXd::Zero(2 + n), g_end = Eigen::VectorXd::Zero(2 + n);
  g_start(1) = g_end(1) = 1.0;
  for (Eigen::Index k = 0; k < n; ++k) {
    const double len_s = r.segments[p.segments[static_cast<std::size_t>(k)]].window.length_s();
    const double e = std::exp(-len_s / p.tau_s.value);
    g_start(2 + k) = 1.0 / static_cast<double>(n);
    g_end(2 + k) = e / static_cast<double>(n);
    g_end(0) +=
        p.amp_V[static_cast<std::size_t>(k)] * e * len_s / p.tau_s.value / static_cast<double>(n);
  }
  CHECK(rel(p.start_V.sigma, std::sqrt(g_start.dot(c * g_start))) < 1e-6);
  CHECK(rel(p.end_V.sigma, std::sqrt(g_end.dot(c * g_end))) < 1e-6);
}

}  // namespace

TEST_CASE("a segment's standard errors equal the inverse of J'J formed with Eigen") {
  Bench b;
  b.seed = 21;
  const SynthRecord rec = synth(b);
  SegmentFitOptions o;
  o.huber_sigmas = 0.0;  // plain least squares: the covariance is exactly (J'J)^-1
  o.joint = false;
  const SegmentFitResult r = fit(rec, o);
  REQUIRE(r.segments.size() >= 10);
  for (const SegmentFit& s : r.segments) {
    REQUIRE(s.status == FitStatus::ok);
    const Taken t = taken(rec.capture.time, cap(rec), s.window);
    std::vector<Taken> one = {t};
    const Eigen::MatrixXd j = joint_jacobian(one, std::log(s.tau_s.value), s.vinf_V.value,
                                             {s.amp_V.value}, r.noise_sigma_V, nullptr);
    const Eigen::Matrix3d c = (j.transpose() * j).inverse();
    CHECK(rel(s.tau_s.sigma, s.tau_s.value * std::sqrt(c(0, 0))) < 1e-6);
    CHECK(rel(s.vinf_V.sigma, std::sqrt(c(1, 1))) < 1e-6);
    CHECK(rel(s.amp_V.sigma, std::sqrt(c(2, 2))) < 1e-6);
    const Eigen::Vector3d g_start(0.0, 1.0, 1.0);
    CHECK(rel(s.start_V.sigma, std::sqrt(g_start.dot(c * g_start))) < 1e-6);
  }
}

TEST_CASE("a joint fit's standard errors equal the inverse of the whole J'J formed with Eigen") {
  Bench b;
  b.cycles = 6;
  b.seed = 22;
  const SynthRecord rec = synth(b);
  SECTION("plain least squares") {
    SegmentFitOptions o;
    o.huber_sigmas = 0.0;
    const SegmentFitResult r = fit(rec, o);
    check_joint_against_eigen(rec, cap(rec), r, r.charging, nullptr);
    check_joint_against_eigen(rec, cap(rec), r, r.discharging, nullptr);
  }
  SECTION("Huber loss, with glitches past its threshold: the robustified Jacobian") {
    std::vector<double> glitched(cap(rec).begin(), cap(rec).end());
    for (std::size_t i : {300, 301, 700}) glitched[i] += 0.8;
    const SegmentFitResult r = fit_segments(rec.capture.time, glitched, measured_edges(rec));
    const ceres::HuberLoss huber(SegmentFitOptions{}.huber_sigmas);
    check_joint_against_eigen(rec, glitched, r, r.charging, &huber);
    check_joint_against_eigen(rec, glitched, r, r.discharging, &huber);
  }
}

TEST_CASE("a segment far shorter than tau is reported not identifiable, with no numbers") {
  // 40 exact samples 10 us apart on a curve with tau = 1 s: over 0.4 ms it is a straight
  // line to 1 part in 10^4, and tau cannot be told from Vinf. The fit reaches the exact curve,
  // and there the Jacobian is numerically rank-deficient.
  const double tau_s = 1.0;
  const Manual m = alternating(40, 4, 1e-5, [&](bool charging, double x, std::size_t) {
    return charging ? 9.0 - 6.0 * std::exp(-x / tau_s) : 6.0 * std::exp(-x / tau_s);
  });
  SegmentFitOptions o;
  o.fixed_sigma_V = 1e-9;
  o.joint = false;
  const SegmentFitResult r = fit_segments(m.time, m.cap_V, m.edges, o);
  REQUIRE(r.segments.size() == 4);
  for (const SegmentFit& s : r.segments) {
    CHECK(s.status == FitStatus::not_identifiable);  // ceres::Covariance refused
    CHECK(std::isnan(s.tau_s.value));
    CHECK(std::isnan(s.tau_s.sigma));
    CHECK(std::isnan(s.vinf_V.value));
    CHECK(std::isnan(s.start_V.value));
  }
  // Independently: the Jacobian at the true curve has a condition number beyond 1e7, the
  // limit of Ceres's DENSE_SVD covariance (the square root of its default
  // min_reciprocal_condition_number, 1e-14, ceres/covariance.h).
  const Taken t = taken(m.time, m.cap_V, r.segments[0].window);
  const Eigen::MatrixXd j = joint_jacobian({t}, std::log(tau_s), 9.0, {-6.0}, 1e-9, nullptr);
  const Eigen::JacobiSVD<Eigen::MatrixXd> svd(j);
  const double condition = svd.singularValues()(0) / svd.singularValues()(2);
  INFO("condition number " << condition);
  CHECK(condition > 1e7);
}

TEST_CASE("a short segment through a fine converter leaves tau open, on its own and jointly") {
  // The same curves through a 16-bit converter (0.15 mV steps), no noise: over 0.4 ms each
  // rises 2.4 mV and bends by half a microvolt, far below the rounding.
  const double tau_s = 1.0, step_V = 10.0 / 65536.0;
  const Manual m = alternating(40, 6, 1e-5, [&](bool charging, double x, std::size_t) {
    const double v = charging ? 9.0 - 6.0 * std::exp(-x / tau_s) : 6.0 * std::exp(-x / tau_s);
    return std::round(v / step_V) * step_V;
  });
  const SegmentFitResult r = fit_segments(m.time, m.cap_V, m.edges);
  REQUIRE(r.segments.size() == 6);
  CHECK(r.step_V == Approx(step_V).epsilon(1e-9));
  for (const SegmentFit& s : r.segments) {
    INFO(status_name(s.status));
    CHECK((s.status == FitStatus::tau_undetermined || s.status == FitStatus::not_identifiable));
    CHECK(std::isnan(s.tau_s.value));
  }
  for (const PhaseFit* p : {&r.charging, &r.discharging}) {
    INFO(status_name(p->status));
    CHECK((p->status == FitStatus::tau_undetermined || p->status == FitStatus::not_identifiable));
    CHECK(std::isnan(p->tau_s.value));
    CHECK(std::isnan(p->vinf_V.sigma));
  }
}

TEST_CASE("a short noisy segment leaves tau undetermined rather than quoting a number") {
  // 37 samples over 0.37 ms of a 5.7 ms curve, 8-bit with 20 mV of noise: the curvature is
  // far below the noise.
  std::mt19937_64 rng(5);
  std::normal_distribution<double> noise(0.0, 0.02);
  const Manual m = alternating(40, 6, 1e-5, [&](bool charging, double x, std::size_t) {
    const double v =
        charging ? 9.0 - 6.0 * std::exp(-x / kChargeTau_s) : 6.0 * std::exp(-x / kDischargeTau_s);
    return std::round((v + noise(rng)) / 0.0390625) * 0.0390625;
  });
  const SegmentFitResult r = fit_segments(m.time, m.cap_V, m.edges);
  REQUIRE(r.segments.size() == 6);
  for (const SegmentFit& s : r.segments) {
    INFO(status_name(s.status));
    CHECK((s.status == FitStatus::tau_undetermined || s.status == FitStatus::no_convergence ||
           s.status == FitStatus::not_identifiable));
    CHECK(std::isnan(s.tau_s.value));
  }
  CHECK(r.charging.status != FitStatus::ok);
  CHECK(std::isnan(r.charging.tau_s.value));
}
