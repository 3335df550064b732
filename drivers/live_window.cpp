// benchtau: the sliding window behind the live view.
#include "drivers/live_window.h"

#include <fmt/format.h>

#include <cmath>
#include <limits>

#include "src/core/input_error.h"

namespace benchtau {

LiveWindow::LiveWindow(double span_s, NodeRequest nodes)
    : span_s_(span_s), nodes_(std::move(nodes)) {}

void LiveWindow::clear() {
  t_s_.clear();
  values_.clear();
}

void LiveWindow::append(const SampleBatch& batch, const AdcScale& scale) {
  if (batch.rows() == 0) return;
  if (channels_ != batch.channels) {
    clear();
    channels_ = batch.channels;
  }
  const double k = scale.volts_per_count();
  constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
  for (std::size_t i = 0; i < batch.rows(); ++i) {
    t_s_.push_back(batch.t_s[i]);
    if (batch.gap[i]) {
      values_.insert(values_.end(), channels_, kNaN);
    } else {
      for (const std::uint16_t c : batch.row(i)) values_.push_back(c * k);
    }
  }
  const double oldest = t_s_.back() - span_s_;
  while (!t_s_.empty() && t_s_.front() < oldest) {
    t_s_.pop_front();
    values_.erase(values_.begin(), values_.begin() + static_cast<std::ptrdiff_t>(channels_));
  }
}

Capture LiveWindow::capture() const {
  Capture c;
  c.source = "live window";
  c.time_origin = "the stream";
  c.time.t_s.assign(t_s_.begin(), t_s_.end());
  if (t_s_.size() >= 2) {
    c.time.t0_s = t_s_.front();
    c.time.dt_s = (t_s_.back() - t_s_.front()) / static_cast<double>(t_s_.size() - 1);
  }
  const std::size_t rows = t_s_.size();
  c.channels.resize(channels_);
  for (std::size_t k = 0; k < channels_; ++k) {
    Channel& ch = c.channels[k];
    ch.name = fmt::format("ch{}_V", k + 1);
    ch.unit = "V";
    ch.column = k + 2;
    ch.values.resize(rows);
    for (std::size_t i = 0; i < rows; ++i) {
      ch.values[i] = values_[i * channels_ + k];
      if (std::isnan(ch.values[i])) ++ch.missing;
    }
  }
  return c;
}

WindowReading LiveWindow::read() const {
  WindowReading r;
  r.samples = t_s_.size();
  r.span_s = t_s_.size() >= 2 ? t_s_.back() - t_s_.front() : 0.0;
  r.cap_min_V = r.cap_max_V = std::numeric_limits<double>::quiet_NaN();
  if (channels_ == 0 || t_s_.size() < 3) {
    r.why = "waiting for samples";
    return r;
  }
  try {
    const Capture c = capture();
    const NodeMap map = map_nodes(c, nodes_);
    const Measurement m = measure(c, map);
    r.cycles = m.summary.cycles;
    if (r.cycles > 0) {
      r.frequency_Hz = m.summary.frequency_Hz;
      r.duty = m.summary.duty.mean;
      if (map.cap) {
        r.cap_min_V = m.summary.cap_min_V.mean;
        r.cap_max_V = m.summary.cap_max_V.mean;
      }
    }
    for (const Finding& f : m.findings) {
      if (f.severity == Severity::problem) {
        r.why = f.message;
        break;
      }
    }
    if (r.cycles == 0 && r.why.empty()) r.why = "no whole cycle in the window";
  } catch (const InputError& e) {
    r.why = e.message();
  }
  return r;
}

}  // namespace benchtau
