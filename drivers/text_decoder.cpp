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
  if (mode_ == TimestampMode::on) {
    stamped(numbers, out);
    return;
  }
  if (pending_gap_) {
    out.add_gap(next_t_s());
    ++index_;
    pending_gap_ = false;
  }
  const double t = next_t_s();
  ++index_;
  emit(t, numbers, out);
}

TextDecoder::Step TextDecoder::classify(std::uint64_t raw) const {
  if (raw == last_raw_) return Step::stood_still;
  if (raw < last_raw_) {
    const bool wrap = last_raw_ >= kWrap32 - kNearWrap && last_raw_ < kWrap32 && raw < kNearWrap;
    if (!wrap) return Step::back;
  }
  const std::uint64_t us = raw < last_raw_ ? raw + kWrap32 - last_raw_ : raw - last_raw_;
  if (step_s_ > 0.0 && static_cast<double>(us) / 1e6 > TextDecoder::kGapSteps * step_s_)
    return Step::jump;
  return Step::next;
}

bool TextDecoder::continues(std::uint64_t from, std::uint64_t to) const {
  return to > from && (step_s_ <= 0.0 ||
                       static_cast<double>(to - from) / 1e6 <= TextDecoder::kGapSteps * step_s_);
}

void TextDecoder::stamped(const std::vector<std::uint64_t>& numbers, SampleBatch& out) {
  const std::uint64_t raw = numbers[0];
  if (!have_time_) {
    have_time_ = true;
    base_us_ = last_us_ = last_raw_ = raw;
    base_s_ = options_.t0_s;
    emit(base_s_, numbers, out);
    return;
  }
  const Step step = classify(raw);
  if (step == Step::stood_still) {
    skip_line();  // time stood still: not a sample line of this stream
    return;
  }
  if (step == Step::next) {
    // A held line that this one does not continue from was garbled.
    if (suspect_) {
      suspect_.reset();
      skip_line();
    }
    advance(raw, true, numbers, out);
    return;
  }
  // Back, or far ahead: a restart or a pause, or a garbled number. Believed
  // only when the next line goes on from it.
  if (suspect_ && continues(suspect_->numbers[0], raw)) {
    const Line held = std::move(*suspect_);
    suspect_.reset();
    settle(held, out);
    stamped(numbers, out);
    return;
  }
  if (suspect_) skip_line();
  suspect_ = Line{numbers};
}

void TextDecoder::settle(const Line& line, SampleBatch& out) {
  const std::uint64_t raw = line.numbers[0];
  // Before a second sample there is no step yet; 1 us keeps the times rising.
  const double step = step_s_ > 0.0 ? step_s_ : 1e-6;
  const double gap_t = last_t_s_ + step;
  if (!(gap_t > last_t_s_) || !(gap_t + step > gap_t)) {
    skip_line();  // so far from zero that a step is lost in rounding
    return;
  }
  if (classify(raw) == Step::back) {
    // The board began again: its clock restarted. One gap row, then a new time base.
    ++counters_.restarts;
    out.add_gap(gap_t);
    base_us_ = last_us_ = last_raw_ = raw;
    wrap_us_ = 0;
    base_s_ = gap_t + step;
    emit(base_s_, line.numbers, out);
  } else {
    ++counters_.time_gaps;
    out.add_gap(gap_t);
    advance(raw, false, line.numbers, out);
  }
}

void TextDecoder::advance(std::uint64_t raw, bool new_step,
                          const std::vector<std::uint64_t>& numbers, SampleBatch& out) {
  if (raw < last_raw_) wrap_us_ += kWrap32;
  const std::uint64_t us = raw + wrap_us_;
  if (new_step) step_s_ = static_cast<double>(us - last_us_) / 1e6;
  last_raw_ = raw;
  last_us_ = us;
  emit(base_s_ + static_cast<double>(us - base_us_) / 1e6, numbers, out);
}

void TextDecoder::emit(double t, const std::vector<std::uint64_t>& numbers, SampleBatch& out) {
  // Times must rise for the record to be read back; far from zero a double
  // cannot hold a microsecond step, and such a line is dropped.
  if (!out.t_s.empty() ? !(t > out.t_s.back()) : (emitted_ && !(t > last_t_s_))) {
    skip_line();
    return;
  }
  emitted_ = true;
  last_t_s_ = t;
  ++counters_.sample_lines;
  out.t_s.push_back(t);
  const std::size_t first = mode_ == TimestampMode::on ? 1 : 0;
  for (std::size_t k = first; k < numbers.size(); ++k) {
    out.counts.push_back(static_cast<std::uint16_t>(numbers[k]));
  }
  out.gap.push_back(0);
}

void TextDecoder::finish(SampleBatch& out) {
  if (!suspect_) return;
  const Line held = std::move(*suspect_);
  suspect_.reset();
  settle(held, out);
}

}  // namespace benchtau
