// benchtau tests: text lines: separators, timestamps given or detected, banners and restarts.
#include <fmt/format.h>
#include <catch2/catch.hpp>

#include "drivers/text_decoder.h"
#include "serial_test_support.h"
#include "src/core/input_error.h"

using namespace benchtau;

namespace {

TextOptions rate_options(double rate_Hz) {
  TextOptions o;
  o.rate_Hz = rate_Hz;
  o.source = "/dev/ttyACM0";
  return o;
}

TextOptions stamp_options(TimestampMode mode = TimestampMode::on) {
  TextOptions o;
  o.timestamps = mode;
  o.source = "/dev/ttyACM0";
  return o;
}

SampleBatch feed(TextDecoder& d, std::string_view text, std::size_t piece = 0) {
  SampleBatch out;
  const auto* p = reinterpret_cast<const std::uint8_t*>(text.data());
  if (piece == 0) piece = text.size();
  for (std::size_t i = 0; i < text.size(); i += piece) {
    d.feed({p + i, std::min(piece, text.size() - i)}, out);
  }
  return out;
}

}  // namespace

TEST_CASE("commas, spaces, tabs and CR LF all separate, a partial line waits") {
  for (const std::size_t piece : {0, 1, 3}) {
    TextDecoder d(rate_options(100.0));
    const SampleBatch out = feed(d, "12,34\r\n56 78\n9\t10\n11, \t 12\n13,1", piece);
    REQUIRE(out.channels == 2);
    CHECK(out.counts == std::vector<std::uint16_t>{12, 34, 56, 78, 9, 10, 11, 12});
    CHECK(out.t_s == std::vector<double>{0.0, 0.01, 0.02, 0.03});
    CHECK(d.counters().sample_lines == 4);
    CHECK(d.counters().skipped_lines == 0);
  }
}

TEST_CASE("banner and debug lines are skipped and counted, in rate mode they leave a gap") {
  TextDecoder d(rate_options(1000.0));
  const SampleBatch out = feed(d,
                               "ADC board ready\n"
                               "# two channels\n"
                               "1,2\n3,4\n"
                               "ADC board ready\n"  // a restart mid-stream
                               "5,6\n"
                               "7,8,9\n"    // another column count
                               "70000,1\n"  // above 16 bits
                               "-5,3\n"
                               "10,11\n");
  CHECK(d.counters().skipped_lines == 6);
  CHECK(d.counters().sample_lines == 4);
  // The banner before any sample costs nothing; each later one a gap row,
  // and the time goes on counting through it.
  REQUIRE(out.rows() == 6);
  CHECK(out.gap == std::vector<std::uint8_t>{0, 0, 1, 0, 1, 0});
  CHECK(out.t_s == std::vector<double>{0.0, 0.001, 0.002, 0.003, 0.004, 0.005});
  CHECK(out.row(5)[0] == 10);
}

TEST_CASE("a line too long to be a sample is skipped whole, even split across reads") {
  TextDecoder d(rate_options(1000.0));
  const std::string longline(1000, '7');
  const SampleBatch out = feed(d, "1,2\n" + longline + "\n3,4\n", 100);
  CHECK(d.counters().skipped_lines == 1);
  CHECK(d.counters().sample_lines == 2);
  CHECK(out.gap == std::vector<std::uint8_t>{0, 1, 0});
  CHECK(out.row(0)[1] == 2);
  CHECK(out.row(2)[0] == 3);
}

TEST_CASE("timestamps in microseconds give the times, a jump back is a restart") {
  TextDecoder d(stamp_options());
  const SampleBatch out = feed(d,
                               "1000000,10,20\n"
                               "1000500,11,21\n"
                               "1001000,12,22\n"
                               "boot\n"
                               "200,13,23\n"
                               "700,14,24\n");
  CHECK(d.counters().restarts == 1);
  CHECK(d.counters().skipped_lines == 1);  // with timestamps a banner needs no gap row
  REQUIRE(out.rows() == 6);
  CHECK(out.gap == std::vector<std::uint8_t>{0, 0, 0, 1, 0, 0});
  // 0, 0.5 ms, 1 ms; the gap one step later; the new clock one step after that.
  CHECK(out.t_s[0] == 0.0);
  CHECK(out.t_s[1] == 500 / 1e6);
  CHECK(out.t_s[2] == 1000 / 1e6);
  CHECK(out.t_s[3] == 1000 / 1e6 + 500 / 1e6);
  CHECK(out.t_s[4] == out.t_s[3] + 500 / 1e6);
  CHECK(out.t_s[5] == out.t_s[4] + 500 / 1e6);
  CHECK(out.row(5)[1] == 24);
}

