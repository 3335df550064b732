// benchtau tests: the frame decoder: exact samples, any split of the bytes, sequence gaps and
// wrap-around, restarts, and the accounting of every byte.
#include <catch2/catch.hpp>

#include <random>

#include "drivers/frame_decoder.h"
#include "serial_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

SampleBatch decode_all(std::span<const std::uint8_t> bytes, double rate_Hz = 1000.0,
                       std::size_t piece = 0, FrameDecoder* keep = nullptr) {
  FrameDecoder local(rate_Hz);
  FrameDecoder& d = keep ? *keep : local;
  SampleBatch out;
  if (piece == 0) {
    d.feed(bytes, out);
  } else {
    for (std::size_t i = 0; i < bytes.size(); i += piece) {
      d.feed(bytes.subspan(i, std::min(piece, bytes.size() - i)), out);
    }
  }
  return out;
}

}  // namespace

TEST_CASE("frames decode to the counts sent, bit for bit, however the bytes are split") {
  const auto counts = pattern_counts(16 * 40, 2);
  const EncodedFrames f = encode_frames(counts, 2, 16);
  for (const std::size_t piece : {0, 1, 2, 3, 7, 64, 73, 1000}) {
    CAPTURE(piece);
    FrameDecoder d(1000.0);
    const SampleBatch out = decode_all(f.bytes, 1000.0, piece, &d);
    REQUIRE(out.channels == 2);
    REQUIRE(out.rows() == 640);
    CHECK(out.counts == counts);
    for (std::size_t r = 0; r < out.rows(); ++r) {
      REQUIRE(out.gap[r] == 0);
      REQUIRE(out.t_s[r] == static_cast<double>(r) / 1000.0);
    }
    CHECK(d.counters().frames == 40);
    CHECK(d.counters().lost_frames == 0);
    CHECK(d.counters().skipped_bytes == 0);
    CHECK(d.pending_bytes() == 0);
  }
}

TEST_CASE("one to eight channels, one to 64 sets a frame") {
  for (const int channels : {1, 3, 8}) {
    for (const int sets : {1, 5, 64}) {
      const auto counts =
          pattern_counts(static_cast<std::size_t>(sets) * 3, static_cast<std::size_t>(channels));
      const SampleBatch out = decode_all(encode_frames(counts, static_cast<std::uint8_t>(channels),
                                                       static_cast<std::uint8_t>(sets))
                                             .bytes);
      CHECK(out.channels == static_cast<std::size_t>(channels));
      CHECK(out.counts == counts);
    }
  }
}

TEST_CASE("the sequence number wraps from 65535 to 0 without a loss") {
  const auto counts = pattern_counts(4 * 10, 2);
  const EncodedFrames f = encode_frames(counts, 2, 4, 65530);
  FrameDecoder d(100.0);
  const SampleBatch out = decode_all(f.bytes, 100.0, 0, &d);
  CHECK(out.counts == counts);
  CHECK(d.counters().lost_frames == 0);
  CHECK(std::count(out.gap.begin(), out.gap.end(), 1) == 0);
}

TEST_CASE("frames missing from the sequence are counted and leave a gap row at the right time") {
  // 20 frames of 4 sets from sequence 65530, so the gap spans the wrap: frames
  // 4..6 (sequence 65534, 65535, 0) and frame 12 are dropped.
  const auto counts = pattern_counts(4 * 20, 1);
  const EncodedFrames f = encode_frames(counts, 1, 4, 65530);
  std::vector<std::uint8_t> bytes;
  for (std::size_t k = 0; k < 20; ++k) {
    if ((k >= 4 && k <= 6) || k == 12) continue;
    const std::size_t end = k + 1 < 20 ? f.offsets[k + 1] : f.bytes.size();
    bytes.insert(bytes.end(), f.bytes.begin() + static_cast<long>(f.offsets[k]),
                 f.bytes.begin() + static_cast<long>(end));
  }
  FrameDecoder d(1000.0);
  const SampleBatch out = decode_all(bytes, 1000.0, 0, &d);
  CHECK(d.counters().lost_frames == 4);
  CHECK(d.counters().frames == 16);
  // 16 frames of samples plus two gap rows.
  REQUIRE(out.rows() == 16 * 4 + 2);
  // The first gap row sits where sample 16 (the first lost) was due; the
  // samples after it keep their own times.
  CHECK(out.gap[16] == 1);
  CHECK(out.t_s[16] == 16 / 1000.0);
  CHECK(out.gap[17] == 0);
  CHECK(out.t_s[17] == 28 / 1000.0);
  CHECK(out.row(17)[0] == counts[28]);
  const std::size_t second_gap = 16 + 1 + 5 * 4;  // frames 7..11 after the first gap
  CHECK(out.gap[second_gap] == 1);
  CHECK(out.t_s[second_gap] == 48 / 1000.0);
  CHECK(out.t_s[second_gap + 1] == 52 / 1000.0);
}

TEST_CASE("a restarted board (start flag out of sequence) is a gap, not thousands of lost frames") {
  const auto counts = pattern_counts(2 * 30, 2);
  EncodedFrames before = encode_frames(std::span(counts).first(2 * 2 * 20), 2, 2, 500);
  const EncodedFrames after =
      encode_frames(std::span(counts).subspan(2 * 2 * 20), 2, 2, 0, BT_FRAME_FLAG_START);
  before.bytes.insert(before.bytes.end(), after.bytes.begin(), after.bytes.end());
  FrameDecoder d(1000.0);
  const SampleBatch out = decode_all(before.bytes, 1000.0, 0, &d);
  CHECK(d.counters().lost_frames == 0);
  CHECK(d.counters().restarts == 1);
  CHECK(std::count(out.gap.begin(), out.gap.end(), 1) == 1);
  CHECK(out.rows() == 60 + 1);
  // Start-flagged frames in sequence are just frames.
  FrameDecoder fresh(1000.0);
  decode_all(after.bytes, 1000.0, 0, &fresh);
  CHECK(fresh.counters().restarts == 0);
  CHECK(fresh.counters().frames == 10);
}

TEST_CASE("garbage before, between and after frames is skipped and counted byte for byte") {
  const auto counts = pattern_counts(8 * 6, 2);
  const EncodedFrames f = encode_frames(counts, 2, 8);
  const std::size_t frame_bytes = BT_FRAME_BYTES(2, 8);
  std::vector<std::uint8_t> bytes;
  // Garbage made of sync bytes and plausible headers is the hard kind.
  const std::vector<std::uint8_t> junk = {0xB5, 0xB5, 0x3C, 0x00, 0x02, 0x08, 0xB5,
                                          0x3C, 0x01, 0x09, 'h',  'i',  '\n', 0xB5};
  bytes.insert(bytes.end(), junk.begin(), junk.end());
  for (std::size_t k = 0; k < 6; ++k) {
    bytes.insert(bytes.end(), f.bytes.begin() + static_cast<long>(k * frame_bytes),
                 f.bytes.begin() + static_cast<long>((k + 1) * frame_bytes));
    bytes.insert(bytes.end(), junk.begin(), junk.begin() + static_cast<long>(k * 2 + 1));
  }
  FrameDecoder d(1000.0);
  const SampleBatch out = decode_all(bytes, 1000.0, 5, &d);
  CHECK(out.counts == counts);
  CHECK(d.counters().frames == 6);
  CHECK(d.counters().lost_frames == 0);
  // Every byte is in a good frame, skipped, or waiting.
  CHECK(d.counters().frame_bytes == 6 * frame_bytes);
  CHECK(d.counters().frame_bytes + d.counters().skipped_bytes + d.pending_bytes() == bytes.size());
}
