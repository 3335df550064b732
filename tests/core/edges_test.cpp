// benchtau: edges and cycles from analytic astable waveforms with known edges.
//
// The reference is the textbook two-resistor astable: with the control pin at
// two thirds of the supply, t_high = ln 2 (R1 + R2) C and t_low = ln 2 R2 C
// (P. Horowitz and W. Hill, The Art of Electronics, 3rd ed., 2015, section on
// the 555 timer; from memory). The waveforms are exact exponentials sampled at
// 200 samples per period and quantised to 8 bits over 0..10 V.
#include <catch2/catch.hpp>

#include <cmath>

#include "src/core/measure.h"
#include "src/core/synth.h"

using namespace benchtau;

namespace {

struct Case {
  double r1_ohm, r2_ohm, c_F;
};

double textbook_high_s(const Case& c) { return std::log(2.0) * (c.r1_ohm + c.r2_ohm) * c.c_F; }
double textbook_low_s(const Case& c) { return std::log(2.0) * c.r2_ohm * c.c_F; }

SynthRecord sampled(const Case& c, double samples_per_period, double cycles, int bits,
                    double noise_V, double phase_fraction, bool with_ctl = true) {
  const double period = textbook_high_s(c) + textbook_low_s(c);
  SynthOptions o;
  o.rate_Hz = samples_per_period / period;
  o.duration_s = cycles * period;
  o.bits = bits;
  o.full_scale_V = 10.0;
  o.noise_V = noise_V;
  o.phase_s = phase_fraction * period;
  o.with_ctl = with_ctl;
  return synth_astable(two_resistor_astable(9.0, c.r1_ohm, c.r2_ohm, c.c_F), o);
}

NodeMap both_nodes() {
  NodeMap m;
  m.out = 0;
  m.cap = 1;
  return m;
}

// About 200 samples per period, but not a whole number: a real instrument's
// clock is not locked to the timer, so the sampling phase walks from cycle to
// cycle. (At exactly 200 every cycle would be sampled identically and the
// half-sample uncertainty of an ideal step would never average out.)
constexpr double kSamplesPerPeriod = 200.37;

}  // namespace

TEST_CASE("analytic astable: mean period and duty within 0.1 % from the output pin alone") {
  // Duties from about 52 % to 91 %.
  const Case cases[] = {{1e3, 47e3, 100e-9}, {10e3, 10e3, 1e-6}, {47e3, 4.7e3, 10e-9}};
  for (const Case& c : cases) {
    const SynthRecord rec = sampled(c, kSamplesPerPeriod, 40.3, 8, 0.0, 0.37);
    NodeMap m;
    m.out = 0;
    const Measurement r = measure(rec.capture, m);
    const double period = textbook_high_s(c) + textbook_low_s(c);
    const double duty = textbook_high_s(c) / period;
    INFO("R1 " << c.r1_ohm << " R2 " << c.r2_ohm << " C " << c.c_F);
    REQUIRE(r.summary.cycles >= 38);
    CHECK(r.summary.period_s.mean == Approx(period).epsilon(1e-3));
    CHECK(r.summary.duty.mean == Approx(duty).epsilon(1e-3));
    CHECK(r.summary.high_s.mean == Approx(textbook_high_s(c)).epsilon(1e-3));
    CHECK(r.summary.low_s.mean == Approx(textbook_low_s(c)).epsilon(1e-3));
  }
}

TEST_CASE("analytic astable: per cycle, within one sample with 8 bits, far better without") {
  // One sample in 200 is 0.5 % of a period: the most an edge can be off when
  // it is timed from the samples either side of it.
  const Case cases[] = {{1e3, 47e3, 100e-9}, {10e3, 10e3, 1e-6}, {47e3, 4.7e3, 10e-9}};
  for (const Case& c : cases) {
    const double period = textbook_high_s(c) + textbook_low_s(c);
    const double duty = textbook_high_s(c) / period;
    INFO("R1 " << c.r1_ohm << " R2 " << c.r2_ohm << " C " << c.c_F);
    for (bool cap_only : {false, true}) {
      Capture capture = sampled(c, kSamplesPerPeriod, 20.6, 8, 0.0, 0.61, false).capture;
      NodeMap m = both_nodes();
      if (cap_only) {
        capture.channels.erase(capture.channels.begin());
        m.out.reset();
        m.cap = 0;
      }
      const Measurement r = measure(capture, m);
      CHECK(r.edge_node == (cap_only ? "cap" : "out"));
      REQUIRE(r.cycles.size() >= 19);
      CHECK(r.summary.period_s.mean == Approx(period).epsilon(1e-3));
      CHECK(r.summary.duty.mean == Approx(duty).epsilon(1e-3));
      for (const Cycle& cy : r.cycles) {
        CHECK(cy.period_s == Approx(period).epsilon(5e-3));
        CHECK(cy.duty * period == Approx(duty * period).margin(period / kSamplesPerPeriod));
      }
    }
  }
}

