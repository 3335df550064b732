// benchtau: cycle-by-cycle measurement of a timer capture, and its summary.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "src/core/capture.h"
#include "src/core/edges.h"
#include "src/core/findings.h"
#include "src/core/nodes.h"
#include "src/core/stats.h"

namespace benchtau {

// One whole cycle: from a rising edge of the output to the next.
// Voltages are NaN when the node was not captured.
struct Cycle {
  double start_s = 0.0;
  double high_s = 0.0;
  double low_s = 0.0;
  double period_s = 0.0;
  double duty = 0.0;        // high_s / period_s
  double cap_max_V = 0.0;   // capacitor node at the end of the high phase (upper turnaround)
  double cap_min_V = 0.0;   // capacitor node at the start of the cycle (lower turnaround)
  double ctl_high_V = 0.0;  // control pin, mean over the high phase
  double ctl_low_V = 0.0;   // control pin, mean over the low phase
  bool startup = false;     // first charge from below the lower threshold after power-up
};

// Period drift over the record: a straight line fitted to period against time.
struct Drift {
  bool known = false;  // needs three or more steady cycles
  double ppm_per_s = 0.0;
  double sigma_ppm_per_s = 0.0;
};

// Statistics over the steady cycles (the start-up cycle is left out).
struct Summary {
  std::size_t cycles = 0;
  Stat period_s, high_s, low_s, duty, cap_max_V, cap_min_V, ctl_V;
  double frequency_Hz = 0.0;  // 1 / mean period
  double jitter_c2c_s = 0.0;  // RMS of successive period differences
  Drift drift;
  double out_low_V = 0.0;  // output levels, NaN when the output was not captured
  double out_high_V = 0.0;
};

struct MeasureOptions {
  EdgeOptions edges;
};

struct Measurement {
  std::string edge_node;      // "out" or "cap": which node the edges came from
  std::vector<Edge> edges;  // every edge found, in time order (after glitch removal)
  std::vector<Cycle> cycles;  // every whole cycle, start-up included (flagged)
  Summary summary;
  Findings findings;
  double min_samples_per_segment = 0.0;
};

// Measures capture with the nodes in map. Needs at least an output or a
// capacitor channel; throws InputError when it has neither.
Measurement measure(const Capture& capture, const NodeMap& map, const MeasureOptions& options = {});

}  // namespace benchtau
