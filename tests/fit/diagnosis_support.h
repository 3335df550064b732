// benchtau: a board with one part changed, simulated by the circuit model and diagnosed
// against its design, for the diagnosis tests.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "fit/diagnosis.h"
#include "fit/segment_fit.h"
#include "src/core/design_file.h"
#include "src/core/measure.h"
#include "src/core/simulate.h"

namespace benchtau::test {

// A two-resistor astable as a small workshop would build it: metal-film resistors and a film
// capacitor, captured with x10 probes (10 M) on the output, capacitor node and control pin.
inline constexpr std::string_view kTwoResistorDesign = R"(name = "test board"
supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
control = "decoupled"
reset = "supply"
[parts]
R1 = { value = "10k", tolerance = "1%", kind = "metal-film", role = "upper" }
R2 = { value = "47k", tolerance = "1%", kind = "metal-film", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
[capture]
out = "out_V"
cap = "cap_V"
ctl = "ctl_V"
out_input_ohm = "10M"
cap_input_ohm = "10M"
ctl_input_ohm = "10M"
)";

// What a board differs from its design by.
struct BoardFault {
  std::string ref;  // a part whose value is changed (empty: none)
  double factor = 1.0;
  double leak_ohm = kOpen;     // across the timing capacitor
  double control_ohm = kOpen;  // from the control pin to ground
};

struct BenchCapture {
  Simulation sim;
  BoardCapture board;
};

// Simulates the faulty board at 8 bits over 10 V with a little noise, as a cheap scope would,
// then measures it and fits its segments (or leaves the capacitor node out).
inline BenchCapture capture_board(const Design& design, const BoardFault& fault, bool with_cap,
                                  std::uint64_t seed = 1) {
  Design board = design;
  for (Part& p : board.parts) {
    if (p.ref == fault.ref) p.value *= fault.factor;
  }
  Circuit c = nominal_circuit(board);
  c.v.leak_ohm = fault.leak_ohm;
  if (fault.control_ohm < kOpen) {
    c.control = ControlWiring::load_to_ground;
    c.v.control_ohm = fault.control_ohm;
  }
  const CyclePrediction p = predict_cycle(c);
  SimulateRequest req;
  req.bits = 8;
  req.full_scale_V = 10.0;
  req.noise_V = 0.015;
  req.seed = seed;
  req.cycles = 12;
  BenchCapture out{simulate_design(board, p, req), {}};
  // simulate_design draws the design's own nominal figures; the fault lives in p.
  const Capture& cap = out.sim.record.capture;
  out.board.label = "simulated";
  out.board.capture = &cap;
  out.board.nodes.out = 0;
  if (with_cap) out.board.nodes.cap = 1;
  out.board.nodes.ctl = 2;
  out.board.measurement = measure(cap, out.board.nodes);
  if (with_cap) {
    out.board.segments =
        fit_segments(cap.time, cap.channels[1].values, out.board.measurement.edges);
  }
  return out;
}

}  // namespace benchtau::test
