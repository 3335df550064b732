// benchtau: the diagnosis: checks that there is something to fit, scores every explanation,
// and turns the scores into a verdict.
#include "fit/diagnosis.h"

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <thread>

#include "fit/diagnosis_detail.h"
#include "src/core/engineering.h"
#include "src/core/input_error.h"

namespace benchtau {
namespace {

using detail::Scored;

bool has_finding(const Measurement& m, std::string_view code) {
  return std::any_of(m.findings.begin(), m.findings.end(),
                     [&](const Finding& f) { return f.code == code; });
}

std::string mode_of(std::span<const BoardCapture> captures) {
  bool out = false, cap = false;
  for (const BoardCapture& c : captures) {
    out = out || c.nodes.out.has_value();
    cap = cap || c.nodes.cap.has_value();
  }
  if (out && cap) return "both-nodes";
  return cap ? "cap-only" : "output-only";
}

// The design's part that a change names, and where its value lands.
double CircuitValues::*across_field(const Design& d, const BoardChange& change) {
  if (change.across_ref.empty()) return nullptr;
  for (const PartSlot& s : part_slots(d)) {
    const Part& p = d.parts[s.part];
    if (p.ref != change.across_ref) continue;
    if (p.role == PartRole::timing_cap || p.role == PartRole::diode || p.role == PartRole::led) {
      throw InputError(
          "--change", 0, 0,
          fmt::format("a resistor can be added across a resistor only; {} is not one", p.ref));
    }
    return s.field;
  }
  throw InputError("--change", 0, 0,
                   fmt::format("the design \"{}\" has no part {}", d.name, change.across_ref));
}

// Scores one explanation: a Laplace fit, or a fault path integrated over its conductance.
Scored score(const CircuitProblem& problem, const Explanation& e) {
  Scored s;
  s.explanation = e;
  if (e.spec.fault == FaultPath::none) {
    s.fit = fit_circuit(problem, e.spec);
    s.ok = s.fit.ok;
    s.log_evidence = s.fit.log_evidence;
  } else {
    s.fault = integrate_fault(problem, e.spec, e.lo_S, e.hi_S, {});
    s.ok = s.fault.ok;
    s.fit = s.fault.best;
    s.log_evidence = s.fault.log_evidence;
  }
  return s;
}

std::vector<Scored> score_all(const CircuitProblem& problem, const std::vector<Explanation>& es,
                              int threads) {
  std::vector<Scored> out(es.size());
  // A fault path costs some thirty fits, any other explanation one: those go first, so that
  // the single fits fill in around them instead of leaving one thread idle at the end.
  std::vector<std::size_t> order(es.size());
  for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
  std::stable_partition(order.begin(), order.end(),
                        [&](std::size_t i) { return es[i].spec.fault != FaultPath::none; });
  std::atomic<std::size_t> next{0};
  auto work = [&] {
    for (std::size_t j = next++; j < es.size(); j = next++) {
      out[order[j]] = score(problem, es[order[j]]);
    }
  };
  std::vector<std::jthread> pool;
  for (int t = 1; t < std::max(1, threads); ++t) pool.emplace_back(work);
  work();
  pool.clear();  // joins
  return out;
}

// The figure the best fit misses by most, for a wrong-circuit verdict.
std::string worst_misfit(const CircuitProblem& problem, const CircuitFitResult& fit) {
  double worst = 0.0;
  std::string words;
  for (std::size_t k = 0; k < problem.obs.size() && k < fit.cycles.size(); ++k) {
    for (const ObservationBlock& b : problem.obs[k].blocks) {
      for (std::size_t j = 0; j < b.size; ++j) {
        const double model = predicted(b.q[j], fit.cycles[k]);
        const double z = std::fabs(model - b.value[j]) / b.sigma[j];
        if (!(z > worst)) continue;
        worst = z;
        const bool log_tau =
            b.q[j] == Quantity::log_charge_tau || b.q[j] == Quantity::log_discharge_tau;
        const bool time = log_tau || b.q[j] == Quantity::high_time || b.q[j] == Quantity::low_time;
        auto show = [&](double v) {
          return format_eng(log_tau ? std::exp(v) : v, time ? "s" : "V");
        };
        words = fmt::format("the {} is {} where the design's circuit can make {} at best",
                            quantity_name(b.q[j]), show(b.value[j]), show(model));
      }
    }
  }
  return words;
}

Diagnosis stop_early(Diagnosis d, Verdict v, std::string reason) {
  d.verdict = v;
  d.reason = std::move(reason);
  return d;
}

}  // namespace

Diagnosis diagnose(const Design& design, std::span<const BoardCapture> captures,
                   const DiagnoseOptions& options) {
  Diagnosis d;
  d.mode = mode_of(captures);
  if (captures.empty()) throw InputError("fit", 0, 0, "no capture to fit");

  // What stops the fit before it starts: a design that cannot run, a board that does not run,
  // a record too short to time.
  const CyclePrediction nominal = predict_cycle(nominal_circuit(design));
  if (!nominal.oscillates) {
    return stop_early(d, Verdict::no_oscillation,
                      fmt::format("the design cannot oscillate: {}", describe_stop(nominal)));
  }
  const bool mono = design.kind == CircuitKind::monostable;
  for (const BoardCapture& c : captures) {
    const Measurement& m = c.measurement;
    for (const char* code : {"stuck_high", "stuck_low", "stuck_cap"}) {
      if (!has_finding(m, code)) continue;
      const auto f = std::find_if(m.findings.begin(), m.findings.end(),
                                  [&](const Finding& x) { return x.code == code; });
      Diagnosis stopped =
          stop_early(d, Verdict::no_oscillation,
                     fmt::format("{}: the board does not oscillate: {}", c.label, f->message));
      const Part* cap = design.part_with(PartRole::timing_cap);
      const std::string cref = cap != nullptr ? cap->ref : std::string("the timing capacitor");
      if (std::string_view(code) == "stuck_low") {
        stopped.next = {
            "measure the supply at the timer's pins and the reset pin: a reset "
            "held low keeps the output low",
            "check the trigger: the capacitor node must fall below a third of the "
            "supply to start a cycle"};
      } else {
        stopped.next = {fmt::format("capture the capacitor node: if it never reaches two thirds "
                                    "of the supply, look for a short or a heavy leak across {} "
                                    "(with the power off)",
                                    cref),
                        "measure the control pin: a load there moves both thresholds"};
      }
      return stopped;
    }
    const std::size_t need = mono ? 1 : 2;
    if (m.summary.cycles < need) {
      return stop_early(
          d, Verdict::inconclusive,
          fmt::format("{}: too short to fit: {} whole cycle{} found, {} at least needed; capture "
                      "a longer record",
                      c.label, m.summary.cycles, m.summary.cycles == 1 ? "" : "s", need));
    }
  }
  CircuitProblem problem;
  std::vector<double> supplies;
  for (const BoardCapture& c : captures)
    supplies.push_back(c.change.supply_V.value_or(design.supply_V));
  problem.params = circuit_parameters(design, supplies);
  bool cap_captured = false, ctl_captured = false;
  std::size_t figures = 0;
  for (std::size_t k = 0; k < captures.size(); ++k) {
    Circuit circuit = nominal_circuit(design);
    circuit.v.supply_V = supplies[k];
    problem.circuits.push_back(circuit);
    problem.obs.push_back(observe(captures[k], supplies[k], mono));
    problem.across.push_back(
        {across_field(design, captures[k].change), captures[k].change.across_ohm});
    cap_captured = cap_captured || problem.obs.back().has_cap_fit;
    ctl_captured = ctl_captured || problem.obs.back().has_ctl;
    figures += residual_count(problem.obs.back());
  }
  if (figures < 2) {
    return stop_early(d, Verdict::inconclusive,
                      "the captures hold too little to fit: no timing and no capacitor curve");
  }

  std::vector<Scored> scored =
      score_all(problem, explanations(design, problem.params), options.threads);
  double best = -INFINITY;
  for (const Scored& s : scored) {
    if (s.ok) best = std::max(best, std::log(s.explanation.weight) + s.log_evidence);
  }
  if (!std::isfinite(best)) {
    return stop_early(d, Verdict::inconclusive,
                      "no explanation could be fitted: the design's circuit does not oscillate "
                      "anywhere near what the capture shows");
  }
  double total = 0.0;
  for (Scored& s : scored) {
    s.probability = s.ok ? std::exp(std::log(s.explanation.weight) + s.log_evidence - best) : 0.0;
    total += s.probability;
  }
  for (Scored& s : scored) s.probability /= total;
  std::stable_sort(scored.begin(), scored.end(),
                   [](const Scored& a, const Scored& b) { return a.probability > b.probability; });

  const Scored& lead = scored.front();
  const double dof = static_cast<double>(std::max<std::size_t>(1, lead.fit.figures));
  d.chi2_per_dof = lead.fit.chi2_data / dof;
  // The best explanation still missing the figures by far more than their errors: the board
  // is not the circuit the design describes (or a fault we do not model).
  if (d.chi2_per_dof > 50.0 && lead.fit.chi2_data > 200.0) {
    // A two-resistor astable's high time always exceeds its low time (it charges through
    // both resistors and discharges through one) unless the control pin is pulled down.
    if (design.kind == CircuitKind::astable_two_resistor) {
      for (const BoardCapture& c : captures) {
        const double duty = c.measurement.summary.duty.mean;
        if (duty < 0.48) {
          return stop_early(
              d, Verdict::inconclusive,
              fmt::format("{}: the capture does not fit the design's circuit: its duty cycle is "
                          "{}, and a two-resistor astable cannot go below 50 % (is there a "
                          "steering diode, or is the output inverted?)",
                          c.label, format_percent(duty)));
        }
      }
    }
    return stop_early(d, Verdict::inconclusive,
                      fmt::format("the capture does not fit the design's {} circuit: {}",
                                  circuit_kind_name(design.kind), worst_misfit(problem, lead.fit)));
  }

  const detail::DiagnosisContext ctx{design, problem, scored, cap_captured, ctl_captured};
  d.parts = detail::fitted_parts(ctx);
  d.figures = detail::fitted_figures(ctx);
  d.suspects = detail::describe_suspects(ctx);
  for (const Scored& s : scored) {
    if (s.explanation.kind == ExplanationKind::all_in_tolerance)
      d.healthy_probability = s.probability;
  }
  detail::describe_identifiability(ctx, d.fixed, d.unseparated);
  d.next = detail::suggest_measurements(ctx);

  // A supply or a timer figure pulled far outside its prior: the design (or the supply the
  // capture was taken at) is not what the board is, and no part can be judged against it.
  for (std::size_t i = 0; i < problem.params.size(); ++i) {
    const FitParameter& f = problem.params[i];
    if (f.part >= 0) continue;
    const double z = (lead.fit.x[i] - f.prior.mean) / f.prior.sigma;
    if (std::fabs(z) < 6.0) continue;
    const bool supply = f.slot.value == &CircuitValues::supply_V;
    d.verdict = Verdict::inconclusive;
    d.reason = fmt::format(
        "the fit had to move the {} to {} against the design's {} ({:.0f} sigma of its "
        "prior): {}",
        f.id, format_eng(f.to_value(lead.fit.x[i]), f.unit), format_eng(f.nominal, f.unit), z,
        supply ? "was the capture taken at another supply? Give it with --change N:supply=VOLTS"
               : "check the design's [timer] figures and family");
    return d;
  }

  const bool healthy_leads = lead.explanation.kind == ExplanationKind::all_in_tolerance;
  const bool all_in_spec = std::all_of(d.parts.begin(), d.parts.end(), [](const FittedPart& p) {
    return p.status == PartStatus::in_spec || p.status == PartStatus::undetermined;
  });
  if (healthy_leads && all_in_spec) {
    d.verdict = Verdict::pass;
    d.reason = fmt::format(
        "every part is within its tolerance ({} likely){}", format_percent(lead.probability, 0),
        mono ? std::string()
             : fmt::format("; the period is {} against the design's {}",
                           format_eng(captures.front().measurement.summary.period_s.mean, "s"),
                           format_eng(nominal.period_s, "s")));
  } else {
    d.verdict = Verdict::fail;
    d.reason = d.suspects.empty() ? "a part is out of tolerance" : d.suspects.front().sentence;
    d.replacement = detail::suggest_replacement(ctx);
  }
  return d;
}

std::string_view verdict_name(Verdict v) {
  switch (v) {
    case Verdict::pass:
      return "pass";
    case Verdict::fail:
      return "fail";
    case Verdict::no_oscillation:
      return "no-oscillation";
    case Verdict::inconclusive:
      return "inconclusive";
  }
  return "?";
}

std::string_view part_status_name(PartStatus s) {
  switch (s) {
    case PartStatus::in_spec:
      return "in-spec";
    case PartStatus::low:
      return "low";
    case PartStatus::high:
      return "high";
    case PartStatus::undetermined:
      return "undetermined";
  }
  return "?";
}

std::string_view suspect_kind_name(SuspectKind k) {
  switch (k) {
    case SuspectKind::value_low:
      return "value-low";
    case SuspectKind::value_high:
      return "value-high";
    case SuspectKind::leakage:
      return "leakage";
    case SuspectKind::unexpected_load:
      return "unexpected-load";
  }
  return "?";
}

}  // namespace benchtau
