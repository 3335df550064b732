// benchtau: a serial stream decoder that is either format, chosen by option or by the first bytes.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "drivers/frame_decoder.h"
#include "drivers/sample_batch.h"
#include "drivers/text_decoder.h"

namespace benchtau {

enum class StreamFormat { detect, text, frames };

const char* format_name(StreamFormat f);  // "detecting", "text", "frames"

struct StreamOptions {
  StreamFormat format = StreamFormat::detect;
  std::optional<double> rate_Hz;  // sample sets per second; frames always need it
  bool timestamps = false;        // text lines begin with a timestamp in microseconds
  std::uint32_t full_scale = 1023;
  std::string source;  // the port, for messages
};

// Everything counted on the way, over both formats.
struct StreamCounters {
  std::uint64_t bytes = 0;
  FrameCounters frames;
  TextCounters text;
};

StreamCounters& operator+=(StreamCounters& a, const StreamCounters& b);

// Format detection, when asked for: the bytes are held back until either a
// frame with a good CRC turns up (frames), or kTextLines complete lines of
// printable ASCII follow the first line break (text; the first line may be
// cut off or hold start-up noise). Nothing else decides. After kDetectBytes
// undecided bytes it throws InputError asking for --format.
class StreamDecoder {
 public:
  static constexpr std::size_t kTextLines = 3;
  static constexpr std::size_t kDetectBytes = 8192;

  // t0_s: the time of the first sample.
  StreamDecoder(StreamOptions options, double t0_s = 0.0);

  // Throws InputError when the format cannot be told, when frames arrive
  // without a rate, or when the text lines have no times.
  void feed(std::span<const std::uint8_t> bytes, SampleBatch& out);

  // The end of the stream: whatever a decoder held back to check comes out.
  void finish(SampleBatch& out);

  StreamFormat format() const { return format_; }
  // Text whose lines begin with timestamps (given or detected).
  bool text_timestamps() const { return text_ && text_->has_timestamps(); }
  // Counters so far (this decoder's stream only).
  StreamCounters counters() const;
  // The time of the next sample, if none is lost.
  double next_t_s() const;

 private:
  void choose(StreamFormat f);
  StreamFormat sniff() const;

  StreamOptions options_;
  double t0_s_;
  StreamFormat format_;
  std::vector<std::uint8_t> held_;
  std::uint64_t bytes_ = 0;
  std::unique_ptr<FrameDecoder> frames_;
  std::unique_ptr<TextDecoder> text_;
};

}  // namespace benchtau
