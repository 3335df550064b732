// benchtau: the diagnosis in words: each suspect's sentence, what the data fixes, what to
// measure next.
#include <fmt/format.h>

#include <Eigen/LU>
#include <cmath>

#include "fit/diagnosis_detail.h"
#include "src/core/engineering.h"

namespace benchtau::detail {
namespace {

const FitParameter* param_for(const DiagnosisContext& c, PartRole role, std::size_t& index) {
  for (std::size_t i = 0; i < c.problem.params.size(); ++i) {
    const FitParameter& f = c.problem.params[i];
    if (f.part >= 0 && c.design.parts[static_cast<std::size_t>(f.part)].role == role) {
      index = i;
      return &f;
    }
  }
  return nullptr;
}

const Part* part_of(const DiagnosisContext& c, const Explanation& e) {
  if (e.param < 0) return nullptr;
  const FitParameter& f = c.problem.params[static_cast<std::size_t>(e.param)];
  return &c.design.parts[static_cast<std::size_t>(f.part)];
}

std::string against(const Part& p) {
  return fmt::format("{} +/- {}", format_eng(p.value, p.role == PartRole::timing_cap ? "F" : "ohm"),
                     format_percent(p.tolerance, 0));
}

std::string with_sigma(double v, double sigma, const std::string& unit) {
  return fmt::format("{} +/- {}", format_eng(v, unit), format_eng(sigma, unit, 2));
}

Suspect suspect_of(const DiagnosisContext& c, const Scored& s) {
  Suspect out;
  out.ref = s.explanation.ref;
  out.probability = s.probability;
  const Explanation& e = s.explanation;
  if (e.kind == ExplanationKind::part_off) {
    const std::size_t i = static_cast<std::size_t>(e.param);
    const FitParameter& f = c.problem.params[i];
    const Part& p = *part_of(c, e);
    const Eigen::Index k = static_cast<Eigen::Index>(i);
    out.fitted = f.to_value(s.fit.x[i]);
    out.sigma = out.fitted * std::sqrt(s.fit.cov_x(k, k));
    out.unit = f.unit;
    const double dev = out.fitted / f.nominal - 1.0;
    out.kind = dev < 0.0 ? SuspectKind::value_low : SuspectKind::value_high;
    const std::string value = with_sigma(out.fitted, out.sigma, out.unit);
    const bool cap = p.role == PartRole::timing_cap;
    if (std::fabs(dev) < 0.005 || (p.tolerance > 0.0 && std::fabs(dev) <= p.tolerance)) {
      out.sentence = fmt::format(
          "{} at {} would explain the capture this way, within its "
          "tolerance ({})",
          p.ref, value, against(p));
    } else if (cap && dev < 0.0) {
      out.sentence = fmt::format("{} has lost about {} of its capacitance ({} against {})", p.ref,
                                 format_percent(-dev, 0), value, against(p));
    } else if (cap) {
      out.sentence = fmt::format("{} is about {} above its marked value ({} against {})", p.ref,
                                 format_percent(dev, 0), value, against(p));
    } else {
      out.sentence = fmt::format("{} has drifted {} about {} ({} against {})", p.ref,
                                 dev < 0.0 ? "down" : "up", format_percent(std::fabs(dev), 0),
                                 value, against(p));
    }
  } else if (e.kind == ExplanationKind::cap_leakage) {
    out.kind = SuspectKind::leakage;
    out.unit = "ohm";
    out.fitted = 1.0 / s.fault.median_S;
    out.sigma = out.fitted * s.fault.log_sigma;
    const double v_upper = s.fit.cycles.empty() ? NAN : s.fit.cycles.front().cap_max_V;
    const std::string cap = e.ref.substr(0, e.ref.size() - std::string_view("-leakage").size());
    out.sentence = fmt::format("{} is leaking about {} at the upper threshold, as {} across it",
                               cap, format_eng(v_upper / out.fitted, "A", 2),
                               with_sigma(out.fitted, out.sigma, "ohm"));
  } else if (e.kind == ExplanationKind::control_load) {
    out.kind = SuspectKind::unexpected_load;
    out.unit = "ohm";
    out.fitted = 1.0 / s.fault.median_S;
    out.sigma = out.fitted * s.fault.log_sigma;
    const CyclePrediction* p = s.fit.cycles.empty() ? nullptr : &s.fit.cycles.front();
    out.sentence = fmt::format(
        "something loads the control pin with about {} to ground (a leaky decoupling "
        "capacitor, or flux), pulling the thresholds to {} and {}",
        with_sigma(out.fitted, out.sigma, "ohm"), format_eng(p ? p->cap_max_V : NAN, "V"),
        format_eng(p ? 0.5 * p->ctl_low_V : NAN, "V"));
  }
  return out;
}

// The evidence between two explanations without their prior weights: what the captures say,
// through each explanation's fit and the tolerances it must strain to get there.
double evidence_log_ratio(const Scored& a, const Scored& b) {
  return a.log_evidence - b.log_evidence;
}

// Below a ratio of 3 the captures do not decide between them: the weights do.
bool ranked_by_weights(const Scored& a, const Scored& b) {
  return evidence_log_ratio(a, b) < std::log(3.0);
}

}  // namespace

std::vector<Suspect> describe_suspects(const DiagnosisContext& c) {
  std::vector<Suspect> out;
  for (std::size_t i = 0; i < c.scored.size(); ++i) {
    const Scored& s = c.scored[i];
    if (!s.ok || s.explanation.kind == ExplanationKind::all_in_tolerance) continue;
    Suspect sp = suspect_of(c, s);
    // Its lead over the next comes from the priors when the evidence alone gives it less
    // than 3 to 1.
    if (i + 1 < c.scored.size() && c.scored[i + 1].ok) {
      sp.ranked_by_prior = ranked_by_weights(s, c.scored[i + 1]);
    }
    out.push_back(std::move(sp));
  }
  return out;
}

void describe_identifiability(const DiagnosisContext& c, std::vector<std::string>& fixed,
                              std::vector<std::string>& unseparated) {
  const Scored& lead = c.scored.front();
  const CircuitFitResult& fit = lead.fit;
  const std::size_t n = c.problem.params.size();
  // A combination g of ln values: its posterior and prior variances.
  auto variances = [&](const Eigen::VectorXd& g, double& post, double& prior) {
    post = g.dot(fit.cov_x * g);
    prior = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
      const double w = lead.explanation.spec.priors[i].sigma;
      prior += g(static_cast<Eigen::Index>(i)) * g(static_cast<Eigen::Index>(i)) * w * w;
    }
  };
  std::size_t iu = 0, il = 0, ir = 0, ic = 0;
  const bool has_c = param_for(c, PartRole::timing_cap, ic) != nullptr;
  if (!has_c) return;
  const std::string cref = c.design.part_with(PartRole::timing_cap)->ref;
  struct Combo {
    std::string words;
    Eigen::VectorXd g;
  };
  std::vector<Combo> combos;
  Eigen::VectorXd apart = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(n));
  std::string resistors;
  auto ref = [&](std::size_t i) {
    return c.design.parts[static_cast<std::size_t>(c.problem.params[i].part)].ref;
  };
  auto value = [&](std::size_t i) { return std::exp(fit.x[i]); };
  const Eigen::Index kc = static_cast<Eigen::Index>(ic);
  if (param_for(c, PartRole::upper, iu) && param_for(c, PartRole::lower, il)) {
    const Eigen::Index ku = static_cast<Eigen::Index>(iu), kl = static_cast<Eigen::Index>(il);
    const double r1 = value(iu), r2 = value(il);
    Eigen::VectorXd g = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(n));
    const bool diode = c.design.kind == CircuitKind::astable_diode_steered;
    if (diode) {
      g(ku) = 1.0;
      g(kc) = 1.0;
      combos.push_back({fmt::format("{}*{} (the charging time constant)", ref(iu), cref), g});
    } else {
      g(ku) = r1 / (r1 + r2);
      g(kl) = r2 / (r1 + r2);
      g(kc) = 1.0;
      combos.push_back(
          {fmt::format("({} + {})*{} (the charging time constant)", ref(iu), ref(il), cref), g});
    }
    g.setZero();
    g(kl) = 1.0;
    g(kc) = 1.0;
    combos.push_back({fmt::format("{}*{} (the discharging time constant)", ref(il), cref), g});
    g.setZero();
    g(ku) = 1.0;
    g(kl) = -1.0;
    combos.push_back({fmt::format("{}/{} (and so the duty cycle)", ref(iu), ref(il)), g});
    apart(ku) = apart(kl) = 1.0;
    resistors = fmt::format("{} and {}", ref(iu), ref(il));
  } else if (param_for(c, PartRole::timing_res, ir)) {
    const Eigen::Index kr = static_cast<Eigen::Index>(ir);
    Eigen::VectorXd g = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(n));
    g(kr) = 1.0;
    g(kc) = 1.0;
    combos.push_back({fmt::format("{}*{} (the time constant)", ref(ir), cref), g});
    apart(kr) = 1.0;
    resistors = ref(ir);
  } else {
    return;
  }
  apart(kc) = -1.0;
  for (const Combo& k : combos) {
    double post = 0.0, prior = 0.0;
    variances(k.g, post, prior);
    if (post < 0.25 * prior) {
      fixed.push_back(fmt::format("the capture fixes {} to +/- {}", k.words,
                                  format_percent(std::sqrt(post), 2)));
    }
  }
  // Apart: what the captures alone say along that direction, the posterior's information
  // less the priors', against what the design's tolerances alone say.
  const Eigen::MatrixXd info = fit.cov_x.inverse();
  double data_info = apart.dot(info * apart), design_info = 0.0;
  for (std::size_t i = 0; i < n; ++i) {
    const double a2 = apart(static_cast<Eigen::Index>(i)) * apart(static_cast<Eigen::Index>(i));
    data_info -= a2 / std::pow(lead.explanation.spec.priors[i].sigma, 2);
    design_info += a2 / std::pow(c.problem.params[i].prior.sigma, 2);
  }
  if (data_info < 0.1 * design_info) {
    unseparated.push_back(fmt::format(
        "the timing cannot tell {} from {} apart: raising the resistance and lowering the "
        "capacitance by the same factor leaves it unchanged, so their split comes from the "
        "tolerances, not from the capture",
        resistors, cref));
  }
  // A close call between the two leading explanations.
  if (c.scored.size() > 1 && c.scored[1].ok && c.scored[1].probability > 0.0 &&
      c.scored[1].probability >= DiagnoseOptions{}.close_ratio * lead.probability) {
    auto name = [&](const Scored& s) {
      return s.explanation.kind == ExplanationKind::all_in_tolerance
                 ? std::string("all parts in tolerance")
                 : s.explanation.ref;
    };
    const bool by_prior = ranked_by_weights(lead, c.scored[1]);
    unseparated.push_back(fmt::format(
        "{} ({}) and {} ({}) both explain the capture{}", name(lead),
        format_percent(lead.probability, 0), name(c.scored[1]),
        format_percent(c.scored[1].probability, 0),
        by_prior ? "; the ranking between them comes from the priors (how often each fails), "
                   "not from the data"
                 : ""));
  }
}

