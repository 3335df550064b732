// benchtau: metadata lines before the data that give the sample interval or rate.
#include <catch2/catch.hpp>

#include <string>

#include "drivers/csv_preamble.h"
#include "tests/drivers/csv_test_support.h"

using benchtau::test::error_of;
using benchtau::test::has_note;
using benchtau::test::read;
using benchtau::test::with_rate;

namespace {

double dt_of(const std::string& text) { return read(text).capture.time.dt_s; }

}  // namespace

TEST_CASE("csv preamble: keys in plain words") {
  using benchtau::csv::classify_key;
  using benchtau::csv::KeyKind;
  CHECK(classify_key("Sample interval") == KeyKind::interval);
  CHECK(classify_key("SAMPLING INTERVAL") == KeyKind::interval);
  CHECK(classify_key("sample period") == KeyKind::interval);
  CHECK(classify_key("Sampling period") == KeyKind::interval);
  CHECK(classify_key("dt") == KeyKind::interval);
  CHECK(classify_key("time increment") == KeyKind::interval);
  CHECK(classify_key("Sample rate") == KeyKind::rate);
  CHECK(classify_key("samplerate") == KeyKind::rate);
  CHECK(classify_key("Rate") == KeyKind::rate);
  CHECK(classify_key("Sampling frequency") == KeyKind::rate);
  CHECK(classify_key("samples per second") == KeyKind::rate);
  CHECK(classify_key("fs") == KeyKind::rate);
  // Words that merely contain the letters.
  CHECK(classify_key("Generated") == KeyKind::none);
  CHECK(classify_key("Bandwidth") == KeyKind::none);
  CHECK(classify_key("Calibrated") == KeyKind::none);
  CHECK(classify_key("Points") == KeyKind::none);
  CHECK(classify_key("Time base") == KeyKind::none);
}

TEST_CASE("csv preamble: an interval in each spelling and unit") {
  const std::string data = "out\n1\n2\n3\n";
  CHECK(dt_of("Sample interval,2e-6\n" + data) == 2e-6);
  CHECK(dt_of("Sample interval,2,us\n" + data) == Approx(2e-6).epsilon(1e-15));
  CHECK(dt_of("Sample interval,2 us\n" + data) == Approx(2e-6).epsilon(1e-15));
  CHECK(dt_of("sample interval: 2us\n" + data) == Approx(2e-6).epsilon(1e-15));
  CHECK(dt_of("dt = 0.5 ms\n" + data) == Approx(0.5e-3).epsilon(1e-15));
  CHECK(dt_of("# Sample period: 20 ns\n" + data) == Approx(20e-9).epsilon(1e-15));
  CHECK(dt_of("% time increment = 1 \xC2\xB5s\n" + data) == Approx(1e-6).epsilon(1e-15));
  CHECK(dt_of("// sampling interval: 4 s\n" + data) == 4.0);
  CHECK(dt_of("Sample interval 3 ms\n" + data) == Approx(3e-3).epsilon(1e-15));
}

TEST_CASE("csv preamble: a rate in each spelling and unit") {
  const std::string data = "out\n1\n2\n3\n";
  CHECK(dt_of("Sample rate,1000\n" + data) == 1e-3);
  CHECK(dt_of("Sample rate,500,kHz\n" + data) == Approx(2e-6).epsilon(1e-15));
  CHECK(dt_of("Sample rate: 2 MHz\n" + data) == Approx(0.5e-6).epsilon(1e-15));
  CHECK(dt_of("fs = 10 kS/s\n" + data) == Approx(1e-4).epsilon(1e-15));
  CHECK(dt_of("Sampling frequency: 1 MS/s\n" + data) == Approx(1e-6).epsilon(1e-15));
  CHECK(dt_of("# samples per second: 250 Sa/s\n" + data) == Approx(4e-3).epsilon(1e-15));
  CHECK(dt_of("rate = 48 kSa/s\n" + data) == Approx(1.0 / 48e3).epsilon(1e-15));
  CHECK(dt_of("Sample rate;2,5;kHz\nout\n1\n2\n") == Approx(1.0 / 2500).epsilon(1e-15));
  CHECK(dt_of("Sample rate: 2,5 kHz\na;b\n1;2,5\n2;3\n") == Approx(1.0 / 2500).epsilon(1e-15));
  // A comma that may group thousands is not taken as a decimal mark.
  CHECK(error_of("Sample rate: 1,000 Hz\nout\n1\n2\n") ==
        "scope.csv: no time column and no sample rate: give --rate (samples per second)");
}

