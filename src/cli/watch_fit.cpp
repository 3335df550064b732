// benchtau: the live fit of `watch --design`.
#include "src/cli/watch_fit.h"

#include <fmt/format.h>

#include <exception>

#include "fit/segment_fit.h"
#include "src/core/engineering.h"
#include "src/core/measure.h"

namespace benchtau::cli {

std::vector<std::string> live_fit_lines(const Diagnosis& d) {
  std::vector<std::string> lines;
  if (d.parts.empty()) {
    lines.push_back(fmt::format("  fit         {}: {}", verdict_name(d.verdict), d.reason));
    return lines;
  }
  bool first = true;
  for (const FittedPart& p : d.parts) {
    const char* mark = p.status == PartStatus::low    ? "  LOW"
                       : p.status == PartStatus::high ? "  HIGH"
                                                      : "";
    lines.push_back(fmt::format("  {:<11} {} {} +/- {} (design {}){}", first ? "fit" : "", p.ref,
                                format_eng(p.fitted, p.unit), format_eng(p.sigma, p.unit, 2),
                                format_eng(p.nominal, p.unit), mark));
    first = false;
  }
  lines.push_back(fmt::format("  verdict     {}: {}", verdict_name(d.verdict), d.reason));
  return lines;
}

LiveFit::LiveFit(Design design, NodeRequest nodes, double every_s)
    : design_(std::move(design)), nodes_(std::move(nodes)), every_s_(every_s) {}

void LiveFit::update(const Capture& window, double elapsed_s) {
  if (elapsed_s - last_s_ < every_s_) return;
  last_s_ = elapsed_s;
  try {
    BoardCapture b;
    b.label = "window";
    b.capture = &window;
    b.nodes = map_nodes(window, nodes_);
    b.measurement = measure(window, b.nodes);
    if (b.nodes.cap && b.measurement.summary.cycles > 0) {
      b.segments =
          fit_segments(window.time, window.channels[*b.nodes.cap].values, b.measurement.edges);
    }
    lines_ = live_fit_lines(diagnose(design_, std::span(&b, 1)));
  } catch (const std::exception& e) {
    lines_ = {fmt::format("  fit         not yet: {}", e.what())};
  }
}

}  // namespace benchtau::cli