std::vector<std::string> suggest_measurements(const DiagnosisContext& c) {
  std::vector<std::string> out;
  const Scored& lead = c.scored.front();
  if (c.scored.size() < 2 || !c.scored[1].ok ||
      c.scored[1].probability < DiagnoseOptions{}.close_ratio * lead.probability) {
    return out;
  }
  for (const Scored* s : {&lead, &c.scored[1]}) {
    const Explanation& e = s->explanation;
    if (e.kind == ExplanationKind::part_off) {
      const Part& p = *part_of(c, e);
      const std::size_t i = static_cast<std::size_t>(e.param);
      const double v = c.problem.params[i].to_value(s->fit.x[i]);
      if (p.role == PartRole::timing_cap) {
        out.push_back(fmt::format(
            "measure {} out of circuit with a capacitance meter, after discharging it: it "
            "should read {}; about {} if it is the fault",
            p.ref, format_eng(p.value, "F"), format_eng(v, "F")));
      } else {
        out.push_back(fmt::format(
            "measure {} with the power off (lift one end if it reads low: other paths load "
            "it in circuit): it should read {}; about {} if it is the fault",
            p.ref, format_eng(p.value, "ohm"), format_eng(v, "ohm")));
      }
    } else if (e.kind == ExplanationKind::cap_leakage) {
      out.push_back(
          c.cap_captured
              ? std::string("measure the capacitor's leakage current out of circuit at the "
                            "board's supply voltage, and clean the board around it")
              : std::string("capture the capacitor node as well: a leakage lowers the "
                            "charging curve's final value, lost capacitance does not"));
    } else if (e.kind == ExplanationKind::control_load) {
      out.push_back(c.ctl_captured ? std::string("check the control pin's decoupling capacitor "
                                                 "and the board around the pin for flux")
                                   : std::string("capture the control pin: it should sit at "
                                                 "two thirds of the supply"));
    }
  }
  // A second capture with a known resistor across the timing resistor changes R but not C.
  std::size_t i = 0;
  const FitParameter* r = param_for(c, PartRole::lower, i);
  if (r == nullptr) r = param_for(c, PartRole::timing_res, i);
  if (r != nullptr) {
    const std::string ref = c.design.parts[static_cast<std::size_t>(r->part)].ref;
    out.push_back(fmt::format(
        "or recapture with a known {} resistor across {} and fit both captures together "
        "(benchtau fit FIRST SECOND --design FILE --change 2:{}||{}): the added resistor moves "
        "the resistance but not the capacitance, which separates the two",
        format_eng(r->nominal, "ohm"), ref, ref, format_eng(r->nominal, "")));
  }
  return out;
}

}  // namespace benchtau::detail
