// benchtau: decodes the text lines a hobby board's sketch prints, one sample per line.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "drivers/sample_batch.h"

namespace benchtau {

// How a line's first number is read.
enum class TimestampMode {
  off,    // every number is an ADC count; times come from the rate
  on,     // the first number is a timestamp in microseconds
  detect  // decide from the first lines (see TextDecoder); the rate is then not needed
};

struct TextOptions {
  TimestampMode timestamps = TimestampMode::off;
  std::optional<double> rate_Hz;    // needed unless timestamps are on
  std::uint32_t full_scale = 1023;  // the ADC's largest count, for the detection rule
  double t0_s = 0.0;                // time of the first sample
  std::string source;               // names the port in errors
};

struct TextCounters {
  std::uint64_t sample_lines = 0;
  std::uint64_t skipped_lines = 0;  // banners, debug prints, lines too long or malformed
  std::uint64_t restarts = 0;       // timestamps jumped back: the board began again
  std::uint64_t time_gaps = 0;      // timestamps jumped forward by much more than the usual step
};

// Lines hold unsigned integers separated by commas, spaces or tabs (runs of
// them count as one), ending in LF or CR LF. A line that is not such a list,
// or has another count of numbers than the first sample line, or a count
// above 65535, is skipped and counted.
//
// Timestamp detection (TimestampMode::detect) waits for the first
// kDetectLines sample lines and takes the first column as microseconds when,
// in all of them, it is larger than the ADC's full-scale count (so it cannot
// be a reading) and strictly increases from line to line. Otherwise it throws
// InputError asking for --rate. A sawtooth's counts also rise, which is why
// the size test is there; an explicit --timestamps or --rate is surer.
//
// With timestamps, a line whose time goes back (a restarted board) or jumps
// ahead by more than kGapSteps of the last step (a pause) is held until the
// next line: if that one goes on from it, the restart or pause is real and a
// gap row goes in; if it goes on from the line before, the held line was
// garbled on the way (a dropped digit) and is skipped. So one bad line does
// not shift the rest of the record in time.
class TextDecoder {
 public:
  static constexpr std::size_t kDetectLines = 8;
  static constexpr std::size_t kMaxLineBytes = 256;
  static constexpr double kGapSteps = 10.0;

  explicit TextDecoder(TextOptions options);

  // Decodes the complete lines in bytes; a partial last line waits for the
  // next call. Throws InputError when detection fails.
  void feed(std::span<const std::uint8_t> bytes, SampleBatch& out);

  // The end of the stream (the link went away): a line held back to see
  // whether the next one goes on from it is taken as it stands.
  void finish(SampleBatch& out);

  const TextCounters& counters() const { return counters_; }
  bool has_timestamps() const { return mode_ == TimestampMode::on; }
  // Decided: not waiting for the first lines to choose the timestamp mode.
  bool decided() const { return mode_ != TimestampMode::detect; }
  std::size_t channels() const { return channels_; }
  // The time of the next sample if none is lost (an estimate with timestamps).
  double next_t_s() const;

 private:
  struct Line {
    std::vector<std::uint64_t> numbers;
  };
  enum class Step { next, stood_still, back, jump };
  void line(std::string_view text, SampleBatch& out);
  void sample(const std::vector<std::uint64_t>& numbers, SampleBatch& out);
  Step classify(std::uint64_t raw) const;
  bool continues(std::uint64_t from, std::uint64_t to) const;
  void stamped(const std::vector<std::uint64_t>& numbers, SampleBatch& out);
  void settle(const Line& line, SampleBatch& out);
  void advance(std::uint64_t raw, bool new_step, const std::vector<std::uint64_t>& numbers,
               SampleBatch& out);
  void emit(double t, const std::vector<std::uint64_t>& numbers, SampleBatch& out);
  void skip_line();
  void decide(SampleBatch& out);

  TextOptions options_;
  TimestampMode mode_;
  std::string partial_;
  bool overlong_ = false;     // discarding the rest of a line too long to be a sample
  bool pending_gap_ = false;  // rate mode: a skipped line since the last sample
  std::size_t channels_ = 0;
  std::size_t fields_ = 0;  // numbers per sample line, fixed by the first one
  std::vector<std::uint64_t> numbers_;
  std::vector<Line> held_;       // sample lines held back while detecting
  std::optional<Line> suspect_;  // a timestamp out of line, until the next line confirms it
  bool emitted_ = false;

  // Rate mode: samples so far, gap slots included.
  std::uint64_t index_ = 0;
  // Timestamp mode: the last timestamp (wraps of a 32-bit counter unwrapped)
  // and the time it maps to.
  bool have_time_ = false;
  std::uint64_t last_raw_ = 0;  // as printed
  std::uint64_t last_us_ = 0;   // unwrapped
  std::uint64_t wrap_us_ = 0;
  double base_s_ = 0.0;  // time of timestamp base_us_
  std::uint64_t base_us_ = 0;
  double last_t_s_ = 0.0;
  double step_s_ = 0.0;  // the last step between samples
  TextCounters counters_;
};

}  // namespace benchtau
