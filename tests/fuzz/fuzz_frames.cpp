// benchtau: libFuzzer entry point for the serial stream decoders: any bytes, split any way,
// decode to the same rows, with rising times and every byte accounted for.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <span>
#include <string>
#include <vector>

#include "drivers/frame_decoder.h"
#include "drivers/frame_layout.h"
#include "drivers/stream_decoder.h"
#include "drivers/text_decoder.h"
#include "src/core/input_error.h"

namespace {

using benchtau::SampleBatch;

// What every batch a decoder gives must satisfy; a breach is a bug.
void check(const SampleBatch& b) {
  if (b.rows() == 0) return;
  if (b.channels < 1 || b.channels > benchtau::frame::kMaxChannels) __builtin_trap();
  if (b.counts.size() != b.rows() * b.channels || b.gap.size() != b.rows()) __builtin_trap();
  for (std::size_t i = 0; i < b.rows(); ++i) {
    if (!std::isfinite(b.t_s[i])) __builtin_trap();
    // The record's time column must rise, or measure would refuse it.
    if (i > 0 && !(b.t_s[i] > b.t_s[i - 1])) __builtin_trap();
  }
}

bool same(const SampleBatch& a, const SampleBatch& b) {
  return a.channels == b.channels && a.rows() == b.rows() && a.gap == b.gap &&
         a.counts == b.counts &&
         (a.t_s.empty() ||
          std::memcmp(a.t_s.data(), b.t_s.data(), a.t_s.size() * sizeof(double)) == 0);
}

// Piece lengths taken from the input itself, so that libFuzzer explores splits too.
template <class Decoder>
void feed_in_pieces(Decoder& d, std::span<const std::uint8_t> data, SampleBatch& out) {
  std::size_t i = 0;
  std::size_t k = 0;
  while (i < data.size()) {
    const std::size_t n = std::min<std::size_t>(1 + data[k++ % data.size()] % 97, data.size() - i);
    d.feed(data.subspan(i, n), out);
    i += n;
  }
}

void frames(std::span<const std::uint8_t> data) {
  benchtau::FrameDecoder whole(1000.0);
  benchtau::FrameDecoder split(1000.0);
  SampleBatch a, b;
  whole.feed(data, a);
  feed_in_pieces(split, data, b);
  check(a);
  if (!same(a, b)) __builtin_trap();
  const auto& c = whole.counters();
  if (c.frame_bytes + c.skipped_bytes + whole.pending_bytes() != data.size()) __builtin_trap();
  if (whole.pending_bytes() >= benchtau::frame::kMaxBytes) __builtin_trap();
  if (std::memcmp(&c, &split.counters(), sizeof c) != 0) __builtin_trap();
}

void text(std::span<const std::uint8_t> data, benchtau::TimestampMode mode) {
  benchtau::TextOptions o;
  o.timestamps = mode;
  o.rate_Hz = 1000.0;
  benchtau::TextDecoder whole(o);
  benchtau::TextDecoder split(o);
  SampleBatch a, b;
  whole.feed(data, a);
  feed_in_pieces(split, data, b);
  check(a);
  if (!same(a, b)) __builtin_trap();
}

void detect(std::span<const std::uint8_t> data) {
  benchtau::StreamOptions o;
  o.rate_Hz = 1000.0;
  benchtau::StreamDecoder d(o);
  SampleBatch out;
  try {
    feed_in_pieces(d, data, out);
  } catch (const benchtau::InputError&) {
    return;  // an undecidable stream is refused, which is fine
  }
  check(out);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::span<const std::uint8_t> bytes(data, size);
  frames(bytes);
  text(bytes, benchtau::TimestampMode::off);
  text(bytes, benchtau::TimestampMode::on);
  detect(bytes);
  return 0;
}
