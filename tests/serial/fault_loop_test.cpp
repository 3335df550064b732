// benchtau tests: the link dropped at byte N, for every N: every sample whose bytes arrived
// whole before the fault is in the record, exactly, and nothing else is.
#include <catch2/catch.hpp>

#include "drivers/live_session.h"
#include "serial_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

// Records bytes[0, n) from a fake port that then goes away; returns the record's lines.
std::vector<std::string> record_until(std::span<const std::uint8_t> bytes, std::size_t n,
                                      const SessionOptions& options) {
  std::deque<FakeStep> steps;
  steps.push_back({ReadStatus::data, {bytes.begin(), bytes.begin() + static_cast<long>(n)}, {}});
  steps.push_back({ReadStatus::closed, {}, "Input/output error"});
  if (n == 0) steps.pop_front();
  const fs::path p = scratch("fault-loop.csv");
  {
    RecordWriter record(p.string(), false);
    LiveSession s(options, [&](const std::string&) {
      return std::make_unique<FakeSource>(steps, 5);  // 5 bytes a read
    });
    s.set_record(&record);
    const std::atomic<bool> stop{false};
    REQUIRE(s.run(stop) == SessionEnd::disconnected);
    record.close();
  }
  return lines_of(slurp(p));
}

std::string row(double t, std::initializer_list<double> volts) {
  std::string s = fmt::format("{}", t);
  for (const double v : volts) s += fmt::format(",{}", v);
  return s;
}

}  // namespace

TEST_CASE("fault loop, frames: the link drops at every byte of a stream of 12 frames") {
  constexpr std::uint8_t kSets = 4;
  const auto counts = pattern_counts(kSets * 12, 2);
  const EncodedFrames f = encode_frames(counts, 2, kSets);
  const std::size_t len = BT_FRAME_BYTES(2, kSets);
  SessionOptions o;
  o.port = "/dev/ttyFAKE";
  o.stream.format = StreamFormat::frames;
  o.stream.rate_Hz = 1000.0;
  o.reconnect = false;
  o.read_timeout_ms = 1;
  const double k = o.scale.volts_per_count();
  for (std::size_t n = 0; n <= f.bytes.size(); ++n) {
    CAPTURE(n);
    const auto lines = record_until(f.bytes, n, o);
    const std::size_t whole_frames = n / len;
    const std::size_t rows = whole_frames * kSets;
    if (rows == 0) {
      REQUIRE(lines.empty());  // nothing received, nothing written (not even a header)
      continue;
    }
    REQUIRE(lines.size() == 1 + rows + 1);
    REQUIRE(lines[0] == "t_s,ch1_V,ch2_V");
    for (std::size_t r = 0; r < rows; ++r) {
      REQUIRE(lines[1 + r] ==
              row(static_cast<double>(r) / 1000.0, {counts[2 * r] * k, counts[2 * r + 1] * k}));
    }
    // The disconnect is marked where the next sample was due.
    REQUIRE(lines.back() == row(static_cast<double>(rows) / 1000.0, {}) + ",,");
  }
}

TEST_CASE("fault loop, text: the link drops at every byte of a stream of lines") {
  std::string text = "board v2 ready\r\n";
  std::vector<std::size_t> line_ends;  // one past each sample line's '\n'
  for (int i = 0; i < 20; ++i) {
    text += fmt::format("{}\t{}\r\n", i * 37 % 1024, 1023 - i);
    line_ends.push_back(text.size());
  }
  const std::vector<std::uint8_t> bytes(text.begin(), text.end());
  SessionOptions o;
  o.port = "/dev/ttyFAKE";
  o.stream.format = StreamFormat::text;
  o.stream.rate_Hz = 200.0;
  o.reconnect = false;
  o.read_timeout_ms = 1;
  const double k = o.scale.volts_per_count();
  for (std::size_t n = 0; n <= bytes.size(); ++n) {
    CAPTURE(n);
    const auto lines = record_until(bytes, n, o);
    const auto rows = static_cast<std::size_t>(
        std::count_if(line_ends.begin(), line_ends.end(), [&](std::size_t e) { return e <= n; }));
    if (rows == 0) {
      REQUIRE(lines.empty());
      continue;
    }
    REQUIRE(lines.size() == 1 + rows + 1);
    for (std::size_t r = 0; r < rows; ++r) {
      const auto i = static_cast<int>(r);
      REQUIRE(lines[1 + r] ==
              row(static_cast<double>(r) / 200.0, {(i * 37 % 1024) * k, (1023 - i) * k}));
    }
    REQUIRE(lines.back() == row(static_cast<double>(rows) / 200.0, {}) + ",,");
  }
}
