// benchtau: a preferred value (IEC 60063) for the faulty part that brings the timing back.
#include <fmt/format.h>

#include <cmath>

#include "fit/diagnosis_detail.h"
#include "src/core/engineering.h"
#include "src/core/preferred_values.h"

namespace benchtau::detail {
namespace {

// The series a part of this tolerance is usually bought from (common practice).
ESeries series_for(double tolerance) {
  if (tolerance <= 0.01) return ESeries::e96;
  if (tolerance <= 0.02) return ESeries::e48;
  if (tolerance <= 0.05) return ESeries::e24;
  if (tolerance <= 0.10) return ESeries::e12;
  return ESeries::e6;
}

// The figure the design is timed by: the period, or a monostable's pulse.
double timing_s(const CyclePrediction& p, bool mono) {
  if (!p.oscillates) return NAN;
  return mono ? p.high_s : p.period_s;
}

}  // namespace

std::optional<Replacement> suggest_replacement(const DiagnosisContext& c) {
  const Scored& lead = c.scored.front();
  const Explanation& e = lead.explanation;
  const bool mono = c.design.kind == CircuitKind::monostable;
  const double design_s = timing_s(predict_cycle(nominal_circuit(c.design)), mono);
  if (e.kind == ExplanationKind::cap_leakage) {
    const Part* cap = c.design.part_with(PartRole::timing_cap);
    if (cap == nullptr) return std::nullopt;
    Replacement r;
    r.ref = cap->ref;
    r.series = std::string(series_name(series_for(cap->tolerance)));
    r.exact = r.preferred = cap->value;
    r.design_period_s = r.period_s = design_s;
    r.sentence = fmt::format("replace {} with a new {} part: a leaking capacitor only gets worse",
                             cap->ref, format_eng(cap->value, "F"));
    return r;
  }
  if (e.kind != ExplanationKind::part_off) return std::nullopt;
  const std::size_t i = static_cast<std::size_t>(e.param);
  const FitParameter& f = c.problem.params[i];
  const Part& part = c.design.parts[static_cast<std::size_t>(f.part)];

  // The board as fitted, at the design's supply, with only this part's value changed.
  std::vector<double> x = lead.fit.x;
  for (std::size_t k = 0; k < c.problem.params.size(); ++k) {
    if (c.problem.params[k].slot.value == &CircuitValues::supply_V) {
      x[k] = c.problem.params[k].to_x(c.design.supply_V);
    }
  }
  auto timing_with = [&](double value) {
    x[i] = f.to_x(value);
    return timing_s(predict_cycle(circuit_at(c.problem, 0, x, FaultPath::none, 0.0)), mono);
  };
  // Bisection in ln(value): the timing rises with every timing part's value.
  double lo = std::log(f.nominal / 10.0), hi = std::log(f.nominal * 10.0);
  const double f_lo = timing_with(std::exp(lo)) - design_s;
  const double f_hi = timing_with(std::exp(hi)) - design_s;
  if (!(f_lo * f_hi < 0.0)) return std::nullopt;
  const bool rising = f_hi > 0.0;
  for (int it = 0; it < 80; ++it) {
    const double mid = 0.5 * (lo + hi);
    const double fm = timing_with(std::exp(mid)) - design_s;
    if (!std::isfinite(fm)) return std::nullopt;
    if ((fm > 0.0) == rising) {
      hi = mid;
    } else {
      lo = mid;
    }
  }
  Replacement r;
  r.ref = part.ref;
  const ESeries series = series_for(part.tolerance);
  r.series = std::string(series_name(series));
  r.exact = std::exp(0.5 * (lo + hi));
  r.preferred = nearest_preferred(r.exact, series);
  r.period_s = timing_with(r.preferred);
  r.design_period_s = design_s;
  r.sentence = fmt::format(
      "replacing {} with {} ({}) brings the {} to {} against the design's {} (exactly {} "
      "would match it)",
      part.ref, format_eng(r.preferred, f.unit), r.series, mono ? "pulse" : "period",
      format_eng(r.period_s, "s"), format_eng(design_s, "s"), format_eng(r.exact, f.unit));
  return r;
}

}  // namespace benchtau::detail
