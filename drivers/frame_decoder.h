// benchtau: decodes the binary frames (drivers/FRAMES.md) from a byte stream, resynchronising
// after corrupt bytes and counting lost frames from the sequence numbers.
#pragma once

#include <cstddef>
#include <cstdint>
#include <span>
#include <vector>

#include "drivers/sample_batch.h"

namespace benchtau {

struct FrameCounters {
  std::uint64_t frames = 0;         // good frames decoded
  std::uint64_t lost_frames = 0;    // frames missing by their sequence numbers
  std::uint64_t crc_errors = 0;     // candidate frames (sync and a sane header) with a bad CRC
  std::uint64_t frame_bytes = 0;    // bytes in good frames
  std::uint64_t skipped_bytes = 0;  // bytes that were not part of a good frame
  std::uint64_t restarts = 0;       // the board began sampling again (start flag out of sequence)
  std::uint64_t other_layout = 0;   // good frames with another channel count than the first
};

class FrameDecoder {
 public:
  // rate_Hz: sample sets per second, which the frames do not carry. Row times
  // are t0_s + n / rate_Hz, n counting sample sets (lost ones included) from
  // the first frame decoded.
  explicit FrameDecoder(double rate_Hz, double t0_s = 0.0);

  // Decodes what bytes completes, appending rows (and gap rows) to out, whose
  // channel count is set by the first good frame. An incomplete frame at the
  // end waits for the next call.
  void feed(std::span<const std::uint8_t> bytes, SampleBatch& out);

  const FrameCounters& counters() const { return counters_; }
  std::size_t channels() const { return channels_; }
  // Bytes kept for the next call (the start of a frame, or bytes being checked).
  std::size_t pending_bytes() const { return buffer_.size() - pos_; }
  // The time of the next sample set if none is lost.
  double next_t_s() const;

 private:
  // Tries to decode a frame at pos_: returns bytes used, 0 when more bytes are
  // needed, or -1 when pos_ does not start a good frame.
  long try_frame(SampleBatch& out);
  void emit(const std::uint8_t* frame, std::size_t sets, SampleBatch& out);

  double rate_Hz_;
  double t0_s_;
  std::vector<std::uint8_t> buffer_;
  std::size_t pos_ = 0;
  std::size_t channels_ = 0;
  bool have_sequence_ = false;
  std::uint16_t expected_sequence_ = 0;
  std::uint64_t next_set_ = 0;  // sample sets so far, lost ones included
  bool in_other_layout_ = false;
  FrameCounters counters_;
};

}  // namespace benchtau