TEST_CASE("the capacitor node times edges to a small fraction of a sample when unquantised") {
  const Case c{1e3, 47e3, 100e-9};
  const SynthRecord rec = sampled(c, kSamplesPerPeriod, 10.2, 0, 0.0, 0.4, false);
  const TimeBase& time = rec.capture.time;
  EdgeScan scan = output_edges(time, rec.capture.channels[0].values);
  refine_with_cap(time, rec.capture.channels[1].values, scan.edges);
  REQUIRE(scan.edges.size() == rec.edges.size());
  for (std::size_t k = 0; k < scan.edges.size(); ++k)
    CHECK(std::fabs(scan.edges[k].t_s - rec.edges[k].t_s) < 0.02 * time.dt_s);
  // A turnaround in the last few samples of the record cannot be told from
  // the record's end, so the sawtooth may show one edge fewer.
  const EdgeScan saw = sawtooth_edges(time, rec.capture.channels[1].values);
  REQUIRE(saw.edges.size() + 1 >= rec.edges.size());
  REQUIRE(saw.edges.size() <= rec.edges.size());
  for (std::size_t k = 0; k < saw.edges.size(); ++k) {
    CHECK(saw.edges[k].kind == rec.edges[k].kind);
    CHECK(std::fabs(saw.edges[k].t_s - rec.edges[k].t_s) < 0.02 * time.dt_s);
  }
}

TEST_CASE("analytic astable: turnaround voltages at two thirds and one third of the supply") {
  // Three equal divider resistors put the control pin at 2/3 of the supply and
  // the lower threshold at half that (common practice).
  const Case c{10e3, 47e3, 100e-9};
  const SynthRecord rec = sampled(c, kSamplesPerPeriod, 20.6, 8, 0.02, 0.5);
  const Measurement r = measure(rec.capture, both_nodes());
  const double lsb = 10.0 / 256.0;
  CHECK(r.summary.cap_max_V.mean == Approx(6.0).margin(lsb / 2));
  CHECK(r.summary.cap_min_V.mean == Approx(3.0).margin(lsb / 2));
  // Robust per cycle too: each within one code of the threshold.
  for (const Cycle& cy : r.cycles) {
    CHECK(cy.cap_max_V == Approx(6.0).margin(lsb));
    CHECK(cy.cap_min_V == Approx(3.0).margin(lsb));
  }
}

TEST_CASE("edge times land where the analytic switching happens") {
  const Case c{4.7e3, 22e3, 47e-9};
  const SynthRecord rec = sampled(c, kSamplesPerPeriod, 8.5, 8, 0.0, 0.3);
  const EdgeScan scan = output_edges(rec.capture.time, rec.capture.channels[0].values);
  REQUIRE(scan.edges.size() == rec.edges.size());
  for (std::size_t k = 0; k < scan.edges.size(); ++k) {
    CHECK(scan.edges[k].kind == rec.edges[k].kind);
    // Without the capacitor node, an ideal step is known only to within half a sample.
    CHECK(std::fabs(scan.edges[k].t_s - rec.edges[k].t_s) <= 0.5 * rec.capture.time.dt_s + 1e-12);
  }
}

TEST_CASE("a glitch inside a segment is removed, and the cycles stay as they were") {
  const Case c{10e3, 10e3, 1e-6};
  SynthRecord rec = sampled(c, kSamplesPerPeriod, 6.4, 0, 0.0, 0.1);
  NodeMap m;
  m.out = 0;
  const Measurement clean = measure(rec.capture, m);
  auto& out = rec.capture.channels[0].values;
  // Three low samples in the middle of a high phase.
  const std::size_t at = rec.edges[1].index + 40;
  REQUIRE(rec.edges[1].kind == EdgeKind::rising);
  for (std::size_t i = at; i < at + 3; ++i) out[i] = 0.1;
  const Measurement r = measure(rec.capture, m);
  REQUIRE(clean.summary.cycles == 5);
  CHECK(r.summary.cycles == clean.summary.cycles);
  CHECK(r.summary.period_s.mean == Approx(clean.summary.period_s.mean).epsilon(1e-12));
  bool reported = false;
  for (const Finding& f : r.findings) reported = reported || f.code == "glitches_removed";
  CHECK(reported);
}
