// benchtau tests: the reference firmware, compiled on the host against a fake ADC, timer and
// UART, and the decoder agree on frames, CRCs and the sequence wrap-around.
#include <catch2/catch.hpp>

#include "bt_sampler.h"
#include "drivers/crc16.h"
#include "drivers/frame_decoder.h"
#include "drivers/frame_layout.h"
#include "fake_hw.h"
#include "hw.h"
#include "serial_test_support.h"

using namespace benchtau;

namespace {

// Runs the firmware's main loop for ticks ticks; returns its UART bytes.
std::vector<std::uint8_t> run_firmware(std::uint8_t channels, std::uint8_t sets,
                                       std::uint64_t ticks) {
  static bt_sampler s;  // large: a board keeps it static too
  hw_init(10000, 500000);
  REQUIRE(bt_sampler_init(&s, channels, sets) == 1);
  for (std::uint64_t i = 0; i < ticks; ++i) bt_sampler_step(&s);
  const std::uint8_t* data = fake_hw_uart_data();
  return {data, data + fake_hw_uart_size()};
}

}  // namespace

TEST_CASE("the firmware's frame layout is the decoder's") {
  CHECK(BT_FRAME_SYNC0 == frame::kSync0);
  CHECK(BT_FRAME_SYNC1 == frame::kSync1);
  CHECK(BT_FRAME_FLAG_START == frame::kFlagStart);
  CHECK(BT_FRAME_HEADER_BYTES == frame::kHeaderBytes);
  CHECK(BT_FRAME_MAX_CHANNELS == frame::kMaxChannels);
  CHECK(BT_FRAME_MAX_SETS == frame::kMaxSets);
  CHECK(BT_FRAME_MAX_BYTES == frame::kMaxBytes);
  CHECK(BT_FRAME_BYTES(2, 16) == 73);
}

TEST_CASE("a frame byte by byte, as drivers/FRAMES.md gives it") {
  const std::uint16_t counts[] = {0x0123, 0x0FFF, 0x0000, 0xABCD};
  std::uint8_t f[BT_FRAME_MAX_BYTES];
  REQUIRE(bt_frame_encode(f, BT_FRAME_FLAG_START, 0x1234, 2, 2, counts) == 17);
  const std::vector<std::uint8_t> head(f, f + 15);
  CHECK(head == std::vector<std::uint8_t>{0xB5, 0x3C, 0x01, 0x02, 0x02, 0x34, 0x12, 0x23, 0x01,
                                          0xFF, 0x0F, 0x00, 0x00, 0xCD, 0xAB});
  // The CRC covers bytes 2 to 14 and goes most significant byte first.
  const std::uint16_t crc = crc16_ccitt_false({f + 2, 13});
  CHECK(f[15] == (crc >> 8));
  CHECK(f[16] == (crc & 0xFF));
  // Out of range: nothing written.
  CHECK(bt_frame_encode(f, 0, 0, 0, 2, counts) == 0);
  CHECK(bt_frame_encode(f, 0, 0, 9, 2, counts) == 0);
  CHECK(bt_frame_encode(f, 0, 0, 2, 65, counts) == 0);
  bt_sampler s;
  CHECK(bt_sampler_init(&s, 2, 0) == 0);
}

TEST_CASE("the firmware's samples come out of the decoder as the fake ADC read them") {
  const std::uint64_t ticks = 16 * 500;
  const auto bytes = run_firmware(2, 16, ticks);
  REQUIRE(bytes.size() == 500 * BT_FRAME_BYTES(2, 16));
  FrameDecoder d(10000.0);
  SampleBatch out;
  d.feed(bytes, out);
  CHECK(d.counters().frames == 500);
  CHECK(d.counters().crc_errors == 0);
  CHECK(d.counters().lost_frames == 0);
  REQUIRE(out.rows() == ticks);
  for (std::uint64_t t = 0; t < ticks; ++t) {
    REQUIRE(out.gap[t] == 0);
    REQUIRE(out.row(t)[0] == fake_hw_pattern(0, t));
    REQUIRE(out.row(t)[1] == fake_hw_pattern(1, t));
    REQUIRE(out.t_s[t] == static_cast<double>(t) / 10000.0);
  }
  // The first 16 frames carry the start flag, the rest do not.
  CHECK(bytes[2] == BT_FRAME_FLAG_START);
  CHECK(bytes[15 * BT_FRAME_BYTES(2, 16) + 2] == BT_FRAME_FLAG_START);
  CHECK(bytes[16 * BT_FRAME_BYTES(2, 16) + 2] == 0);
}

TEST_CASE("past 65536 frames the sequence wraps, and the decoder follows without a loss") {
  // 70000 frames of one set: sequence 0..65535, then 0..4463.
  const std::uint64_t frames = 70000;
  const auto bytes = run_firmware(1, 1, frames);
  const std::size_t len = BT_FRAME_BYTES(1, 1);
  REQUIRE(bytes.size() == frames * len);
  const auto seq_at = [&](std::size_t k) { return bytes[k * len + 5] | (bytes[k * len + 6] << 8); };
  CHECK(seq_at(65535) == 65535);
  CHECK(seq_at(65536) == 0);
  CHECK(seq_at(69999) == 4463);
  FrameDecoder d(1000.0);
  SampleBatch out;
  d.feed(bytes, out);
  CHECK(d.counters().frames == frames);
  CHECK(d.counters().lost_frames == 0);
  CHECK(d.counters().restarts == 0);
  REQUIRE(out.rows() == frames);
  CHECK(out.row(69999)[0] == fake_hw_pattern(0, 69999));

  // Frames lost across the wrap count exactly: drop 65530..65540.
  std::vector<std::uint8_t> cut(bytes.begin(), bytes.begin() + static_cast<long>(65530 * len));
  cut.insert(cut.end(), bytes.begin() + static_cast<long>(65541 * len), bytes.end());
  FrameDecoder d2(1000.0);
  SampleBatch out2;
  d2.feed(cut, out2);
  CHECK(d2.counters().lost_frames == 11);
  CHECK(out2.gap[65530] == 1);
  CHECK(out2.t_s[65531] == 65541 / 1000.0);
  CHECK(out2.row(65531)[0] == fake_hw_pattern(0, 65541));
}

TEST_CASE("a board that restarts is told from lost frames even when its first frames are lost") {
  auto a = run_firmware(2, 4, 4 * 100);
  // The restarted board's first three frames are lost on the way.
  auto b = run_firmware(2, 4, 4 * 50);
  const std::size_t len = BT_FRAME_BYTES(2, 4);
  a.insert(a.end(), b.begin() + static_cast<long>(3 * len), b.end());
  FrameDecoder d(1000.0);
  SampleBatch out;
  d.feed(a, out);
  CHECK(d.counters().restarts == 1);
  CHECK(d.counters().lost_frames == 0);
  CHECK(d.counters().frames == 147);
}
