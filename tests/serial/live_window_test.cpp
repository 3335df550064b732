// benchtau tests: the live view's sliding window: what it keeps, gaps as NaN, and what it measures.
#include <catch2/catch.hpp>

#include <cmath>

#include "drivers/live_window.h"
#include "src/core/synth.h"

using namespace benchtau;

namespace {

SampleBatch astable_counts(double rate_Hz, double seconds, const AdcScale& scale) {
  const AstableWave w = two_resistor_astable(9.0, 10e3, 47e3, 100e-9);
  SynthOptions o;
  o.rate_Hz = rate_Hz;
  o.duration_s = seconds;
  o.with_ctl = false;
  const SynthRecord rec = synth_astable(w, o);
  SampleBatch b;
  b.channels = 2;
  for (std::size_t i = 0; i < rec.capture.samples(); ++i) {
    b.t_s.push_back(static_cast<double>(i) / rate_Hz);
    for (std::size_t c = 0; c < 2; ++c) {
      b.counts.push_back(static_cast<std::uint16_t>(
          std::lround(rec.capture.channels[c].values[i] / scale.volts_per_count())));
    }
    b.gap.push_back(0);
  }
  return b;
}

}  // namespace

TEST_CASE("the window keeps the last seconds only, gaps as NaN, in the record's columns") {
  LiveWindow w(1.0);
  SampleBatch b;
  b.channels = 1;
  for (int i = 0; i < 30; ++i) {
    b.t_s.push_back(i * 0.125);  // exact in binary, so the edge of the window is too
    b.counts.push_back(static_cast<std::uint16_t>(i));
    b.gap.push_back(i == 25);
  }
  w.append(b, {5.0, 10, 1.0});
  const Capture c = w.capture();
  // Rows from 2.625 s to 3.625 s: no older than 1 s before the newest.
  REQUIRE(c.samples() == 9);
  CHECK(c.time.at(0) == 2.625);
  CHECK(c.channels[0].name == "ch1_V");
  CHECK(c.channels[0].column == 2);
  CHECK(c.channels[0].missing == 1);
  CHECK(std::isnan(c.channels[0].values[4]));
  CHECK(c.channels[0].values[8] == 29 * 5.0 / 1024);
}

TEST_CASE("the window measures an astable as the textbook says") {
  // R1 10k, R2 47k, C 100n on 9 V: period 0.693 (R1 + 2 R2) C = 7.21 ms, duty
  // (R1 + R2) / (R1 + 2 R2) = 54.8 %, capacitor between 3 V and 6 V (the
  // textbook relations, from memory).
  const AdcScale scale{5.0, 12, 3.0};
  LiveWindow w(0.5);
  const SampleBatch b = astable_counts(20e3, 2.0, scale);
  // In pieces, as it arrives.
  for (std::size_t i = 0; i < b.rows(); i += 1000) {
    SampleBatch piece;
    piece.channels = 2;
    const std::size_t n = std::min<std::size_t>(1000, b.rows() - i);
    piece.t_s.assign(b.t_s.begin() + static_cast<long>(i),
                     b.t_s.begin() + static_cast<long>(i + n));
    piece.counts.assign(b.counts.begin() + static_cast<long>(2 * i),
                        b.counts.begin() + static_cast<long>(2 * (i + n)));
    piece.gap.assign(n, 0);
    w.append(piece, scale);
  }
  const WindowReading r = w.read();
  CHECK(r.span_s == Approx(0.5).margin(1e-4));
  CHECK(r.cycles >= 65);
  CHECK(r.frequency_Hz == Approx(1.0 / (0.693 * 104e3 * 100e-9)).epsilon(2e-3));
  CHECK(r.duty == Approx(57.0 / 104.0).epsilon(2e-3));
  CHECK(r.cap_min_V == Approx(3.0).epsilon(5e-3));
  CHECK(r.cap_max_V == Approx(6.0).epsilon(5e-3));
  CHECK(r.why.empty());
}

TEST_CASE("a flat window says why it has no cycle") {
  LiveWindow w(1.0);
  SampleBatch b;
  b.channels = 1;
  for (int i = 0; i < 1000; ++i) {
    b.t_s.push_back(i * 1e-3);
    b.counts.push_back(512);
    b.gap.push_back(0);
  }
  w.append(b, {});
  const WindowReading r = w.read();
  CHECK(r.cycles == 0);
  CHECK_FALSE(r.why.empty());
  CHECK(LiveWindow(1.0).read().why == "waiting for samples");
}
