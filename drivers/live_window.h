// benchtau: the last few seconds of samples, measured as a capture for the live view.
#pragma once

#include <cstddef>
#include <deque>
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
  std::size_t samples = 0;  // in the window, gap rows included
  double span_s = 0.0;      // time from the window's first row to its last
  std::size_t cycles = 0;   // whole steady cycles measured
  double frequency_Hz = 0.0;
  double duty = 0.0;
  double cap_min_V = 0.0;  // capacitor turnarounds (mean over the cycles); NaN when the
  double cap_max_V = 0.0;  // capacitor node is not among the channels
  std::string why;         // when there is no cycle: the first problem found, or the error
};

class LiveWindow {
 public:
  // Keeps rows no older than span_s before the newest one. nodes chooses the
  // channels as for `benchtau measure` (names "ch1_V"..., columns 2...).
  LiveWindow(double span_s, NodeRequest nodes = {});

  void append(const SampleBatch& batch, const AdcScale& scale);
  void clear();

  // The window as a capture: explicit times, NaN in gap rows, channels
  // "ch1_V"... in file columns 2, 3... as in the record.
  Capture capture() const;
  // Measures the window; never throws (a failure goes into why).
  WindowReading read() const;

 private:
  double span_s_;
  NodeRequest nodes_;
  std::size_t channels_ = 0;
  std::deque<double> t_s_;
  std::deque<double> values_;  // channels_ per row
};

}  // namespace benchtau
