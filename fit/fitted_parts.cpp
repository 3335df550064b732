// benchtau: the design's parts as fitted under the leading explanation, and their status.
#include <algorithm>
#include <cmath>

#include "fit/diagnosis_detail.h"

namespace benchtau::detail {

std::vector<FittedPart> fitted_parts(const DiagnosisContext& c) {
  std::vector<FittedPart> parts;
  const Scored& lead = c.scored.front();
  const CircuitFitResult& fit = lead.fit;
  for (std::size_t i = 0; i < c.problem.params.size(); ++i) {
    const FitParameter& f = c.problem.params[i];
    if (f.part < 0) continue;
    const Part& part = c.design.parts[static_cast<std::size_t>(f.part)];
    FittedPart p;
    p.ref = part.ref;
    p.unit = f.unit;
    p.nominal = f.nominal;
    p.tolerance = part.tolerance;
    const Eigen::Index k = static_cast<Eigen::Index>(i);
    const double var = fit.cov_x(k, k);
    p.fitted = f.to_value(fit.x[i]);
    p.sigma = f.transform == Transform::log ? p.fitted * std::sqrt(var) : std::sqrt(var);
    p.deviation = p.fitted / p.nominal - 1.0;
    const double w = lead.explanation.spec.priors[i].sigma;
    p.data_share = std::clamp(1.0 - var / (w * w), 0.0, 1.0);
    if (f.slot.is_vf || !(part.tolerance > 0.0)) {
      p.status = PartStatus::undetermined;
      if (std::fabs(p.fitted - p.nominal) <= 2.0 * f.prior.sigma) p.status = PartStatus::in_spec;
    } else {
      const double lo = p.nominal * (1.0 - part.tolerance);
      const double hi = p.nominal * (1.0 + part.tolerance);
      if (p.fitted >= lo && p.fitted <= hi) {
        p.status = PartStatus::in_spec;
      } else if (p.fitted + 2.0 * p.sigma < lo) {
        p.status = PartStatus::low;
      } else if (p.fitted - 2.0 * p.sigma > hi) {
        p.status = PartStatus::high;
      } else {
        p.status = PartStatus::undetermined;  // outside its band, but not by two sigma
      }
    }
    parts.push_back(std::move(p));
  }
  return parts;
}

std::vector<FittedPart> fitted_figures(const DiagnosisContext& c) {
  std::vector<FittedPart> out;
  const Scored& lead = c.scored.front();
  for (std::size_t i = 0; i < c.problem.params.size(); ++i) {
    const FitParameter& f = c.problem.params[i];
    if (f.part >= 0) continue;
    FittedPart p;
    p.ref = f.id;
    p.unit = f.unit;
    p.nominal = f.nominal;
    const Eigen::Index k = static_cast<Eigen::Index>(i);
    const double var = lead.fit.cov_x(k, k);
    p.fitted = f.to_value(lead.fit.x[i]);
    p.sigma = f.transform == Transform::log ? p.fitted * std::sqrt(var) : std::sqrt(var);
    p.deviation = p.nominal != 0.0 ? p.fitted / p.nominal - 1.0 : NAN;
    const double w = lead.explanation.spec.priors[i].sigma;
    p.data_share = std::clamp(1.0 - var / (w * w), 0.0, 1.0);
    p.status = std::fabs(lead.fit.x[i] - f.prior.mean) <= 2.0 * f.prior.sigma
                   ? PartStatus::in_spec
                   : PartStatus::undetermined;
    out.push_back(std::move(p));
  }
  return out;
}

}  // namespace benchtau::detail
