// benchtau: what the measurement reports about awkward captures.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <random>

#include "src/core/circuit.h"
#include "src/core/engineering.h"
#include "src/core/measure.h"
#include "src/core/simulate.h"
#include "src/core/synth.h"
#include "src/core/synth_pulses.h"

using namespace benchtau;

namespace {

// 10k / 47k / 100n on 9 V: high 3.95 ms, low 3.26 ms by the textbook relations.
AstableWave board() { return two_resistor_astable(9.0, 10e3, 47e3, 100e-9); }

SynthRecord record(double cycles, double samples_per_period, bool power_up = false,
                   double off_s = 0.0) {
  const AstableWave w = board();
  const double period = w.high_s() + w.low_s();
  SynthOptions o;
  o.rate_Hz = samples_per_period / period;
  o.duration_s = cycles * period;
  o.power_up = power_up;
  o.off_s = off_s;
  o.phase_s = 0.3 * period;
  o.bits = 10;
  return synth_astable(w, o);
}

NodeMap out_and_cap() {
  NodeMap m;
  m.out = 0;
  m.cap = 1;
  return m;
}

const Finding* find(const Measurement& m, const std::string& code) {
  for (const Finding& f : m.findings)
    if (f.code == code) return &f;
  return nullptr;
}

Capture constant(double level_V, std::size_t n) {
  Capture c;
  c.source = "flat.csv";
  c.time.dt_s = 1e-5;
  Channel ch;
  ch.name = "out";
  ch.values.assign(n, level_V);
  c.channels.push_back(ch);
  return c;
}

}  // namespace

TEST_CASE("an output stuck high or low is reported with its level, and no cycles") {
  NodeMap m;
  m.out = 0;
  const Measurement high = measure(constant(7.31, 5000), m);
  REQUIRE(find(high, "stuck_high") != nullptr);
  CHECK(find(high, "stuck_high")->severity == Severity::problem);
  CHECK(find(high, "stuck_high")->message.find("stays high at 7.31 V") != std::string::npos);
  CHECK(high.summary.cycles == 0);
  CHECK(high.cycles.empty());
  const Measurement low = measure(constant(0.04, 5000), m);
  REQUIRE(find(low, "stuck_low") != nullptr);
  CHECK(find(low, "stuck_low")->message.find("stays low at 40.0 mV") != std::string::npos);
}

TEST_CASE("noise alone gives no cycles and says why") {
  Capture c = constant(0.0, 20000);
  std::mt19937_64 rng(7);
  std::normal_distribution<double> n(2.0, 0.5);
  for (double& v : c.channels[0].values) v = n(rng);
  NodeMap as_out;
  as_out.out = 0;
  const Measurement a = measure(c, as_out);
  CHECK(find(a, "no_clean_levels") != nullptr);
  CHECK(a.summary.cycles == 0);
  NodeMap as_cap;
  as_cap.cap = 0;
  const Measurement b = measure(c, as_cap);
  CHECK(find(b, "no_clean_sawtooth") != nullptr);
  CHECK(b.summary.cycles == 0);
}

TEST_CASE("a power-up charge is found and kept out of the statistics") {
  // The supply comes up 1 ms into the record: the output rises from 0 V.
  const SynthRecord rec = record(6.2, 400.0, true, 1e-3);
  const Measurement r = measure(rec.capture, out_and_cap());
  REQUIRE(find(r, "startup_cycle") != nullptr);
  REQUIRE_FALSE(r.cycles.empty());
  CHECK(r.cycles.front().startup);
  CHECK(r.summary.cycles == r.cycles.size() - 1);
  // The steady high time is the textbook ln 2 (R1 + R2) C, not the longer
  // first charge from 0 V (ln 3 (R1 + R2) C for a 2/3 threshold).
  CHECK(r.summary.high_s.mean == Approx(std::log(2.0) * 57e3 * 100e-9).epsilon(2e-3));
  CHECK(r.cycles.front().high_s == Approx(std::log(3.0) * 57e3 * 100e-9).epsilon(5e-3));
}

TEST_CASE("a record that starts with the charge already under way after power-up") {
  // No rising edge is seen: the capacitor starts at 0 V with the output high.
  const SynthRecord rec = record(6.2, 400.0, true);
  const Measurement r = measure(rec.capture, out_and_cap());
  REQUIRE(find(r, "startup_cycle") != nullptr);
  CHECK(find(r, "startup_cycle")->message.find("record starts with the capacitor at 0 V") !=
        std::string::npos);
  CHECK(r.summary.cycles == r.cycles.size());
  SynthRecord out_only = rec;
  out_only.capture.channels.resize(1);
  NodeMap m;
  m.out = 0;
  CHECK(find(measure(out_only.capture, m), "startup_cycle") != nullptr);
  // A record that merely starts part-way through a high phase is no start-up.
  CHECK(find(measure(record(6.2, 400.0).capture, m), "startup_cycle") == nullptr);
}

