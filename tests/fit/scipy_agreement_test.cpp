// benchtau: the segment fits against SciPy's least_squares on the very same samples.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <map>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

#include "fit_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

// The reference: scipy.optimize.least_squares (Debian's python3-scipy, an independent
// fitter), run by tests/fit/scipy_segment_fit.py on a file of samples written here.
struct Reference {
  std::map<std::string, double> values;
  std::vector<double> amp_V;
  int exit_code = -1;
};

Reference run_scipy(const std::string& file) {
  const std::string cmd = std::string("/usr/bin/python3 ") + BENCHTAU_SOURCE_DIR +
                          "/tests/fit/scipy_segment_fit.py " + file + " 2>&1";
  Reference ref;
  std::string out;
  {
    const std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(cmd.c_str(), "r"), pclose);
    REQUIRE(pipe);
    char buf[4096];
    while (std::fgets(buf, sizeof buf, pipe.get())) out += buf;
  }
  INFO(out);
  std::istringstream lines(out);
  std::string name;
  double value = 0.0;
  while (lines >> name >> value) {
    if (name == "amp_V")
      ref.amp_V.push_back(value);
    else
      ref.values[name] = value;
  }
  REQUIRE(ref.values.count("tau_s") == 1);
  REQUIRE(ref.values.count("vinf_V") == 1);
  CHECK(ref.values["status"] > 0);  // SciPy's own convergence flag
  return ref;
}

// Writes the samples of the given segments, exactly as the fit used them.
void write_samples(const std::string& file, const SynthRecord& rec, std::span<const double> cap_V,
                   const SegmentFitResult& r, const std::vector<std::size_t>& ids, double sigma_V,
                   double huber) {
  std::ofstream f(file);
  f.precision(17);
  f << "# benchtau segment samples: segment, seconds since its start edge, volts\n";
  f << "sigma_V " << sigma_V << "\nhuber " << huber << "\n";
  for (std::size_t k = 0; k < ids.size(); ++k) {
    const SegmentWindow& w = r.segments[ids[k]].window;
    for (std::size_t i = w.first; i < w.end; ++i)
      if (std::isfinite(cap_V[i]))
        f << k << ' ' << rec.capture.time.at(i) - w.start_s << ' ' << cap_V[i] << '\n';
  }
}

double relative(double a, double b) { return std::fabs(a - b) / std::fabs(b); }

// A noisy 8-bit capture with glitches pasted into the capacitor node after the edges were
// found, so that the Huber loss is doing real work in both fitters. SciPy's loss='huber' with
// f_scale = a is Ceres's HuberLoss(a) on residuals in sigmas (both documented forms are
// quoted in scipy_segment_fit.py), so the two minimise the same function.
struct Glitched {
  SynthRecord rec;
  std::vector<Edge> edges;
  std::vector<double> cap_V;
};

Glitched glitched() {
  Bench b;
  b.cycles = 5;
  b.seed = 11;
  Glitched g{synth(b), {}, {}};
  g.edges = measured_edges(g.rec);
  g.cap_V = g.rec.capture.channels[1].values;
  for (std::size_t i : {200, 201, 202, 650, 651, 1100})  // well inside segments
    g.cap_V[i] += (i % 2 ? -1.0 : 1.5);
  return g;
}

}  // namespace

TEST_CASE("one segment: Ceres and SciPy agree to 1e-6 on tau and Vinf (Huber loss)") {
  const Glitched g = glitched();
  SegmentFitOptions o;
  o.fixed_sigma_V = 0.02;  // fixed, so that both solve exactly the same problem
  o.joint = false;
  const SegmentFitResult r = fit_segments(g.rec.capture.time, g.cap_V, g.edges, o);
  // The charging segment that holds the three-sample glitch.
  std::size_t k = r.segments.size();
  for (std::size_t j = 0; j < r.segments.size(); ++j)
    if (r.segments[j].window.first <= 200 && 202 < r.segments[j].window.end) k = j;
  REQUIRE(k < r.segments.size());
  const SegmentFit& s = r.segments[k];
  REQUIRE(s.status == FitStatus::ok);

  const std::string file = scratch_path("scipy_one_segment.txt");
  write_samples(file, g.rec, g.cap_V, r, {k}, 0.02, o.huber_sigmas);
  Reference ref = run_scipy(file);
  const double tau_rel = relative(s.tau_s.value, ref.values["tau_s"]);
  const double vinf_rel = relative(s.vinf_V.value, ref.values["vinf_V"]);
  INFO("tau: ours " << s.tau_s.value << " s, SciPy " << ref.values["tau_s"] << " s, relative "
                    << tau_rel);
  INFO("Vinf: ours " << s.vinf_V.value << " V, SciPy " << ref.values["vinf_V"] << " V, relative "
                     << vinf_rel);
  CHECK(tau_rel < 1e-6);
  CHECK(vinf_rel < 1e-6);
  REQUIRE(ref.amp_V.size() == 1);
  CHECK(relative(s.amp_V.value, ref.amp_V[0]) < 1e-6);
}

TEST_CASE("a joint fit of several segments: Ceres and SciPy agree to 1e-6 (Huber loss)") {
  const Glitched g = glitched();
  SegmentFitOptions o;
  o.fixed_sigma_V = 0.02;
  const SegmentFitResult r = fit_segments(g.rec.capture.time, g.cap_V, g.edges, o);
  for (const PhaseFit* p : {&r.charging, &r.discharging}) {
    REQUIRE(p->status == FitStatus::ok);
    REQUIRE(p->segments.size() >= 4);
    const std::string file = scratch_path(
        p->phase == Phase::charging ? "scipy_joint_charge.txt" : "scipy_joint_discharge.txt");
    write_samples(file, g.rec, g.cap_V, r, p->segments, 0.02, o.huber_sigmas);
    Reference ref = run_scipy(file);
    const double tau_rel = relative(p->tau_s.value, ref.values["tau_s"]);
    const double vinf_rel = std::fabs(p->vinf_V.value - ref.values["vinf_V"]) /
                            std::max(1.0, std::fabs(ref.values["vinf_V"]));  // Vinf near 0 V
    INFO((p->phase == Phase::charging ? "charging" : "discharging")
         << ": tau relative " << tau_rel << " (ours " << p->tau_s.value << " s, SciPy "
         << ref.values["tau_s"] << " s)");
    INFO("Vinf relative to max(1 V, |Vinf|) " << vinf_rel << " (ours " << p->vinf_V.value
                                              << " V, SciPy " << ref.values["vinf_V"] << " V)");
    CHECK(tau_rel < 1e-6);
    CHECK(vinf_rel < 1e-6);
    REQUIRE(ref.amp_V.size() == p->amp_V.size());
    for (std::size_t k = 0; k < ref.amp_V.size(); ++k)
      CHECK(std::fabs(p->amp_V[k] - ref.amp_V[k]) < 1e-6 * std::fabs(ref.amp_V[k]));
  }
}
