// benchtau: the stream decoder: format detection, then the chosen decoder.
#include "drivers/stream_decoder.h"

#include <fmt/format.h>

#include <algorithm>

#include "src/core/input_error.h"

namespace benchtau {

const char* format_name(StreamFormat f) {
  switch (f) {
    case StreamFormat::text:
      return "text";
    case StreamFormat::frames:
      return "frames";
    case StreamFormat::detect:
      break;
  }
  return "detecting";
}

StreamCounters& operator+=(StreamCounters& a, const StreamCounters& b) {
  a.bytes += b.bytes;
  a.frames.frames += b.frames.frames;
  a.frames.lost_frames += b.frames.lost_frames;
  a.frames.crc_errors += b.frames.crc_errors;
  a.frames.frame_bytes += b.frames.frame_bytes;
  a.frames.skipped_bytes += b.frames.skipped_bytes;
  a.frames.restarts += b.frames.restarts;
  a.frames.other_layout += b.frames.other_layout;
  a.text.sample_lines += b.text.sample_lines;
  a.text.skipped_lines += b.text.skipped_lines;
  a.text.restarts += b.text.restarts;
  a.text.time_gaps += b.text.time_gaps;
  return a;
}

StreamDecoder::StreamDecoder(StreamOptions options, double t0_s)
    : options_(std::move(options)), t0_s_(t0_s), format_(StreamFormat::detect) {
  if (options_.format != StreamFormat::detect) choose(options_.format);
}

void StreamDecoder::choose(StreamFormat f) {
  format_ = f;
  if (f == StreamFormat::frames) {
    if (!options_.rate_Hz) {
      throw InputError(options_.source, 0, 0,
                       "the stream is binary frames, which carry no sample times: give --rate");
    }
    frames_ = std::make_unique<FrameDecoder>(*options_.rate_Hz, t0_s_);
  } else {
    TextOptions t;
    t.timestamps = options_.timestamps ? TimestampMode::on
                   : options_.rate_Hz  ? TimestampMode::off
                                       : TimestampMode::detect;
    t.rate_Hz = options_.rate_Hz;
    t.full_scale = options_.full_scale;
    t.t0_s = t0_s_;
    t.source = options_.source;
    text_ = std::make_unique<TextDecoder>(std::move(t));
  }
}

StreamFormat StreamDecoder::sniff() const {
  // A frame with a good CRC settles it; a probe decoder finds one.
  FrameDecoder probe(1.0);
  SampleBatch scratch;
  probe.feed(held_, scratch);
  if (probe.counters().frames > 0) return StreamFormat::frames;

  const auto first_nl = std::find(held_.begin(), held_.end(), std::uint8_t{'\n'});
  if (first_nl == held_.end()) return StreamFormat::detect;
  std::size_t lines = 0;
  for (auto it = first_nl + 1; it != held_.end(); ++it) {
    const std::uint8_t c = *it;
    if (c == '\n') {
      if (++lines == kTextLines) return StreamFormat::text;
    } else if (!(c == '\t' || c == '\r' || (c >= 0x20 && c < 0x7F))) {
      return StreamFormat::detect;
    }
  }
  return StreamFormat::detect;
}

void StreamDecoder::feed(std::span<const std::uint8_t> bytes, SampleBatch& out) {
  bytes_ += bytes.size();
  if (format_ == StreamFormat::detect) {
    held_.insert(held_.end(), bytes.begin(), bytes.end());
    const StreamFormat f = sniff();
    if (f == StreamFormat::detect) {
      if (held_.size() >= kDetectBytes) {
        throw InputError(options_.source, 0, 0,
                         fmt::format("cannot tell the stream's format from its first {} bytes "
                                     "(neither a frame with a good CRC nor lines of text): "
                                     "give --format text or --format frames",
                                     held_.size()));
      }
      return;
    }
    choose(f);
    std::vector<std::uint8_t> held = std::move(held_);
    held_.clear();
    bytes = held;
    if (frames_) {
      frames_->feed(bytes, out);
    } else {
      text_->feed(bytes, out);
    }
    return;
  }
  if (frames_) {
    frames_->feed(bytes, out);
  } else {
    text_->feed(bytes, out);
  }
}

void StreamDecoder::finish(SampleBatch& out) {
  if (text_) text_->finish(out);
}

StreamCounters StreamDecoder::counters() const {
  StreamCounters c;
  c.bytes = bytes_;
  if (frames_) c.frames = frames_->counters();
  if (text_) c.text = text_->counters();
  return c;
}

double StreamDecoder::next_t_s() const {
  if (frames_) return frames_->next_t_s();
  if (text_) return text_->next_t_s();
  return t0_s_;
}

}  // namespace benchtau
