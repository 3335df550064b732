// benchtau: a stopped circuit's threshold margin against the family's spread.
#include "src/core/stop_margin.h"

#include <cmath>

namespace benchtau {
namespace {

// The spread of what sets a comparison: the comparator's offset always, and
// an output level's part-to-part spread when that level sets the capacitor's
// targets (output-resistor timing) or the thresholds (feedback from the
// output), as predict_cycle weighs a margin of a circuit that runs.
struct Spread {
  double V = 0.0;
  std::string_view figure;
};

Spread spread_of(const Circuit& c, bool high) {
  const TimerFigures& f = c.v.chip;
  const bool output_sets = c.kind == CircuitKind::astable_output_resistor ||
                           c.control == ControlWiring::feedback_from_output;
  if (!output_sets) return {f.comparator_offset_V, "comparator offset"};
  return high ? Spread{f.comparator_offset_V + f.out_high_drop_spread_V, "output high level"}
              : Spread{f.comparator_offset_V + f.out_low_spread_V, "output low level"};
}

StopMargin within(double short_V, Spread s, std::string_view what) {
  StopMargin m;
  m.short_V = short_V;
  m.what = what;
  if (std::isfinite(short_V) && short_V >= 0.0 && short_V < s.V) {
    m.marginal = true;
    m.deciding_figure = s.figure;
  }
  return m;
}

}  // namespace

StopMargin stop_margin(const Circuit& c, const CyclePrediction& p) {
  if (p.oscillates) return {};
  switch (p.stop) {
    case Stop::charge_short_of_upper:
      return within(-p.high.margin_V, spread_of(c, true),
                    "the charging target falls short of the upper threshold");
    case Stop::discharge_short_of_lower:
      return within(-p.low.margin_V, spread_of(c, false),
                    "the discharging target stays above the lower threshold");
    default:
      return {};
  }
}

}  // namespace benchtau
