// benchtau: the decoupled two-resistor astable's cycle in closed form, for Monte Carlo draws.
#include "src/core/fast_astable.h"

#include <cmath>

#include "src/core/log_kernel.h"

// GCC's clones for x86-64, picked when the program loads. The sanitizer build keeps one
// plain copy, as segment_normal.cpp's does.
#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__) && \
    !defined(__SANITIZE_ADDRESS__)
#define BENCHTAU_WIDE_VECTORS __attribute__((target_clones("avx2", "default")))
#else
#define BENCHTAU_WIDE_VECTORS
#endif

namespace benchtau {
namespace {

bool finite_positive(double x) { return x > 0.0 && x < kOpen; }
bool open_or_positive(double x) { return x > 0.0; }  // kOpen is absent

// Six terms of exp(-x)'s series: exact to double precision for 0 <= x < 1e-3
// (the first term left out is below x^6 / 720 < 2e-21). The propagation delay
// is usually that small a fraction of a time constant.
constexpr double kSeriesEnd = 1e-3;
[[gnu::always_inline]] inline double exp_minus_series(double x) {
  return 1.0 - x * (1.0 - x * (0.5 - x * (1.0 / 6 - x * (1.0 / 24 - x * (1.0 / 120)))));
}
double exp_minus(double x) {
  return x >= 0.0 && x < kSeriesEnd ? exp_minus_series(x) : std::exp(-x);
}

struct LaneInputs {
  double supply_V, upper_V, r1_ohm, r2_ohm, on_ohm, sat_V, drawn_A, shunt_S, cap_F, delay_s;
};
struct LaneResult {
  OutputValues value;
  bool runs;    // both thresholds are crossed
  bool series;  // both delays lie where exp_minus_series is exact
};

// The algebra is circuit_model.cpp's Thevenin sums written out for these
// branches: the same cycle, fewer divisions, and no branch, so that the batch
// loop vectorises. Exp and Log are passed in: the scalar path uses the
// library's, the batch the branch-free series and log_kernel.
template <class Exp, class Log>
[[gnu::always_inline]] inline LaneResult astable_lane(const LaneInputs& in, Exp exp_minus_of,
                                                      Log log_of) {
  // Charging: the supply through R1 + R2. Discharging: R1 to the supply and
  // the switch (its saturation behind its resistance) meet at the discharge
  // pin, then R2. Into the node, each source loses what the node's pins and
  // leakage draw; a shunt (leakage resistance, probe) scales both by
  // 1 / (1 + shunt r), which is 1 exactly when there is none.
  const double vs = in.supply_V, r1 = in.r1_ohm, r2 = in.r2_ohm, ron = in.on_ohm;
  const double inv = 1.0 / (r1 + ron);
  const double pin_V = (vs * ron + in.sat_V * r1) * inv;
  double high_r = r1 + r2, low_r = r1 * ron * inv + r2;
  double high_e = vs - in.drawn_A * high_r, low_e = pin_V - in.drawn_A * low_r;
  const double a = 1.0 + in.shunt_S * high_r, b = 1.0 + in.shunt_S * low_r;
  const double q = 1.0 / (a * b);
  high_e *= q * b;
  high_r *= q * b;
  low_e *= q * a;
  low_r *= q * a;

  const double upper_V = in.upper_V, lower_V = 0.5 * upper_V;
  const double high_margin_V = high_e - upper_V, low_margin_V = lower_V - low_e;

  // Each phase switches a propagation delay after its crossing (as in the model).
  const double tpd = in.delay_s;
  const double th = high_r * in.cap_F, tl = low_r * in.cap_F;
  const double per_tau2 = tpd / (th * tl);  // tpd / tl = per_tau2 * th, and so on
  const double x_low = per_tau2 * th, x_high = per_tau2 * tl;
  const double start_V = low_e + (lower_V - low_e) * exp_minus_of(x_low);
  const double peak_V = high_e + (upper_V - high_e) * exp_minus_of(x_high);
  const double per_margin2 = 1.0 / (high_margin_V * low_margin_V);
  const double high_s = th * log_of((high_e - start_V) * low_margin_V * per_margin2) + tpd;
  const double low_s = tl * log_of((peak_V - low_e) * high_margin_V * per_margin2) + tpd;
  const double period_s = high_s + low_s;
  const double per = 1.0 / period_s;
  LaneResult r;
  r.value = OutputValues{high_s, low_s, period_s, per, high_s * per, peak_V, start_V};
  r.runs = (upper_V > lower_V) & (high_margin_V > 0.0) & (low_margin_V > 0.0);
  r.series = (x_low >= 0.0) & (x_low < kSeriesEnd) & (x_high >= 0.0) & (x_high < kSeriesEnd);
  return r;
}

// The inputs of a covered circuit; nothing for any other.
std::optional<LaneInputs> lane_inputs(const Circuit& c) {
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
  const double shunt_S = (v.leak_ohm < kOpen ? 1.0 / v.leak_ohm : 0.0) +
                         (v.probe_cap_ohm < kOpen ? 1.0 / v.probe_cap_ohm : 0.0);
  return LaneInputs{vs,
                    upper_V,
                    v.upper_ohm,
                    v.lower_ohm,
                    f.discharge_on_ohm,
                    f.discharge_sat_V,
                    v.leak_A + f.threshold_current_A + f.trigger_current_A,
                    shunt_S,
                    v.cap_F,
                    f.propagation_delay_s};
}

}  // namespace

std::optional<OutputValues> fast_astable_outputs(const Circuit& c) {
  const std::optional<LaneInputs> in = lane_inputs(c);
  if (!in) return std::nullopt;
  const LaneResult r = astable_lane(*in, exp_minus, [](double x) { return std::log(x); });
  if (!r.runs) return std::nullopt;
  return r.value;
}

bool load_lane(const Circuit& c, AstableBatch& batch, std::size_t lane) {
  const std::optional<LaneInputs> in = lane_inputs(c);
  batch.covered[lane] = in.has_value();
  // An uncovered lane still gets numbers, harmless ones, so the loop needs no test.
  const LaneInputs x = in.value_or(LaneInputs{1, 1, 1, 1, 1, 0, 0, 0, 1, 0});
  batch.supply_V[lane] = x.supply_V;
  batch.upper_V[lane] = x.upper_V;
  batch.r1_ohm[lane] = x.r1_ohm;
  batch.r2_ohm[lane] = x.r2_ohm;
  batch.on_ohm[lane] = x.on_ohm;
  batch.sat_V[lane] = x.sat_V;
  batch.drawn_A[lane] = x.drawn_A;
  batch.shunt_S[lane] = x.shunt_S;
  batch.cap_F[lane] = x.cap_F;
  batch.delay_s[lane] = x.delay_s;
  return in.has_value();
}

// One copy per instruction set, chosen when the program loads: wider vectors
// where the processor has them, plain SSE2 everywhere else.
BENCHTAU_WIDE_VECTORS void batch_outputs(const AstableBatch& batch, std::size_t lanes,
                                         AstableBatchOutputs& out) {
  const std::size_t n = std::min(lanes, kAstableLanes);
#pragma GCC ivdep
  for (std::size_t i = 0; i < n; ++i) {
    const LaneInputs in{batch.supply_V[i], batch.upper_V[i], batch.r1_ohm[i],  batch.r2_ohm[i],
                        batch.on_ohm[i],   batch.sat_V[i],   batch.drawn_A[i], batch.shunt_S[i],
                        batch.cap_F[i],    batch.delay_s[i]};
    const LaneResult r = astable_lane(in, exp_minus_series, log_kernel);
    // Written out, not a loop over k: the compiler vectorises over i only
    // when each store is a plain stride-one access.
    out.value[0][i] = r.value[0];
    out.value[1][i] = r.value[1];
    out.value[2][i] = r.value[2];
    out.value[3][i] = r.value[3];
    out.value[4][i] = r.value[4];
    out.value[5][i] = r.value[5];
    out.value[6][i] = r.value[6];
    out.fit_for_path[i] = r.runs && r.series ? 1.0 : 0.0;
  }
  for (std::size_t i = 0; i < n; ++i) out.done[i] = batch.covered[i] && out.fit_for_path[i] != 0.0;
}

}  // namespace benchtau
