// benchtau: `watch --design`: the window fitted to the design about once a second, as lines
// for the live view.
#pragma once

#include <string>
#include <vector>

#include "fit/diagnosis.h"
#include "src/core/capture.h"
#include "src/core/design.h"
#include "src/core/nodes.h"

namespace benchtau::cli {

// The view's lines for one diagnosis: each part's fitted value with its sigma and an
// out-of-spec mark, then the leading suspect.
std::vector<std::string> live_fit_lines(const Diagnosis& d);

class LiveFit {
 public:
  LiveFit(Design design, NodeRequest nodes, double every_s = 1.0);

  // Fits the window's capture when a fit is due (every_s since the last); never throws (a
  // failure becomes the line shown).
  void update(const Capture& window, double elapsed_s);
  const std::vector<std::string>& lines() const { return lines_; }

 private:
  Design design_;
  NodeRequest nodes_;
  double every_s_;
  double last_s_ = -1e300;
  std::vector<std::string> lines_;
};

}  // namespace benchtau::cli