TEST_CASE("csv preamble: what was assumed is said") {
  const auto r = read("Device,bench logger\nSample interval,2,us\n\nout (V)\n1\n2\n3\n");
  CHECK(r.dialect.preamble_lines == 2);
  CHECK(r.dialect.header_line == 4);
  CHECK(r.capture.time.uniform());
  CHECK(r.capture.time.t0_s == 0.0);
  CHECK(r.capture.time_origin == "sample interval in the file's preamble");
  CHECK(has_note(r, "The samples are taken as 2e-06 s apart, from the sample interval on line 2."));
  CHECK(r.capture.duration_s() == Approx(4e-6).epsilon(1e-12));

  const auto q = read("Sample rate: 1 kHz\nout\n1\n2\n");
  CHECK(q.capture.time_origin == "sample rate in the file's preamble");
  CHECK(has_note(q, "from the sample rate of 1000 Hz on line 1"));
}

TEST_CASE("csv preamble: the interval wins over a rate, --rate over both") {
  const std::string text = "Sample rate,1000\nSample interval,1e-6\nout\n1\n2\n";
  const auto r = read(text);
  CHECK(r.capture.time.dt_s == 1e-6);
  CHECK(has_note(r, "The sample rate on line 1 (1000 Hz) disagrees with the sample interval"));
  const auto forced = read(text, with_rate(50.0));
  CHECK(forced.capture.time.dt_s == 0.02);
  CHECK(forced.capture.time_origin == "--rate");
  CHECK(has_note(forced, "--rate overrides the sample interval on line 2 of the preamble."));
}

TEST_CASE("csv preamble: with a time column the column wins, and a disagreement is noted") {
  const auto r = read("Sample interval,1 ms\nt,out\n0,1\n0.002,2\n0.004,3\n");
  CHECK(r.capture.time.dt_s == 0.002);
  CHECK(r.capture.time_origin == "time column \"t\"");
  CHECK(has_note(
      r,
      "The preamble's sample interval (line 1) implies steps of 0.001 s, but the time column's "
      "median step is 0.002 s; the time column was used."));
  const auto same = read("Sample interval,2 ms\nt,out\n0,1\n0.002,2\n0.004,3\n");
  CHECK_FALSE(has_note(same, "preamble's sample interval"));
}

TEST_CASE("csv preamble: values that cannot be used are passed over") {
  // A date after a key, a non-positive interval and a rate in seconds.
  const auto r =
      read("Sample time: 2024-01-05 10:00\nSample interval,-1,us\nSample rate,5,ms\nout\n1\n2\n",
           with_rate(10.0));
  CHECK(r.capture.time.dt_s == 0.1);
  CHECK(has_note(
      r,
      "Line 2 gives \"Sample interval\" as -1, which is not a positive number; it was ignored."));
  CHECK(has_note(
      r, "Line 3 gives \"Sample rate\" in \"ms\", which is not a rate unit; it was ignored."));
  CHECK(error_of("Generated,2024\nout\n1\n2\n") ==
        "scope.csv: no time column and no sample rate: give --rate (samples per second)");
}

TEST_CASE("csv preamble: a key/value line with a number is never taken as the header") {
  const auto r = read("Sample interval,1e-3\n0.5,1\n0.25,2\n0.125,3\n");
  CHECK_FALSE(r.dialect.has_header);
  CHECK(r.dialect.first_data_line == 2);
  CHECK(r.capture.channels.size() == 2);  // column 1 falls, so it is a channel
  CHECK(r.capture.channels[0].values == std::vector<double>{0.5, 0.25, 0.125});
  CHECK(r.capture.time.dt_s == 1e-3);
}