TEST_CASE("output pin only: a power-up charge is found from its length") {
  SynthRecord rec = record(6.2, 400.0, true, 1e-3);
  rec.capture.channels.resize(1);
  NodeMap m;
  m.out = 0;
  const Measurement r = measure(rec.capture, m);
  REQUIRE(find(r, "startup_cycle") != nullptr);
  CHECK(r.cycles.front().startup);
}

TEST_CASE("partial cycles at both ends are left out and reported") {
  const SynthRecord rec = record(5.5, 300.0);
  const Measurement r = measure(rec.capture, out_and_cap());
  CHECK(find(r, "partial_cycles") != nullptr);
  CHECK(r.summary.cycles == 4);
}

TEST_CASE("fewer than two whole cycles is a warning, none is a problem") {
  const Measurement one = measure(record(1.9, 300.0).capture, out_and_cap());
  REQUIRE(find(one, "few_cycles") != nullptr);
  CHECK(find(one, "few_cycles")->severity == Severity::warning);
  CHECK(one.summary.cycles == 1);
  const Measurement none = measure(record(0.9, 300.0).capture, out_and_cap());
  REQUIRE(find(none, "few_cycles") != nullptr);
  CHECK(find(none, "few_cycles")->severity == Severity::problem);
  CHECK(none.summary.cycles == 0);
}

TEST_CASE("too few samples per segment warns of aliasing") {
  const Measurement r = measure(record(30.0, 14.0).capture, out_and_cap());
  REQUIRE(find(r, "few_samples_per_segment") != nullptr);
  CHECK(r.min_samples_per_segment < 10.0);
  const Measurement fine = measure(record(10.0, 200.0).capture, out_and_cap());
  CHECK(find(fine, "few_samples_per_segment") == nullptr);
}

TEST_CASE("a clipped capacitor channel is reported") {
  SynthRecord rec = record(8.0, 300.0);
  for (double& v : rec.capture.channels[1].values) v = std::min(v, 5.5);
  const Measurement r = measure(rec.capture, out_and_cap());
  REQUIRE(find(r, "clipped_channel") != nullptr);
  CHECK(find(r, "clipped_channel")->message.find("5.50 V") != std::string::npos);
  const Measurement clean = measure(record(8.0, 300.0).capture, out_and_cap());
  CHECK(find(clean, "clipped_channel") == nullptr);
}

TEST_CASE("a monostable's discharged floor is not taken for clipping, a clipped bottom is") {
  // The model's monostable (100k, 1u on 9 V): between pulses the capacitor
  // rests at the switch's floor, a few tens of millivolts, exactly flat.
  Circuit c;
  c.kind = CircuitKind::monostable;
  c.v.timing_ohm = 100e3;
  c.v.cap_F = 1e-6;
  for (Family family : {Family::bipolar, Family::cmos}) {
    c.v.family = family;
    c.v.chip = typical_figures(family);
    const CyclePrediction p = predict_cycle(c);
    REQUIRE(p.oscillates);
    INFO(family_name(family) << " floor " << p.cap_min_V << " V");
    REQUIRE(p.cap_min_V < 0.1);
    SynthOptions o;
    o.rate_Hz = 10e3;
    o.duration_s = 2.0;
    o.bits = 12;  // the bipolar floor above the ADC's zero; the CMOS one at code 0
    for (double noise_V : {0.0, 0.002}) {
      o.noise_V = noise_V;
      const SynthRecord rec = synth_pulse_train(pulse_wave(p), 0.25, 0.05, o);
      const Measurement r = measure(rec.capture, out_and_cap());
      CHECK(find(r, "clipped_channel") == nullptr);
    }
  }
  // The same pulses cut at 5.5 V by the instrument are still clipped at the top.
  c.v.family = Family::bipolar;
  c.v.chip = typical_figures(Family::bipolar);
  SynthOptions o;
  o.rate_Hz = 10e3;
  o.duration_s = 2.0;
  SynthRecord cut = synth_pulse_train(pulse_wave(predict_cycle(c)), 0.25, 0.05, o);
  for (double& v : cut.capture.channels[1].values) v = std::min(v, 5.5);
  const Measurement top = measure(cut.capture, out_and_cap());
  REQUIRE(find(top, "clipped_channel") != nullptr);
  CHECK(find(top, "clipped_channel")->message.find("5.50 V") != std::string::npos);
  // An astable's sawtooth (3 V to 6 V) cut from below at 4 V is clipping at the bottom.
  SynthRecord rec = record(8.0, 300.0);
  for (double& v : rec.capture.channels[1].values) v = std::max(v, 4.0);
  const Measurement bottom = measure(rec.capture, out_and_cap());
  REQUIRE(find(bottom, "clipped_channel") != nullptr);
  CHECK(find(bottom, "clipped_channel")->message ==
        "channel \"cap_V\" sits flat at 4.00 V for " +
            format_percent(
                static_cast<double>(std::count(rec.capture.channels[1].values.begin(),
                                               rec.capture.channels[1].values.end(), 4.0)) /
                static_cast<double>(rec.capture.channels[1].values.size())) +
            " of the samples: the instrument's input range was probably exceeded at the bottom, "
            "and turnaround voltages there are not trustworthy");
}

