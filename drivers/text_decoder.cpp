// benchtau: the text line decoder: split lines, parse the numbers, place each sample in time,
// and skip (and count) whatever is not a sample line.
#include "drivers/text_decoder.h"

#include <fmt/format.h>

#include <cstring>

#include "drivers/frame_layout.h"
#include "src/core/input_error.h"

namespace benchtau {
namespace {

constexpr std::uint64_t kMaxCount = 65535;
// A free-running 32-bit microsecond counter wraps after about 71.6 minutes;
// a step from within 2^26 us (67 s) of the top to within 2^26 us of zero is
// that wrap, anything else going back is a restart.
constexpr std::uint64_t kWrap32 = std::uint64_t{1} << 32;
constexpr std::uint64_t kNearWrap = std::uint64_t{1} << 26;
// A step this many times the last one means samples are missing.
constexpr double kGapSteps = 10.0;

bool is_separator(char c) { return c == ',' || c == ' ' || c == '\t'; }

// Unsigned integers separated by runs of separators; false when anything else is there.
bool parse_numbers(std::string_view s, std::vector<std::uint64_t>& out) {
  out.clear();
  std::size_t i = 0;
  const std::size_t n = s.size();
  while (true) {
    while (i < n && is_separator(s[i])) ++i;
    if (i == n) return true;
    std::uint64_t v = 0;
    std::size_t digits = 0;
    while (i < n && s[i] >= '0' && s[i] <= '9') {
      if (++digits > 19) return false;  // would not fit in 64 bits
      v = v * 10 + static_cast<std::uint64_t>(s[i] - '0');
      ++i;
    }
    if (digits == 0) return false;
    if (i < n && !is_separator(s[i])) return false;
    out.push_back(v);
  }
}

}  // namespace

TextDecoder::TextDecoder(TextOptions options)
    : options_(std::move(options)), mode_(options_.timestamps) {}

double TextDecoder::next_t_s() const {
  if (mode_ == TimestampMode::on) return have_time_ ? last_t_s_ + step_s_ : options_.t0_s;
  if (!options_.rate_Hz) return options_.t0_s;
  return options_.t0_s + static_cast<double>(index_) / *options_.rate_Hz;
}

void TextDecoder::feed(std::span<const std::uint8_t> bytes, SampleBatch& out) {
  const char* p = reinterpret_cast<const char*>(bytes.data());
  std::size_t i = 0;
  const std::size_t n = bytes.size();
  while (i < n) {
    const auto* nl = static_cast<const char*>(std::memchr(p + i, '\n', n - i));
    const std::size_t len = nl ? static_cast<std::size_t>(nl - (p + i)) : n - i;
    if (!nl) {
      // Keep the partial line, unless it is already too long to be a sample.
      if (!overlong_) {
        partial_.append(p + i, len);
        if (partial_.size() > kMaxLineBytes) {
          overlong_ = true;
          partial_.clear();
        }
      }
      return;
    }
    if (overlong_) {
      overlong_ = false;
      skip_line();
    } else if (!partial_.empty()) {
      partial_.append(p + i, len);
      if (partial_.size() > kMaxLineBytes) {
        skip_line();
      } else {
        line(partial_, out);
      }
      partial_.clear();
    } else if (len > kMaxLineBytes) {
      skip_line();
    } else {
      line({p + i, len}, out);
    }
    i += len + 1;
  }
}

void TextDecoder::skip_line() {
  ++counters_.skipped_lines;
  // Without timestamps a skipped line may be a restarted board's banner: the
  // samples around it cannot be shown to be continuous, so a gap row goes in.
  if (mode_ == TimestampMode::off && index_ > 0) pending_gap_ = true;
}

void TextDecoder::line(std::string_view text, SampleBatch& out) {
  if (!text.empty() && text.back() == '\r') text.remove_suffix(1);
  if (!parse_numbers(text, numbers_)) {
    skip_line();
    return;
  }
  if (numbers_.empty()) return;  // a blank line says nothing
  // With timestamps on, the first number is a time; while detecting it may be.
  const std::size_t min_fields = mode_ == TimestampMode::on ? 2 : 1;
  const std::size_t max_fields = frame::kMaxChannels + (mode_ == TimestampMode::off ? 0 : 1);
  bool ok = numbers_.size() >= min_fields && numbers_.size() <= max_fields &&
            (fields_ == 0 || numbers_.size() == fields_);
  for (std::size_t k = mode_ == TimestampMode::off ? 0 : 1; ok && k < numbers_.size(); ++k) {
    ok = numbers_[k] <= kMaxCount;
  }
  if (!ok) {
    skip_line();
    return;
  }
  if (fields_ == 0) fields_ = numbers_.size();
  if (mode_ == TimestampMode::detect) {
    held_.push_back({numbers_});
    if (held_.size() == kDetectLines) decide(out);
    return;
  }
  sample(numbers_, out);
}

void TextDecoder::decide(SampleBatch& out) {
  bool stamps = fields_ >= 2;
  for (std::size_t k = 0; stamps && k < held_.size(); ++k) {
    stamps = held_[k].numbers[0] > options_.full_scale &&
             (k == 0 || held_[k].numbers[0] > held_[k - 1].numbers[0]);
  }
  if (!stamps) {
    throw InputError(options_.source, 0, 0,
                     "the text lines' first column is not a rising count of microseconds, so "
                     "the samples have no times: give --rate, or --timestamps if the first "
                     "column is a timestamp after all");
  }
  mode_ = TimestampMode::on;
  std::vector<Line> held = std::move(held_);
  held_.clear();
  for (const Line& l : held) sample(l.numbers, out);
}

void TextDecoder::sample(const std::vector<std::uint64_t>& numbers, SampleBatch& out) {
  const std::size_t first = mode_ == TimestampMode::on ? 1 : 0;
  const std::size_t channels = numbers.size() - first;
  if (channels_ == 0) channels_ = channels;
  if (out.channels == 0) out.channels = channels_;
  if (out.channels != channels) {
    // Another stream's layout is in the record already.
    skip_line();
    return;
  }
  double t = 0.0;
  if (mode_ == TimestampMode::off) {
    if (pending_gap_) {
      out.add_gap(next_t_s());
      ++index_;
      pending_gap_ = false;
    }
    t = next_t_s();
    ++index_;
  } else {
    const std::uint64_t raw = numbers[0];
    if (!have_time_) {
      base_us_ = raw;
      base_s_ = options_.t0_s;
      have_time_ = true;
    } else if (raw == last_raw_) {
      // Time stood still: not a sample line of this stream.
      skip_line();
      return;
    } else if (raw < last_raw_ &&
               !(last_raw_ >= kWrap32 - kNearWrap && last_raw_ < kWrap32 && raw < kNearWrap)) {
      // The board began again: its clock restarted. One gap row, then a new time base.
      ++counters_.restarts;
      // Before a second sample there is no step yet; 1 us keeps the times rising.
      const double step = step_s_ > 0.0 ? step_s_ : 1e-6;
      const double gap_t = last_t_s_ + step;
      out.add_gap(gap_t);
      base_us_ = raw;
      wrap_us_ = 0;
      base_s_ = gap_t + step;
    } else {
      if (raw < last_raw_) wrap_us_ += kWrap32;
      const std::uint64_t us = raw + wrap_us_;
      const double dt = static_cast<double>(us - last_us_) / 1e6;
      if (step_s_ > 0.0 && dt > kGapSteps * step_s_) {
        ++counters_.time_gaps;
        out.add_gap(last_t_s_ + step_s_);
      } else {
        step_s_ = dt;
      }
    }
    last_raw_ = raw;
    last_us_ = raw + wrap_us_;
    t = base_s_ + static_cast<double>(last_us_ - base_us_) / 1e6;
  }
  last_t_s_ = t;
  ++counters_.sample_lines;
  out.t_s.push_back(t);
  for (std::size_t k = first; k < numbers.size(); ++k) {
    out.counts.push_back(static_cast<std::uint16_t>(numbers[k]));
  }
  out.gap.push_back(0);
}

}  // namespace benchtau
