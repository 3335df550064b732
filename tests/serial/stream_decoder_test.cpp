// benchtau tests: telling text from frames by the first bytes, and the errors when it cannot.
#include <catch2/catch.hpp>

#include "drivers/stream_decoder.h"
#include "serial_test_support.h"
#include "src/core/input_error.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

StreamOptions detect(std::optional<double> rate_Hz = 1000.0) {
  StreamOptions o;
  o.rate_Hz = rate_Hz;
  o.source = "/dev/ttyACM0";
  return o;
}

std::vector<std::uint8_t> bytes_of(std::string_view s) { return {s.begin(), s.end()}; }

std::string error_of(StreamDecoder& d, std::span<const std::uint8_t> bytes) {
  SampleBatch out;
  try {
    d.feed(bytes, out);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

}  // namespace

TEST_CASE("frames are detected from the first good frame, even after noise") {
  const auto counts = pattern_counts(16 * 5, 2);
  const EncodedFrames f = encode_frames(counts, 2, 16);
  std::vector<std::uint8_t> bytes = {0x00, 0xFF, 0xB5, '\n', 0x12};  // noise at power-up
  bytes.insert(bytes.end(), f.bytes.begin(), f.bytes.end());
  StreamDecoder d(detect());
  SampleBatch out;
  for (std::size_t i = 0; i < bytes.size(); i += 10) {
    d.feed(std::span(bytes).subspan(i, std::min<std::size_t>(10, bytes.size() - i)), out);
  }
  CHECK(d.format() == StreamFormat::frames);
  CHECK(out.counts == counts);
  CHECK(d.counters().frames.skipped_bytes == 5);
  CHECK(d.counters().bytes == bytes.size());
}

TEST_CASE("text is detected after three whole printable lines, the first may be cut off") {
  StreamDecoder d(detect());
  SampleBatch out;
  const auto part = bytes_of(
      "\x93\x01"
      "23,40\n1,2\n3,4\n");
  d.feed(part, out);
  CHECK(d.format() == StreamFormat::detect);
  d.feed(bytes_of("5,6\n"), out);
  CHECK(d.format() == StreamFormat::text);
  // The cut-off first line is skipped; the rest are samples.
  CHECK(out.counts == std::vector<std::uint16_t>{1, 2, 3, 4, 5, 6});
  CHECK(d.counters().text.skipped_lines == 1);
}

TEST_CASE("an undecidable stream asks for --format") {
  StreamDecoder d(detect());
  std::vector<std::uint8_t> noise(StreamDecoder::kDetectBytes);
  for (std::size_t i = 0; i < noise.size(); ++i) noise[i] = static_cast<std::uint8_t>(i * 7 + 1);
  CHECK(error_of(d, noise) ==
        "/dev/ttyACM0: cannot tell the stream's format from its first 8192 bytes (neither a "
        "frame with a good CRC nor lines of text): give --format text or --format frames");
}

TEST_CASE("frames without a rate: the error names the option") {
  const auto counts = pattern_counts(4, 1);
  const EncodedFrames f = encode_frames(counts, 1, 4);
  StreamDecoder d(detect(std::nullopt));
  CHECK(error_of(d, f.bytes) ==
        "/dev/ttyACM0: the stream is binary frames, which carry no sample times: give --rate");
}

TEST_CASE("a forced format is not second-guessed") {
  StreamOptions o = detect();
  o.format = StreamFormat::text;
  StreamDecoder d(o);
  SampleBatch out;
  d.feed(bytes_of("7,8\n"), out);
  CHECK(d.format() == StreamFormat::text);
  CHECK(out.counts == std::vector<std::uint16_t>{7, 8});
}
