// benchtau: what varies in a design, and its worst-case corners.
#include "src/core/spread.h"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>

#include "src/core/engineering.h"

namespace benchtau {
namespace {

bool takes_vf(PartRole role) { return role == PartRole::diode || role == PartRole::led; }

Variation chip(std::string_view figure, double TimerFigures::*f, double nominal, double a,
               double b) {
  Variation v;
  v.name = std::string("timer ") + std::string(figure);
  v.nominal = nominal;
  v.low = std::min(a, b);
  v.high = std::max(a, b);
  v.chip_field = f;
  return v;
}

bool varies(const Variation& v) { return v.low < v.high; }

void widen(Range& r, double x) {
  if (std::isnan(x)) return;
  if (std::isnan(r.min) || x < r.min) r.min = x;
  if (std::isnan(r.max) || x > r.max) r.max = x;
}

struct CornerRun {
  CornerSpread& out;
  void add(const CyclePrediction& p, bool is_corner) {
    if (is_corner) {
      ++out.corners;
      if (!p.oscillates) ++out.stopped;
    }
    const OutputValues o = outputs_of(p);
    for (std::size_t k = 0; k < kOutputs; ++k) widen(out.range[k], o[k]);
  }
};

}  // namespace

std::vector<Variation> design_variations(const Design& design, bool chip_spread) {
  std::vector<Variation> out;
  for (const PartSlot& slot : part_slots(design)) {
    const Part& p = design.parts[slot.part];
    const double value = takes_vf(p.role) ? p.vf_V : p.value;
    if (!(p.tolerance > 0.0) || !std::isfinite(value)) continue;  // held at its value
    Variation v;
    v.name = p.ref;
    v.nominal = value;
    v.low = value * (1.0 - p.tolerance);
    v.high = value * (1.0 + p.tolerance);
    v.field = slot.field;
    out.push_back(std::move(v));
  }
  if (chip_spread) {
    // Usual part-to-part spreads of the chip's own figures (common practice,
    // from memory of the general shape of timer datasheets): the output levels
    // by the family's own spread figures; the threshold input current from none
    // to two and a half times typical (typically 0.1 uA, 0.25 uA at most on a
    // bipolar part); the trigger current, discharge switch and delay from half
    // to twice typical; the divider's absolute value +/- 20 % (its three
    // resistors match closely, so only its loading by the control pin moves).
    const TimerFigures& f = design.figures;
    out.push_back(chip("out_high_drop_V", &TimerFigures::out_high_drop_V, f.out_high_drop_V,
                       std::max(0.0, f.out_high_drop_V - f.out_high_drop_spread_V),
                       f.out_high_drop_V + f.out_high_drop_spread_V));
    out.push_back(chip("out_low_V", &TimerFigures::out_low_V, f.out_low_V,
                       std::max(0.0, f.out_low_V - f.out_low_spread_V),
                       f.out_low_V + f.out_low_spread_V));
    out.push_back(chip("threshold_current_A", &TimerFigures::threshold_current_A,
                       f.threshold_current_A, 0.0, 2.5 * f.threshold_current_A));
    out.push_back(chip("trigger_current_A", &TimerFigures::trigger_current_A, f.trigger_current_A,
                       0.5 * f.trigger_current_A, 2.0 * f.trigger_current_A));
    out.push_back(chip("discharge_on_ohm", &TimerFigures::discharge_on_ohm, f.discharge_on_ohm,
                       0.5 * f.discharge_on_ohm, 2.0 * f.discharge_on_ohm));
    out.push_back(chip("propagation_delay_s", &TimerFigures::propagation_delay_s,
                       f.propagation_delay_s, 0.5 * f.propagation_delay_s,
                       2.0 * f.propagation_delay_s));
    out.push_back(chip("divider_ohm", &TimerFigures::divider_ohm, f.divider_ohm,
                       0.8 * f.divider_ohm, 1.2 * f.divider_ohm));
    std::erase_if(out, [](const Variation& v) { return v.field == nullptr && !varies(v); });
  }
  return out;
}

std::string_view output_key(Output o) {
  switch (o) {
    case Output::high_s:
      return "high_s";
    case Output::low_s:
      return "low_s";
    case Output::period_s:
      return "period_s";
    case Output::frequency_Hz:
      return "frequency_Hz";
    case Output::duty:
      return "duty";
    case Output::cap_max_V:
      return "cap_max_V";
    case Output::cap_min_V:
      return "cap_min_V";
  }
  return "";
}

OutputValues outputs_of(const CyclePrediction& p) {
  if (!p.oscillates) {
    OutputValues nan;
    nan.fill(std::numeric_limits<double>::quiet_NaN());
    return nan;
  }
  return {p.high_s, p.low_s, p.period_s, p.frequency_Hz, p.duty, p.cap_max_V, p.cap_min_V};
}

CornerSpread corner_spread(const Circuit& nominal, std::span<const Variation> variations) {
  std::vector<const Variation*> vars;
  for (const Variation& v : variations) {
    if (varies(v)) vars.push_back(&v);
  }
  CornerSpread out;
  out.varying = vars.size();
  out.exhaustive = vars.size() <= kMaxExhaustive;
  CornerRun run{out};
  run.add(predict_cycle(nominal), false);
  Circuit c = nominal;
  if (out.exhaustive) {
    // Corner m puts quantity i at its high end when bit i of m is set.
    const std::size_t count = std::size_t{1} << vars.size();
    for (std::size_t m = 0; m < count; ++m) {
      for (std::size_t i = 0; i < vars.size(); ++i) {
        vars[i]->apply(c, ((m >> i) & 1U) != 0 ? vars[i]->high : vars[i]->low);
      }
      run.add(predict_cycle(c), true);
    }
    return out;
  }
  // Sensitivity signs: +1 when raising the quantity raises the output.
  std::vector<OutputValues> sign(vars.size());
  for (std::size_t i = 0; i < vars.size(); ++i) {
    const Variation& v = *vars[i];
    v.apply(c, v.low);
    const CyclePrediction lo = predict_cycle(c);
    v.apply(c, v.high);
    const CyclePrediction hi = predict_cycle(c);
    v.apply(c, v.nominal);
    run.add(lo, false);
    run.add(hi, false);
    const OutputValues a = outputs_of(lo), b = outputs_of(hi);
    for (std::size_t k = 0; k < kOutputs; ++k) {
      const double d = b[k] - a[k];
      sign[i][k] = d > 0.0 ? 1.0 : (d < 0.0 ? -1.0 : 0.0);  // NaN (a side stops): 0
    }
  }
  for (std::size_t k = 0; k < kOutputs; ++k) {
    for (const double direction : {-1.0, 1.0}) {
      for (std::size_t i = 0; i < vars.size(); ++i) {
        const double s = sign[i][k] * direction;
        vars[i]->apply(c, s > 0.0 ? vars[i]->high : (s < 0.0 ? vars[i]->low : vars[i]->nominal));
      }
      run.add(predict_cycle(c), true);
    }
  }
  return out;
}

Findings spread_findings(const CornerSpread& corners, const MonteCarlo& mc) {
  Findings out;
  if (corners.stopped > 0) {
    out.push_back({"corners_stop", Severity::warning,
                   fmt::format("{} of the {} worst-case corners do not oscillate: with every part "
                               "within its tolerance, some boards may not run",
                               corners.stopped, corners.corners)});
  }
  if (mc.stopped > 0) {
    out.push_back({"draws_stop", Severity::warning,
                   fmt::format("{} of {} Monte Carlo draws ({}) do not oscillate", mc.stopped,
                               mc.draws, format_percent(mc.stopped_fraction(), 3))});
  }
  return out;
}

}  // namespace benchtau
