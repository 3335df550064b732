// benchtau: shared machinery for checking predict_cycle against ngspice runs of every circuit.
#pragma once

#include <fmt/format.h>
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <map>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "drivers/csv_reader.h"
#include "src/core/circuit.h"
#include "src/core/measure.h"
#include "src/core/nodes.h"
#include "tests/reference/spice_run.h"

namespace benchtau::spice {

// Every netlist runs the timer from 9 V.
constexpr double kSupply_V = 9.0;

// The behavioural model's own figures (the defaults in timer_behavioural.lib),
// written as benchtau's chip: what the model has, benchtau gets; what it leaves
// out (saturation voltage, input currents, delay beyond its 1 ns latch) is zero.
inline TimerFigures behavioural_chip() {
  TimerFigures f = typical_figures(Family::bipolar);
  f.divider_ohm = 5e3;        // rd
  f.out_high_drop_V = 1.7;    // vdrop
  f.out_source_ohm = 20.0;    // rsrc
  f.out_low_V = 0.1;          // vlow
  f.out_sink_ohm = 10.0;      // rsink
  f.discharge_on_ohm = 10.0;  // ron
  f.discharge_sat_V = 0.0;
  f.threshold_current_A = 0.0;
  f.trigger_current_A = 0.0;
  f.reset_threshold_V = 0.7;  // vrst
  f.propagation_delay_s = 0.0;
  return f;
}

inline Circuit base_circuit(CircuitKind kind) {
  Circuit c;
  c.kind = kind;
  c.v.supply_V = kSupply_V;
  c.v.chip = behavioural_chip();
  return c;
}

// One circuit: its netlist with the part values on its .param lines, and the
// same circuit as benchtau models it.
struct CircuitCase {
  std::string label;    // table row and scratch directory name
  std::string netlist;  // file in tests/reference/spice
  std::map<std::string, double> params;
  Circuit circuit;
  std::string capture = "capture.txt";  // what the netlist's wrdata writes
  int steady_cycles = 4;
  // Simulator step and sample interval, as a fraction of the shorter phase.
  double samples_per_short_segment = 2000.0;
  // Set for a monostable or a circuit that does not oscillate; otherwise the
  // step and length come from the prediction.
  double step_s = 0.0, stop_s = 0.0;
};

// What one simulated case gave.
struct Simulated {
  CyclePrediction p;
  CsvResult csv;
  NodeMap map;
  std::size_t steady_expected = 0;  // steady cycles the run length implies
  double step_s = 0.0, stop_s = 0.0;
};

// The run length for an oscillating case: the first charge from 0 V, the first
// low, the steady cycles, and half a high phase so that the last edge is inside.
inline void plan(const CircuitCase& k, Simulated& s) {
  s.p = predict_cycle(k.circuit);
  if (k.stop_s > 0.0) {
    s.step_s = k.step_s;
    s.stop_s = k.stop_s;
    return;
  }
  const PhaseSolution& h = s.p.high;
  const double startup_s = h.tau_s * std::log(h.target_V / (h.target_V - h.end_V));
  s.step_s = std::min(s.p.high_s, s.p.low_s) / k.samples_per_short_segment;
  s.stop_s = startup_s + s.p.low_s + k.steady_cycles * s.p.period_s + 0.5 * s.p.high_s;
  s.steady_expected = static_cast<std::size_t>(k.steady_cycles);
}

// Simulates every case (two at a time) and reads each capture back through
// benchtau's own reader.
inline std::vector<Simulated> simulate(std::vector<CircuitCase>& cases) {
  if (!ngspice_available()) {
    FAIL(
        "ngspice is not on PATH; it is a required test dependency (Debian package ngspice, "
        "see scripts/install-deps)");
  }
  std::vector<Simulated> out(cases.size());
  std::vector<Run> runs;
  std::vector<std::unique_ptr<ScratchDir>> dirs;
  std::vector<const ScratchDir*> dir_ptrs;
  for (std::size_t i = 0; i < cases.size(); ++i) {
    plan(cases[i], out[i]);
    REQUIRE(out[i].step_s > 0.0);
    Run r{cases[i].label, cases[i].netlist, cases[i].params, cases[i].capture, {}, {}, {}};
    r.params["tstep"] = out[i].step_s;
    r.params["tstop"] = out[i].stop_s;
    runs.push_back(std::move(r));
    dirs.push_back(std::make_unique<ScratchDir>(scratch_path(cases[i].label)));
    dir_ptrs.push_back(dirs.back().get());
  }
  run_all(runs, dir_ptrs);
  for (std::size_t i = 0; i < cases.size(); ++i) {
    INFO(cases[i].label << ": " << runs[i].error << "\nngspice log:\n" << runs[i].log);
    REQUIRE(runs[i].error.empty());
    out[i].csv = read_csv_file(runs[i].capture_path.string());
    const NodeRequest request{"v(out)", "v(cap)", "v(ctl)"};
    out[i].map = map_nodes(out[i].csv.capture, request);
    REQUIRE(out[i].map.out.has_value());
    REQUIRE(out[i].map.cap.has_value());
  }
  return out;  // the scratch directories go here, unless BENCHTAU_KEEP_SPICE is set
}

inline double pct(double measured, double predicted) {
  return 100.0 * (measured / predicted - 1.0);
}

// The mean of a channel over [t0, t1], trimmed by a fraction at each end to
// keep clear of the switching edges.
inline double window_mean(const Capture& c, std::size_t channel, double t0_s, double t1_s,
                          double trim = 0.02) {
  const double a = t0_s + trim * (t1_s - t0_s), b = t1_s - trim * (t1_s - t0_s);
  double sum = 0.0;
  std::size_t n = 0;
  for (std::size_t i = 0; i < c.samples(); ++i) {
    const double t = c.time.at(i);
    if (t < a || t > b) continue;
    sum += c.channels[channel].values[i];
    ++n;
  }
  return n ? sum / static_cast<double>(n) : std::nan("");
}

// Steady-cycle means of each phase's control voltage.
struct PhaseMeans {
  double ctl_high_V = 0.0, ctl_low_V = 0.0;
};

inline PhaseMeans ctl_means(const Measurement& m) {
  std::vector<double> hi, lo;
  for (const Cycle& c : m.cycles) {
    if (c.startup) continue;
    hi.push_back(c.ctl_high_V);
    lo.push_back(c.ctl_low_V);
  }
  return {describe(hi).mean, describe(lo).mean};
}

// How close ngspice and the model must agree on an oscillating circuit.
//
// Times, 0.4 %. The behavioural model and predict_cycle hold the same elements,
// so what remains is numerical. ngspice does not cut its step at the latch's
// flip: each flip falls inside one step (at most 1/2000 of the shorter phase)
// and the trapezoidal rule puts it within about half a step of the true
// crossing, 0.025 % of the phase per edge. The capture is sampled at the same
// interval and the measurement's quadratic fits on the capacitor curve time
// each edge to a fraction of a sample (a monostable's near-instant discharge
// leaves half a sample, 0.025 %). The comparators' 1 mV tanh width and the
// latch's 1 ns decide at their midpoints and shift no threshold. Seen: under
// 0.03 %. (At 1/500 of the phase a high phase ending on a shallow slope was off
// by 0.27 %: hence the fine step.) 0.4 % stays far from that, and a model 1 %
// wrong still fails by 0.5 % or more either way.
//
// Turnarounds and control voltages, 4 mV plus 0.1 % of the value: where a flip
// lands in its step moves the turnaround by the capacitor's slope times half a
// step, under 1 mV at 3 V of swing per phase over 4000 half-steps; seen under
// 1 mV. A turnaround at 1.38 V moved 1 % is 14 mV, beyond its 5.4 mV margin;
// at 6 V, 60 mV against 10 mV.
//
// Output levels, 10 mV: medians of the flat samples against the model's level
// at the end of each phase; behind an output resistor the level drifts by a few
// millivolts over a phase as the capacitor's current changes.
struct Tolerance {
  double time_rel = 0.004;
  double volt_abs_V = 0.004;
  double volt_rel = 0.001;
  double out_abs_V = 0.01;  // output levels: medians of flat samples against end-of-phase levels
};

inline double volt_margin(const Tolerance& t, double v) {
  return t.volt_abs_V + t.volt_rel * std::fabs(v);
}

// The measured steady cycle of one oscillating case, checked against the
// prediction; returns the table line.
inline std::string check_astable(const CircuitCase& k, const Simulated& s, const Tolerance& tol,
                                 Measurement* measured = nullptr) {
  INFO(k.label);
  REQUIRE(s.p.oscillates);
  const Measurement m = measure(s.csv.capture, s.map);
  const Summary& sum = m.summary;
  std::string findings;
  for (const Finding& f : m.findings)
    findings +=
        fmt::format("\n  finding {} ({}): {}", f.code, severity_name(f.severity), f.message);
  const PhaseMeans ctl = ctl_means(m);
  const std::string line = fmt::format(
      "{}: high {:.6e} s (model {:.6e}, {:+.3f} %), low {:.6e} s (model {:.6e}, {:+.3f} %), "
      "cap {:.4f} / {:.4f} V (model {:.4f} / {:.4f}), ctl {:.4f} / {:.4f} V (model {:.4f} / "
      "{:.4f}), out {:.4f} / {:.4f} V (model {:.4f} / {:.4f}), {} cycles{}",
      k.label, sum.high_s.mean, s.p.high_s, pct(sum.high_s.mean, s.p.high_s), sum.low_s.mean,
      s.p.low_s, pct(sum.low_s.mean, s.p.low_s), sum.cap_max_V.mean, sum.cap_min_V.mean,
      s.p.cap_max_V, s.p.cap_min_V, ctl.ctl_high_V, ctl.ctl_low_V, s.p.ctl_high_V, s.p.ctl_low_V,
      sum.out_high_V, sum.out_low_V, s.p.out_high_V, s.p.out_low_V, sum.cycles, findings);
  WARN(line);
  CHECK(m.edge_node == "out");
  // Cycles: the run holds the steady cycles it was planned for (one more may fit).
  CHECK(sum.cycles >= s.steady_expected);
  CHECK(sum.cycles <= s.steady_expected + 1);
  CHECK(sum.high_s.mean == Approx(s.p.high_s).epsilon(tol.time_rel));
  CHECK(sum.low_s.mean == Approx(s.p.low_s).epsilon(tol.time_rel));
  CHECK(sum.cap_max_V.mean == Approx(s.p.cap_max_V).margin(volt_margin(tol, s.p.cap_max_V)));
  CHECK(sum.cap_min_V.mean == Approx(s.p.cap_min_V).margin(volt_margin(tol, s.p.cap_min_V)));
  CHECK(ctl.ctl_high_V == Approx(s.p.ctl_high_V).margin(volt_margin(tol, s.p.ctl_high_V)));
  CHECK(ctl.ctl_low_V == Approx(s.p.ctl_low_V).margin(volt_margin(tol, s.p.ctl_low_V)));
  CHECK(sum.out_high_V == Approx(s.p.out_high_V).margin(tol.out_abs_V));
  CHECK(sum.out_low_V == Approx(s.p.out_low_V).margin(tol.out_abs_V));
  // The same checks would catch a model 1 % off either way: the times always,
  // a voltage wherever 1 % of it is more than twice its margin.
  for (const double off : {0.99, 1.01}) {
    CHECK_FALSE(sum.high_s.mean == Approx(off * s.p.high_s).epsilon(tol.time_rel));
    CHECK_FALSE(sum.low_s.mean == Approx(off * s.p.low_s).epsilon(tol.time_rel));
    for (const auto& [got, want] : {std::pair{sum.cap_max_V.mean, s.p.cap_max_V},
                                    std::pair{sum.cap_min_V.mean, s.p.cap_min_V}}) {
      if (0.01 * std::fabs(want) > 2.0 * volt_margin(tol, want))
        CHECK_FALSE(got == Approx(off * want).margin(volt_margin(tol, want)));
    }
  }
  if (measured) *measured = m;
  return line;
}

}  // namespace benchtau::spice
