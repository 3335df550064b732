// benchtau: the last few seconds of samples, measured as a capture for the live view.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "drivers/adc_scale.h"
#include "drivers/sample_batch.h"
#include "src/core/capture.h"
#include "src/core/measure.h"
#include "src/core/nodes.h"

namespace benchtau {

// What the live view shows of the window.
struct WindowReading {
  std::size_t samples = 0;  // measured, gap rows included
  double span_s = 0.0;      // time from the first row measured to the last
  std::size_t cycles = 0;   // whole steady cycles measured
  double frequency_Hz = 0.0;
  double duty = 0.0;
  double cap_min_V = 0.0;  // capacitor turnarounds (mean over the cycles); NaN when the
  double cap_max_V = 0.0;  // capacitor node is not among the channels
  std::string why;         // when there is no cycle: the first problem found, or the error
};

class LiveWindow {
 public:
  // At most this many of the newest rows are measured, so that a fast
  // stream costs the view a bounded share of a core (2^17 rows measure in
  // about 15 ms on the machine this was written on). At 219 kS/s that is
  // the last 0.6 s; the view shows the span it measured.
  static constexpr std::size_t kMaxRows = std::size_t{1} << 17;

  // Keeps rows no older than span_s before the newest one. nodes chooses the
  // channels as for `benchtau measure` (names "ch1_V"..., columns 2...).
  explicit LiveWindow(double span_s, NodeRequest nodes = {});

  void append(const SampleBatch& batch, const AdcScale& scale);
  void clear();
  std::size_t rows() const { return t_s_.size() - head_; }

  // The newest rows (kMaxRows at most) as a capture: explicit times, NaN in
  // gap rows, channels "ch1_V"... in file columns 2, 3... as in the record.
  // The snapshot is kept and refilled, so that no update allocates afresh.
  const Capture& capture();
  // Measures the window; never throws (a failure goes into why). Which
  // channel is which node is worked out once and kept while it measures.
  WindowReading read();

 private:
  double span_s_;
  NodeRequest nodes_;
  std::size_t channels_ = 0;
  // Rows from head_ on are in the window; the front is dropped in blocks.
  std::vector<double> t_s_;
  std::vector<double> values_;  // channels_ per row
  std::size_t head_ = 0;
  std::optional<NodeMap> map_;
  Capture snapshot_;
};

}  // namespace benchtau
