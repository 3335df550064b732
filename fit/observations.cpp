// benchtau: turning a measured and segment-fitted capture into the circuit fit's figures.
#include "fit/observations.h"

#include <cmath>

#include "fit/diagnosis.h"
#include "src/core/stats.h"

namespace benchtau {
namespace {

double hypot3(double a, double b, double c) { return std::sqrt(a * a + b * b + c * c); }

ObservationBlock single(Quantity q, double value, double sigma) {
  ObservationBlock b;
  b.size = 1;
  b.q = {q, q};
  b.value = {value, 0.0};
  b.sigma = {sigma, 0.0};
  b.whiten = {1.0 / sigma, 0.0, 0.0, 0.0};
  return b;
}

// ln(tau) and Vinf of one phase, with their covariance (and each floor added to its variance).
bool phase_pair(const PhaseFit& f, Quantity log_tau, Quantity target, double log_tau_floor,
                double target_floor_V, ObservationBlock& b) {
  if (f.status != FitStatus::ok || !(f.tau_s.value > 0.0)) return false;
  const double s_lt = f.tau_s.sigma / f.tau_s.value;
  const double a = s_lt * s_lt + log_tau_floor * log_tau_floor;
  const double d = f.vinf_V.sigma * f.vinf_V.sigma + target_floor_V * target_floor_V;
  const double c = std::isfinite(f.cov_log_tau_vinf) ? f.cov_log_tau_vinf : 0.0;
  // Lower Cholesky factor L of [a c; c d], then its inverse.
  const double l11 = std::sqrt(a);
  const double l21 = c / l11;
  const double l22sq = d - l21 * l21;
  if (!(l22sq > 0.0) || !std::isfinite(l11)) return false;
  const double l22 = std::sqrt(l22sq);
  b.size = 2;
  b.q = {log_tau, target};
  b.value = {std::log(f.tau_s.value), f.vinf_V.value};
  b.sigma = {std::sqrt(a), std::sqrt(d)};
  b.whiten = {1.0 / l11, 0.0, -l21 / (l11 * l22), 1.0 / l22};
  return true;
}

// A per-cycle figure over the steady cycles (the start-up cycle left out).
Stat steady(const std::vector<Cycle>& cycles, double Cycle::*field) {
  std::vector<double> values;
  values.reserve(cycles.size());
  for (const Cycle& c : cycles) {
    if (!c.startup) values.push_back(c.*field);
  }
  return describe(values);
}

}  // namespace

std::string_view quantity_name(Quantity q) {
  switch (q) {
    case Quantity::log_charge_tau:
      return "charging time constant";
    case Quantity::charge_target:
      return "charging target voltage";
    case Quantity::log_discharge_tau:
      return "discharging time constant";
    case Quantity::discharge_target:
      return "discharging target voltage";
    case Quantity::cap_max:
      return "upper turnaround";
    case Quantity::cap_min:
      return "lower turnaround";
    case Quantity::high_time:
      return "high time";
    case Quantity::low_time:
      return "low time";
    case Quantity::out_high:
      return "output high level";
    case Quantity::out_low:
      return "output low level";
    case Quantity::ctl_high:
      return "control pin, output high";
    case Quantity::ctl_low:
      return "control pin, output low";
  }
  return "?";
}

double predicted(Quantity q, const CyclePrediction& p) {
  switch (q) {
    case Quantity::log_charge_tau:
      return std::log(p.high.tau_s);
    case Quantity::charge_target:
      return p.high.target_V;
    case Quantity::log_discharge_tau:
      return std::log(p.low.tau_s);
    case Quantity::discharge_target:
      return p.low.target_V;
    case Quantity::cap_max:
      return p.cap_max_V;
    case Quantity::cap_min:
      return p.cap_min_V;
    case Quantity::high_time:
      return p.high_s;
    case Quantity::low_time:
      return p.low_s;
    case Quantity::out_high:
      return p.out_high_V;
    case Quantity::out_low:
      return p.out_low_V;
    case Quantity::ctl_high:
      return p.ctl_high_V;
    case Quantity::ctl_low:
      return p.ctl_low_V;
  }
  return std::nan("");
}

std::size_t residual_count(const CaptureObservations& obs) {
  std::size_t n = 0;
  for (const ObservationBlock& b : obs.blocks) n += b.size;
  return n;
}

CaptureObservations observe(const BoardCapture& bc, double supply_V, bool monostable) {
  CaptureObservations o;
  const Measurement& m = bc.measurement;
  const Summary& s = m.summary;
  o.dt_s = bc.capture != nullptr ? bc.capture->time.dt_s : 0.0;
  const double step_V = bc.segments ? bc.segments->step_V : 0.0;
  const double quant_V = step_V / std::sqrt(12.0);
  if (s.cycles == 0) return o;
  const double n = static_cast<double>(s.cycles);

  // Floors for what the model leaves out (judgement, stated so it can be argued with):
  //   a time constant to 0.2 %: the exponential model against a real capacitor's dielectric
  //     absorption and a probe's own capacitance;
  //   a target to 0.5 % of the supply: the supply's own ripple and the chip's loading;
  //   a turnaround to 3 mV plus the quantisation: comparator offset drift within a record;
  //   a time to a quarter sample and 0.05 %: where an edge falls between samples, and the
  //     comparator's delay spread.
  const double log_tau_floor = 0.002;
  const double target_floor_V = 0.005 * supply_V;
  if (bc.segments) {
    ObservationBlock b;
    if (phase_pair(bc.segments->charging, Quantity::log_charge_tau, Quantity::charge_target,
                   log_tau_floor, target_floor_V, b)) {
      o.blocks.push_back(b);
      o.has_cap_fit = true;
    }
    if (!monostable && phase_pair(bc.segments->discharging, Quantity::log_discharge_tau,
                                  Quantity::discharge_target, log_tau_floor, target_floor_V, b)) {
      o.blocks.push_back(b);
      o.has_cap_fit = true;
    }
  }
  if (bc.nodes.cap && s.cap_max_V.n > 0) {
    const double rn = std::sqrt(static_cast<double>(s.cap_max_V.n));
    o.blocks.push_back(
        single(Quantity::cap_max, s.cap_max_V.mean, hypot3(s.cap_max_V.std / rn, quant_V, 0.003)));
    if (!monostable)
      o.blocks.push_back(single(Quantity::cap_min, s.cap_min_V.mean,
                                hypot3(s.cap_min_V.std / rn, quant_V, 0.003)));
  }
  if (!o.has_cap_fit) {
    const double rn = std::sqrt(n);
    const double edge_s = 0.25 * o.dt_s;
    o.blocks.push_back(single(Quantity::high_time, s.high_s.mean,
                              hypot3(s.high_s.std / rn, edge_s, 5e-4 * s.high_s.mean)));
    // A monostable's low time is the trigger's, not the circuit's.
    if (!monostable)
      o.blocks.push_back(single(Quantity::low_time, s.low_s.mean,
                                hypot3(s.low_s.std / rn, edge_s, 5e-4 * s.low_s.mean)));
  }
  if (bc.nodes.out && std::isfinite(s.out_high_V) && std::isfinite(s.out_low_V)) {
    // The levels sag through a phase as the load changes; 20 mV plus 1 % covers that.
    o.has_out = true;
    o.blocks.push_back(
        single(Quantity::out_high, s.out_high_V, hypot3(quant_V, 0.02, 0.01 * s.out_high_V)));
    o.blocks.push_back(
        single(Quantity::out_low, s.out_low_V, hypot3(quant_V, 0.02, 0.01 * s.out_low_V)));
  }
  if (bc.nodes.ctl) {
    auto add = [&](Quantity q, const Stat& st) {
      if (st.n == 0) return false;
      const double se = st.std / std::sqrt(static_cast<double>(st.n));
      o.blocks.push_back(single(q, st.mean, hypot3(se, quant_V, 0.003)));
      return true;
    };
    add(Quantity::ctl_high, steady(m.cycles, &Cycle::ctl_high_V));
    if (add(Quantity::ctl_low, steady(m.cycles, &Cycle::ctl_low_V))) o.has_ctl = true;
  }
  return o;
}

}  // namespace benchtau