TEST_CASE("missing samples are counted, and no cycle is timed across them") {
  SynthRecord rec = record(8.0, 300.0);
  const Measurement clean = measure(rec.capture, out_and_cap());
  auto& out = rec.capture.channels[0].values;
  // Blank out a stretch holding one edge.
  const std::size_t at = rec.edges[5].index;
  for (std::size_t i = at - 5; i < at + 5; ++i) out[i] = NAN;
  rec.capture.channels[0].missing = 10;
  rec.capture.channels[0].first_missing_line = 1234;
  const Measurement r = measure(rec.capture, out_and_cap());
  REQUIRE(find(r, "missing_samples") != nullptr);
  CHECK(
      find(r, "missing_samples")->message.find("10 empty or NaN cells (the first on line 1234)") !=
      std::string::npos);
  // The cycles touching the hidden edge are gone; the others are unchanged.
  CHECK(r.summary.cycles < clean.summary.cycles);
  CHECK(r.summary.cycles >= clean.summary.cycles - 2);
  CHECK(r.summary.period_s.mean == Approx(clean.summary.period_s.mean).epsilon(1e-4));
}

TEST_CASE("cycle-to-cycle jitter and drift from a square wave with known edges") {
  // Periods alternate 1.00 ms and 1.02 ms: successive differences are all
  // 20 us, so the RMS jitter is 20 us; the trend is zero within its sigma.
  Capture c;
  c.source = "square";
  c.time.dt_s = 1e-6;
  Channel ch;
  ch.name = "out";
  std::vector<double> rising{0.5e-3};
  for (int k = 0; k < 40; ++k) rising.push_back(rising.back() + (k % 2 ? 1.02e-3 : 1.00e-3));
  const auto n = static_cast<std::size_t>(rising.back() / c.time.dt_s) + 300;
  ch.values.assign(n, 0.0);
  for (std::size_t k = 0; k + 1 < rising.size(); ++k) {
    const double fall = rising[k] + 0.4e-3;
    for (std::size_t i = 0; i < n; ++i) {
      const double t = c.time.at(i);
      if (t >= rising[k] && t < fall) ch.values[i] = 5.0;
    }
  }
  c.channels.push_back(ch);
  NodeMap m;
  m.out = 0;
  const Measurement r = measure(c, m);
  REQUIRE(r.summary.cycles == 39);
  CHECK(r.summary.jitter_c2c_s == Approx(20e-6).epsilon(0.05));
  REQUIRE(r.summary.drift.known);
  CHECK(std::fabs(r.summary.drift.ppm_per_s) < 3.0 * r.summary.drift.sigma_ppm_per_s + 1.0);
}

TEST_CASE("period drift in ppm per second from a steadily slowing timer") {
  // Each period 0.1 % longer than the last: at 1 ms periods that is a slope
  // of about 1e-3 per cycle, i.e. d(period)/dt / period = 1e-3 / 1e-3 s = 1 /s
  // = 1e6 ppm/s at the start, falling slowly as the periods grow.
  Capture c;
  c.source = "drift";
  c.time.dt_s = 1e-6;
  Channel ch;
  ch.name = "out";
  std::vector<double> rising{0.2e-3};
  double p = 1e-3;
  for (int k = 0; k < 30; ++k) {
    rising.push_back(rising.back() + p);
    p *= 1.001;
  }
  const auto n = static_cast<std::size_t>(rising.back() / c.time.dt_s) + 300;
  ch.values.assign(n, 0.0);
  for (std::size_t k = 0; k < rising.size(); ++k) {
    const std::size_t next = std::min(k + 1, rising.size() - 1);
    const double fall = rising[k] + 0.5 * (next > k ? rising[next] - rising[k] : p);
    for (auto i = static_cast<std::size_t>(rising[k] / c.time.dt_s); i < n; ++i) {
      const double t = c.time.at(i);
      if (t >= fall) break;
      if (t >= rising[k]) ch.values[i] = 5.0;
    }
  }
  c.channels.push_back(ch);
  NodeMap m;
  m.out = 0;
  const Measurement r = measure(c, m);
  REQUIRE(r.summary.cycles == 30);
  REQUIRE(r.summary.drift.known);
  // Expected slope: periods grow 1e-3 per period, over a period of ~1.015 ms
  // mean; the fitted ppm/s is slope / mean period.
  const double mean_period = r.summary.period_s.mean;
  const double expected = (1e-3 * mean_period / mean_period) / mean_period * 1e6;
  CHECK(r.summary.drift.ppm_per_s == Approx(expected).epsilon(0.05));
}

TEST_CASE("a two-level control pin (fed back from the output) is not taken for clipping") {
  SynthRecord rec = record(8.0, 300.0);
  rec.capture.channels[2].values.clear();
  for (double v : rec.capture.channels[0].values)
    rec.capture.channels[2].values.push_back(v > 3.0 ? 6.5 : 5.5);
  NodeMap m = out_and_cap();
  m.ctl = 2;
  const Measurement r = measure(rec.capture, m);
  CHECK(find(r, "clipped_channel") == nullptr);
  CHECK(r.summary.ctl_V.max == Approx(6.5));
}
