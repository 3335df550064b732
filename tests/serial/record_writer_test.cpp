// benchtau tests: the record writer: exact text, no overwriting, timed flushes, and a record
// that the CSV reader and the measurement read back.
#include <catch2/catch.hpp>

#include <cmath>

#include "drivers/csv_reader.h"
#include "drivers/record_writer.h"
#include "serial_test_support.h"
#include "src/core/input_error.h"
#include "src/core/measure.h"
#include "src/core/synth.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

AdcScale scale_5V_10bit() { return {5.0, 10, 1.0}; }

SampleBatch batch_of(std::size_t channels, std::vector<double> t, std::vector<std::uint16_t> counts,
                     std::vector<std::uint8_t> gap) {
  SampleBatch b;
  b.channels = channels;
  b.t_s = std::move(t);
  b.counts = std::move(counts);
  b.gap = std::move(gap);
  return b;
}

std::string create_error(const fs::path& p, bool force) {
  try {
    RecordWriter w(p.string(), force);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("a record is a header, one row per sample, and empty cells at a gap") {
  const fs::path p = scratch("rows.csv");
  {
    RecordWriter w(p.string(), false);
    // 5 V over 1024 counts: 256 counts are 1.25 V, 1023 are 4.9951171875 V.
    w.append(
        batch_of(2, {0.0, 0.001, 0.002, 0.0125}, {256, 512, 1023, 0, 0, 0, 1, 2}, {0, 0, 1, 0}),
        scale_5V_10bit());
    w.add_gap(0.5);
    CHECK(w.rows() == 3);
    CHECK(w.gaps() == 2);
    w.close();
  }
  CHECK(slurp(p) ==
        "t_s,ch1_V,ch2_V\n"
        "0,1.25,2.5\n"
        "0.001,4.9951171875,0\n"
        "0.002,,\n"
        "0.0125,0.0048828125,0.009765625\n"
        "0.5,,\n");
}

TEST_CASE("an existing file is never replaced without --force") {
  const fs::path p = scratch("taken.csv");
  std::ofstream(p) << "the user's data\n";
  CHECK(create_error(p, false) ==
        p.string() + ": already exists; give --force to replace it, or choose another name");
  CHECK(slurp(p) == "the user's data\n");
  CHECK(create_error(p, true) == "no error");
  CHECK(slurp(p).empty());
  CHECK(create_error(fs::path("/nonexistent-dir/rec.csv"), false) ==
        "/nonexistent-dir/rec.csv: cannot create: No such file or directory");
}

TEST_CASE("rows reach the file within the flush interval, and at once at a gap") {
  const fs::path p = scratch("flush.csv");
  RecordWriter w(p.string(), false);
  const auto t0 = RecordWriter::Clock::now();
  w.append(batch_of(1, {0.0, 0.1}, {1, 2}, {0, 0}), scale_5V_10bit());
  w.flush_if_due(t0);
  CHECK(slurp(p).empty());  // still buffered
  w.flush_if_due(t0 + std::chrono::milliseconds(250));
  CHECK(slurp(p) == "t_s,ch1_V\n0,0.0048828125\n0.1,0.009765625\n");
  w.append(batch_of(1, {0.2, 0.3}, {3, 0}, {0, 1}), scale_5V_10bit());
  CHECK(lines_of(slurp(p)).size() == 5);  // the gap row took the row before it along
}

TEST_CASE("the CSV reader reads a record back bit for bit, gaps as missing") {
  const fs::path p = scratch("readback.csv");
  std::vector<double> t;
  std::vector<std::uint16_t> counts;
  std::vector<std::uint8_t> gap;
  for (std::size_t i = 0; i < 5000; ++i) {
    t.push_back(static_cast<double>(i) / 48000.0);
    counts.push_back(pattern_count(i, 0) & 0x0FFF);
    counts.push_back(pattern_count(i, 1) & 0x0FFF);
    gap.push_back(i % 1000 == 999);
  }
  const AdcScale scale{3.3, 12, 2.0};
  {
    RecordWriter w(p.string(), false);
    w.append(batch_of(2, t, counts, gap), scale);
    w.close();
  }
  const CsvResult r = read_csv_file(p.string());
  REQUIRE(r.capture.samples() == 5000);
  REQUIRE(r.capture.channels.size() == 2);
  CHECK(r.capture.channels[0].name == "ch1_V");
  CHECK(r.capture.channels[0].missing == 5);
  const double k = scale.volts_per_count();
  for (std::size_t i = 0; i < 5000; ++i) {
    REQUIRE(r.capture.time.at(i) == t[i]);
    for (std::size_t c = 0; c < 2; ++c) {
      const double v = r.capture.channels[c].values[i];
      if (gap[i]) {
        REQUIRE(std::isnan(v));
      } else {
        REQUIRE(v == counts[i * 2 + c] * k);
      }
    }
  }
}

TEST_CASE("a recorded astable measures as the textbook says") {
  // R1 10k, R2 47k, C 100n on 9 V: high 0.693 (R1 + R2) C = 3.951 ms, low
  // 0.693 R2 C = 3.258 ms (the textbook relations, from memory).
  const AstableWave w = two_resistor_astable(9.0, 10e3, 47e3, 100e-9);
  SynthOptions o;
  o.rate_Hz = 20e3;
  o.duration_s = 10 * (w.high_s() + w.low_s());
  o.with_ctl = false;
  const SynthRecord rec = synth_astable(w, o);
  // As a 12-bit ADC behind a 3:1 divider with a 5 V reference would see it.
  const AdcScale scale{5.0, 12, 3.0};
  SampleBatch b;
  b.channels = 2;
  for (std::size_t i = 0; i < rec.capture.samples(); ++i) {
    b.t_s.push_back(static_cast<double>(i) / o.rate_Hz);
    for (std::size_t c = 0; c < 2; ++c) {
      const double v = rec.capture.channels[c].values[i];
      b.counts.push_back(static_cast<std::uint16_t>(std::lround(v / scale.volts_per_count())));
    }
    b.gap.push_back(0);
  }
  const fs::path p = scratch("astable.csv");
  {
    RecordWriter wr(p.string(), false);
    wr.append(b, scale);
    wr.close();
  }
  const CsvResult r = read_csv_file(p.string());
  const Measurement m = measure(r.capture, map_nodes(r.capture, {}));
  REQUIRE(m.summary.cycles >= 8);
  CHECK(m.summary.high_s.mean == Approx(3.951e-3).epsilon(2e-3));
  CHECK(m.summary.low_s.mean == Approx(3.258e-3).epsilon(2e-3));
  CHECK(m.summary.cap_max_V.mean == Approx(6.0).epsilon(5e-3));
  CHECK(m.summary.cap_min_V.mean == Approx(3.0).epsilon(5e-3));
}
