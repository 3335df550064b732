// benchtau: the sliding window behind the live view.
#include "drivers/live_window.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <limits>

#include "src/core/input_error.h"

namespace benchtau {

LiveWindow::LiveWindow(double span_s, NodeRequest nodes)
    : span_s_(span_s), nodes_(std::move(nodes)) {}

void LiveWindow::clear() {
  t_s_.clear();
  values_.clear();
  head_ = 0;
}

void LiveWindow::append(const SampleBatch& batch, const AdcScale& scale) {
  if (batch.rows() == 0) return;
  if (channels_ != batch.channels) {
    clear();
    channels_ = batch.channels;
    map_.reset();
  }
  const double k = scale.volts_per_count();
  constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  t_s_.insert(t_s_.end(), batch.t_s.begin(), batch.t_s.end());
  values_.reserve(values_.size() + batch.counts.size());
  for (std::size_t i = 0; i < batch.rows(); ++i) {
    if (batch.gap[i]) {
      values_.insert(values_.end(), channels_, kNaN);
    } else {
      for (const std::uint16_t c : batch.row(i)) values_.push_back(c * k);
    }
  }
  const double oldest = t_s_.back() - span_s_;
  head_ = static_cast<std::size_t>(
      std::lower_bound(t_s_.begin() + static_cast<std::ptrdiff_t>(head_), t_s_.end(), oldest) -
      t_s_.begin());
  // Drop the front once it is most of the storage: amortised, no per-row shuffling.
  if (head_ > 4096 && head_ > t_s_.size() / 2) {
    t_s_.erase(t_s_.begin(), t_s_.begin() + static_cast<std::ptrdiff_t>(head_));
    values_.erase(values_.begin(),
                  values_.begin() + static_cast<std::ptrdiff_t>(head_ * channels_));
    head_ = 0;
  }
}

const Capture& LiveWindow::capture() {
  Capture& c = snapshot_;
  c.source = "live window";
  c.time_origin = "the stream";
  const std::size_t rows = std::min(this->rows(), kMaxRows);
  const std::size_t first = t_s_.size() - rows;
  c.time.t_s.assign(t_s_.begin() + static_cast<std::ptrdiff_t>(first), t_s_.end());
  if (rows >= 2) {
    c.time.t0_s = c.time.t_s.front();
    c.time.dt_s = (c.time.t_s.back() - c.time.t_s.front()) / static_cast<double>(rows - 1);
  }
  c.channels.resize(channels_);
  for (std::size_t k = 0; k < channels_; ++k) {
    Channel& ch = c.channels[k];
    ch.name = fmt::format("ch{}_V", k + 1);
    ch.unit = "V";
    ch.column = k + 2;
    ch.values.resize(rows);
    ch.missing = 0;
    const double* src = values_.data() + first * channels_ + k;
    for (std::size_t i = 0; i < rows; ++i) {
      ch.values[i] = src[i * channels_];
      if (std::isnan(ch.values[i])) ++ch.missing;
    }
  }
  return c;
}

WindowReading LiveWindow::read() {
  WindowReading r;
  r.cap_min_V = r.cap_max_V = std::numeric_limits<double>::quiet_NaN();
  if (channels_ == 0 || rows() < 3) {
    r.samples = rows();
    r.why = "waiting for samples";
    return r;
  }
  try {
    const Capture& c = capture();
    r.samples = c.samples();
    r.span_s = c.time.t_s.back() - c.time.t_s.front();
    // Guessing the nodes from the shapes costs as much as measuring: keep a
    // guess that measures, guess again when it does not.
    if (!map_) map_ = map_nodes(c, nodes_);
    const Measurement m = measure(c, *map_);
    r.cycles = m.summary.cycles;
    if (r.cycles > 0) {
      r.frequency_Hz = m.summary.frequency_Hz;
      r.duty = m.summary.duty.mean;
      if (map_->cap) {
        r.cap_min_V = m.summary.cap_min_V.mean;
        r.cap_max_V = m.summary.cap_max_V.mean;
      }
    } else {
      map_.reset();
    }
    for (const Finding& f : m.findings) {
      if (f.severity == Severity::problem) {
        r.why = f.message;
        break;
      }
    }
    if (r.cycles == 0 && r.why.empty()) r.why = "no whole cycle in the window";
  } catch (const InputError& e) {
    map_.reset();
    r.why = e.message();
  }
  return r;
}

}  // namespace benchtau
