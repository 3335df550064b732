// benchtau: the decoupled two-resistor astable's cycle in closed form, for Monte Carlo draws.
#include "src/core/fast_astable.h"

#include <cmath>

namespace benchtau {
namespace {

bool finite_positive(double x) { return x > 0.0 && x < kOpen; }
bool open_or_positive(double x) { return x > 0.0; }  // kOpen is absent

// exp(-x). The propagation delay is usually a tiny fraction of a time
// constant, where six terms of the series are exact to double precision
// (the first term left out is below x^6 / 720 < 2e-21) and far cheaper.
double exp_minus(double x) {
  if (x >= 0.0 && x < 1e-3) {
    return 1.0 - x * (1.0 - x * (0.5 - x * (1.0 / 6 - x * (1.0 / 24 - x * (1.0 / 120)))));
  }
  return std::exp(-x);
}

}  // namespace

// The algebra is circuit_model.cpp's Thevenin sums written out for these
// branches: the same cycle, fewer divisions.
std::optional<OutputValues> fast_astable_outputs(const Circuit& c) {
  const CircuitValues& v = c.v;
  const TimerFigures& f = v.chip;
  if (c.kind != CircuitKind::astable_two_resistor || c.control != ControlWiring::decoupled ||
      (c.reset != ResetWiring::supply && c.reset != ResetWiring::open))
    return std::nullopt;
  if (!finite_positive(v.upper_ohm) || !finite_positive(v.lower_ohm) || !finite_positive(v.cap_F) ||
      !finite_positive(f.divider_ohm) || !finite_positive(f.discharge_on_ohm) ||
      v.load_ohm < kOpen || !open_or_positive(v.probe_ctl_ohm) ||
      !open_or_positive(v.probe_cap_ohm) || !open_or_positive(v.leak_ohm) ||
      v.supply_V < f.reset_threshold_V)
    return std::nullopt;

  // Control pin: 2/3 of the supply behind 2/3 of the divider, loaded by a probe.
  const double vs = v.supply_V;
  const double rd = 2.0 / 3.0 * f.divider_ohm;
  const double upper_V = v.probe_ctl_ohm < kOpen
                             ? 2.0 / 3.0 * vs * v.probe_ctl_ohm / (v.probe_ctl_ohm + rd)
                             : 2.0 / 3.0 * vs;
  const double lower_V = 0.5 * upper_V;

  // Charging: the supply through R1 + R2. Discharging: R1 to the supply and
  // the switch (its saturation behind its resistance) meet at the discharge
  // pin, then R2. Into the node, each source loses what the node's pins and
  // leakage draw; a shunt (leakage resistance, probe) scales both by
  // 1 / (1 + shunt r). Divisions are few and shared: they set the pace here.
  const double r1 = v.upper_ohm, r2 = v.lower_ohm, ron = f.discharge_on_ohm;
  const double inv = 1.0 / (r1 + ron);
  const double pin_V = (vs * ron + f.discharge_sat_V * r1) * inv;
  const double drawn_A = v.leak_A + f.threshold_current_A + f.trigger_current_A;
  double high_r = r1 + r2, low_r = r1 * ron * inv + r2;
  double high_e = vs - drawn_A * high_r, low_e = pin_V - drawn_A * low_r;
  const double shunt_S = (v.leak_ohm < kOpen ? 1.0 / v.leak_ohm : 0.0) +
                         (v.probe_cap_ohm < kOpen ? 1.0 / v.probe_cap_ohm : 0.0);
  if (shunt_S > 0.0) {
    const double a = 1.0 + shunt_S * high_r, b = 1.0 + shunt_S * low_r;
    const double q = 1.0 / (a * b);
    high_e *= q * b;
    high_r *= q * b;
    low_e *= q * a;
    low_r *= q * a;
  }

  const double high_margin_V = high_e - upper_V, low_margin_V = lower_V - low_e;
  if (!(upper_V > lower_V) || !(high_margin_V > 0.0) || !(low_margin_V > 0.0)) return std::nullopt;

  // Each phase switches a propagation delay after its crossing (as in the model).
  const double tpd = f.propagation_delay_s;
  const double th = high_r * v.cap_F, tl = low_r * v.cap_F;
  const double per_tau2 = tpd / (th * tl);  // tpd / tl = per_tau2 * th, and so on
  const double start_V = low_e + (lower_V - low_e) * exp_minus(per_tau2 * th);
  const double peak_V = high_e + (upper_V - high_e) * exp_minus(per_tau2 * tl);
  const double per_margin2 = 1.0 / (high_margin_V * low_margin_V);
  const double high_s = th * std::log((high_e - start_V) * low_margin_V * per_margin2) + tpd;
  const double low_s = tl * std::log((peak_V - low_e) * high_margin_V * per_margin2) + tpd;
  const double period_s = high_s + low_s;
  const double per = 1.0 / period_s;
  return OutputValues{high_s, low_s, period_s, per, high_s * per, peak_V, start_V};
}

}  // namespace benchtau
