// benchtau: the binary frame decoder: scan for the sync bytes, check the header and CRC, and
// step one byte on when a candidate fails, so that a frame is never skipped with the garbage.
#include "drivers/frame_decoder.h"

#include <algorithm>
#include <cstring>

#include "drivers/crc16.h"
#include "drivers/frame_layout.h"

namespace benchtau {

FrameDecoder::FrameDecoder(double rate_Hz, double t0_s) : rate_Hz_(rate_Hz), t0_s_(t0_s) {}

double FrameDecoder::next_t_s() const { return t0_s_ + static_cast<double>(next_set_) / rate_Hz_; }

void FrameDecoder::feed(std::span<const std::uint8_t> bytes, SampleBatch& out) {
  buffer_.insert(buffer_.end(), bytes.begin(), bytes.end());
  while (pos_ < buffer_.size()) {
    // Skip to the next first sync byte.
    const auto* start = buffer_.data() + pos_;
    const auto* hit =
        static_cast<const std::uint8_t*>(std::memchr(start, frame::kSync0, buffer_.size() - pos_));
    const std::size_t skip = hit ? static_cast<std::size_t>(hit - start) : buffer_.size() - pos_;
    counters_.skipped_bytes += skip;
    pos_ += skip;
    if (pos_ >= buffer_.size()) break;
    const long used = try_frame(out);
    if (used == 0) break;
    if (used < 0) {
      ++counters_.skipped_bytes;
      ++pos_;
    } else {
      pos_ += static_cast<std::size_t>(used);
    }
  }
  // Drop what is done; keep the unfinished tail.
  if (pos_ > 0) {
    buffer_.erase(buffer_.begin(), buffer_.begin() + static_cast<std::ptrdiff_t>(pos_));
    pos_ = 0;
  }
}

long FrameDecoder::try_frame(SampleBatch& out) {
  const std::size_t avail = buffer_.size() - pos_;
  const std::uint8_t* f = buffer_.data() + pos_;
  // Check each header byte as soon as it is there, so that garbage is
  // rejected without waiting for a whole frame's worth of bytes.
  if (avail < 2) return 0;
  if (f[1] != frame::kSync1) return -1;
  if (avail < 3) return 0;
  if ((f[2] & ~frame::kKnownFlags) != 0) return -1;
  if (avail < 4) return 0;
  const std::size_t channels = f[3];
  if (channels < 1 || channels > frame::kMaxChannels) return -1;
  if (avail < 5) return 0;
  const std::size_t sets = f[4];
  if (sets < 1 || sets > frame::kMaxSets) return -1;
  const std::size_t length = frame::bytes(channels, sets);
  if (avail < length) return 0;
  const std::size_t body = length - frame::kCrcBytes;
  const std::uint16_t crc = crc16_ccitt_false({f + 2, body - 2});
  const auto stored = static_cast<std::uint16_t>((f[body] << 8) | f[body + 1]);
  if (crc != stored) {
    ++counters_.crc_errors;
    return -1;
  }

  ++counters_.frames;
  counters_.frame_bytes += length;
  const auto sequence = static_cast<std::uint16_t>(f[5] | (f[6] << 8));
  const bool start = (f[2] & frame::kFlagStart) != 0;
  if (have_sequence_ && sequence != expected_sequence_) {
    if (start) {
      // A restarted board: how long it was away is unknown, so one gap row.
      ++counters_.restarts;
      out.add_gap(next_t_s());
      ++next_set_;
    } else {
      // Lost frames, assumed as long as this one (the firmware keeps the
      // frame length constant). Wrap-around is the 16-bit subtraction.
      const auto lost = static_cast<std::uint16_t>(sequence - expected_sequence_);
      counters_.lost_frames += lost;
      out.add_gap(next_t_s());
      next_set_ += static_cast<std::uint64_t>(lost) * sets;
    }
  }
  have_sequence_ = true;
  expected_sequence_ = static_cast<std::uint16_t>(sequence + 1);

  if (channels_ == 0) {
    channels_ = channels;
    if (out.channels == 0) out.channels = channels;
  }
  if (channels != channels_ || out.channels != channels_) {
    // The record cannot change its columns mid-stream: mark the frame's
    // samples as missing instead.
    ++counters_.other_layout;
    if (!in_other_layout_) out.add_gap(next_t_s());
    in_other_layout_ = true;
    next_set_ += sets;
    return static_cast<long>(length);
  }
  in_other_layout_ = false;
  emit(f, sets, out);
  return static_cast<long>(length);
}

void FrameDecoder::emit(const std::uint8_t* f, std::size_t sets, SampleBatch& out) {
  const std::uint8_t* p = f + frame::kHeaderBytes;
  const std::size_t values = sets * channels_;
  const std::size_t first = out.counts.size();
  out.counts.resize(first + values);
  std::uint16_t* dst = out.counts.data() + first;
  for (std::size_t i = 0; i < values; ++i, p += 2) {
    dst[i] = static_cast<std::uint16_t>(p[0] | (p[1] << 8));
  }
  for (std::size_t s = 0; s < sets; ++s) {
    out.t_s.push_back(t0_s_ + static_cast<double>(next_set_ + s) / rate_Hz_);
  }
  out.gap.resize(out.gap.size() + sets, 0);
  next_set_ += sets;
}

}  // namespace benchtau