TEST_CASE("a 32-bit microsecond counter wrapping is not a restart") {
  TextDecoder d(stamp_options());
  const SampleBatch out = feed(d,
                               "4294966296,1\n"  // 2^32 - 1000
                               "4294966796,2\n"
                               "4,3\n"  // 2^32 + 4
                               "504,4\n");
  CHECK(d.counters().restarts == 0);
  REQUIRE(out.rows() == 4);
  CHECK(out.t_s[2] == 1004 / 1e6);
  CHECK(out.t_s[3] == 1504 / 1e6);
}

TEST_CASE("a timestamp far beyond the usual step leaves a gap row") {
  TextDecoder d(stamp_options());
  const SampleBatch out = feed(d, "100,1\n200,2\n300,3\n50000,4\n50100,5\n");
  CHECK(d.counters().time_gaps == 1);
  CHECK(out.gap == std::vector<std::uint8_t>{0, 0, 0, 1, 0, 0});
  CHECK(out.t_s[3] == 200 / 1e6 + 100 / 1e6);  // when the fourth sample was due
  CHECK(out.t_s[4] == 49900 / 1e6);
}

TEST_CASE("timestamp detection: a first column above full scale that rises") {
  std::string lines;
  for (int i = 0; i < 10; ++i) lines += fmt::format("{},{}\n", 5000000 + i * 1000, 100 + i);
  TextOptions o = stamp_options(TimestampMode::detect);
  o.full_scale = 1023;
  TextDecoder d(o);
  SampleBatch out = feed(d, "hello\n" + lines.substr(0, 7 * 13));  // seven lines: undecided
  CHECK_FALSE(d.decided());
  CHECK(out.rows() == 0);
  out = feed(d, lines.substr(7 * 13));
  CHECK(d.decided());
  CHECK(d.has_timestamps());
  REQUIRE(out.rows() == 10 - 7 + 7);  // the held lines come out too
  CHECK(out.channels == 1);
  CHECK(out.t_s[9] == 9000 / 1e6);
}

TEST_CASE("timestamp detection refuses a sawtooth's rising counts, asking for --rate") {
  // A capacitor's counts rise line after line too; they stay below full scale.
  std::string lines;
  for (int i = 0; i < 8; ++i) lines += fmt::format("{},{}\n", 300 + i * 50, 900);
  TextDecoder d(stamp_options(TimestampMode::detect));
  std::string error;
  try {
    feed(d, lines);
  } catch (const InputError& e) {
    error = e.what();
  }
  CHECK(error ==
        "/dev/ttyACM0: the text lines' first column is not a rising count of microseconds, so the "
        "samples have no times: give --rate, or --timestamps if the first column is a timestamp "
        "after all");
}

TEST_CASE("a garbled timestamp is skipped, not taken for a restart or a pause") {
  TextDecoder d(stamp_options());
  // 2500 lost its last digit on the way ("250"), and 3500 gained one.
  const SampleBatch out = feed(d, "1000,1\n1500,2\n2000,3\n250,4\n3000,5\n35000,6\n4000,7\n");
  CHECK(d.counters().restarts == 0);
  CHECK(d.counters().time_gaps == 0);
  CHECK(d.counters().skipped_lines == 2);
  CHECK(out.t_s == std::vector<double>{0.0, 500 / 1e6, 1000 / 1e6, 2000 / 1e6, 3000 / 1e6});
  CHECK(out.counts == std::vector<std::uint16_t>{1, 2, 3, 5, 7});
}

TEST_CASE("a restart on the last line before the link drops is kept when the stream ends") {
  TextDecoder d(stamp_options());
  SampleBatch out = feed(d, "1000,1\n1500,2\n100,3\n");
  CHECK(out.rows() == 2);  // the last line waits for the next to confirm it
  d.finish(out);
  CHECK(d.counters().restarts == 1);
  CHECK(out.gap == std::vector<std::uint8_t>{0, 0, 1, 0});
  CHECK(out.row(3)[0] == 3);
}

TEST_CASE("timestamps too far from zero for a microsecond step are dropped, times still rise") {
  TextDecoder d(stamp_options());
  // 10^18 us: a double there cannot tell one microsecond from the next.
  const SampleBatch out = feed(
      d, "1000,1\n2000,2\n1000000000000000000,3\n1000000000000000001,4\n1000000000000000002,5\n");
  for (std::size_t i = 1; i < out.rows(); ++i) CHECK(out.t_s[i] > out.t_s[i - 1]);
  CHECK(d.counters().skipped_lines >= 1);
}
