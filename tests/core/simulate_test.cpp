// benchtau: synthetic captures from the model: waves that keep the predicted times exactly.
#include <catch2/catch.hpp>

#include <cmath>

#include "src/core/capture_csv.h"
#include "src/core/design_file.h"
#include "src/core/random.h"
#include "src/core/simulate.h"

using namespace benchtau;

TEST_CASE("the astable wave's phases last exactly the predicted high and low times") {
  // The wave runs between the turnarounds, which the propagation delay puts
  // beyond the thresholds; its exponential phases must still give the model's times.
  Xoshiro256 rng(4, 0);
  int checked = 0;
  for (CircuitKind kind : {CircuitKind::astable_two_resistor, CircuitKind::astable_output_resistor,
                           CircuitKind::astable_diode_steered}) {
    for (int i = 0; i < 300; ++i) {
      Circuit c;
      c.kind = kind;
      c.v.family = i % 2 == 0 ? Family::bipolar : Family::cmos;
      c.v.chip = typical_figures(c.v.family);
      c.v.chip.propagation_delay_s = 1e-6 * rng.uniform();
      c.v.supply_V = 5.0 + 10.0 * rng.uniform();
      c.v.upper_ohm = 1e3 * std::exp(5.0 * rng.uniform());
      c.v.lower_ohm = 1e3 * std::exp(5.0 * rng.uniform());
      c.v.timing_ohm = 1e3 * std::exp(5.0 * rng.uniform());
      c.v.cap_F = 1e-9 * std::exp(8.0 * rng.uniform());
      const CyclePrediction p = predict_cycle(c);
      if (!p.oscillates) continue;
      const AstableWave w = astable_wave(p);
      CHECK(w.high_s() == Approx(p.high_s).epsilon(1e-12));
      CHECK(w.low_s() == Approx(p.low_s).epsilon(1e-12));
      CHECK(w.upper_V == p.cap_max_V);
      CHECK(w.lower_V == p.cap_min_V);
      ++checked;
    }
  }
  CHECK(checked > 600);
}

TEST_CASE("a monostable pulse train: each pulse lasts the predicted width") {
  Circuit c;
  c.kind = CircuitKind::monostable;
  c.v.supply_V = 12.0;
  c.v.timing_ohm = 100e3;
  c.v.cap_F = 1e-6;
  const CyclePrediction p = predict_cycle(c);
  REQUIRE(p.oscillates);
  const PulseWave w = pulse_wave(p);
  CHECK(w.pulse_s() == Approx(p.high_s).epsilon(1e-12));
  SynthOptions o;
  o.rate_Hz = 1e4;
  o.duration_s = 1.0;
  const SynthRecord rec = synth_pulse_train(w, 0.25, 0.05, o);
  // Triggers at 50, 300, 550 and 800 ms: four pulses, each starting from the
  // node's floor (recovered within far less than the gap), so each as predicted.
  REQUIRE(rec.edges.size() == 8);
  for (std::size_t k = 0; k < 4; ++k) {
    CHECK(rec.edges[2 * k].kind == EdgeKind::rising);
    CHECK(rec.edges[2 * k].t_s == Approx(0.05 + 0.25 * static_cast<double>(k)).epsilon(1e-12));
    CHECK(rec.edges[2 * k + 1].t_s - rec.edges[2 * k].t_s == Approx(p.high_s).epsilon(1e-9));
  }
  CHECK(rec.capture.channels.size() == 3);
  CHECK(rec.capture.channels[0].values.front() == p.out_low_V);
}

TEST_CASE("capture CSV: header, names from the design and seven significant figures") {
  Capture c;
  c.time.dt_s = 1e-6;
  Channel a;
  a.name = "out_V";
  a.values = {7.3, 0.1};
  Channel b;
  b.name = "cap_V";
  b.values = {2.99999987, std::nan("")};
  c.channels = {a, b};
  CHECK(capture_csv(c) == "t_s,out_V,cap_V\n0,7.3,3\n1e-06,0.1,NaN\n");
  CHECK(capture_csv(c, {"out (V)", "cap, node"}) ==
        "t_s,out (V),\"cap, node\"\n0,7.3,3\n1e-06,0.1,NaN\n");
}

TEST_CASE("simulate_design picks its defaults from the cycle and checks the request") {
  const Design d =
      read_design_file(std::string(BENCHTAU_SOURCE_DIR) + "/captures/mister-rev-b.toml");
  const CyclePrediction p = predict_cycle(nominal_circuit(d));
  const Simulation s = simulate_design(d, p, {});
  CHECK(s.rate_Hz == 500e3);  // 1000 a cycle of 3.40 ms, rounded up to a 1-2-5 step
  CHECK(s.duration_s == Approx(10.0 * p.period_s));
  CHECK(s.full_scale_V == 10.0);  // the step above the 9 V supply
  CHECK(s.trigger_every_s == 0.0);
  SimulateRequest bad;
  bad.rate_Hz = -1.0;
  CHECK_THROWS_WITH(simulate_design(d, p, bad), "--rate: must be positive, found -1");
}
