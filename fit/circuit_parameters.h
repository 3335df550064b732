// benchtau: the unknowns of the circuit fit, each with where it lands in the circuit and its prior.
#pragma once

// Every unknown is fitted in a transformed coordinate x with a normal prior on x:
//   positive quantities (resistances, capacitances, the supply, on-resistances): x = ln(value),
//     so a part's tolerance maps to a log-normal prior (prior_for_tolerance says how);
//   signed or possibly-zero quantities (output low level, comparator input currents,
//     saturation voltages): x = value.
// A fault's conductance (a capacitor's leakage, an unexpected control-pin load) is not a
// normal unknown: its best value often sits at "none", so the evidence integrates over it
// (evidence.h) and it enters the circuit through FaultPath below.
#include <cstddef>
#include <span>
#include <string>
#include <vector>

#include "src/core/circuit.h"
#include "src/core/design.h"

namespace benchtau {

enum class Transform { log, linear };

struct Prior {
  double mean = 0.0;   // of x
  double sigma = 1.0;  // of x
};

// The log-normal prior of a part with a marked tolerance: median at the nominal value and the
// tolerance band at +/- 2 sigma, sigma = ln(1 + tolerance) / 2. Two sigma rather than the
// three of the Monte Carlo spread (README): a prior for diagnosis must not call a part at the
// edge of its band unlikely, and parts bought by the reel sit anywhere in it (common practice).
Prior prior_for_tolerance(double nominal, double tolerance);

// Which field of the circuit one unknown sets.
struct Slot {
  double CircuitValues::*value = nullptr;  // set when the unknown is a circuit value...
  double TimerFigures::*figure = nullptr;  // ...or one of the chip's figures
  // How a design-file part value maps to it (a diode's forward voltage, not its value).
  bool is_vf = false;
};

struct FitParameter {
  std::string id;    // a part's ref ("R1"), or the figure's name ("discharge on-resistance")
  std::string unit;  // "ohm", "F", "V", "A", "s"
  Slot slot;
  Transform transform = Transform::log;
  Prior prior;                  // as designed (all in tolerance)
  double nominal = 0.0;         // the design's (or the family's typical) value
  std::ptrdiff_t part = -1;     // index into Design::parts, or -1 for a chip figure
  std::ptrdiff_t capture = -1;  // -1: shared by every capture; else that capture's own
  double to_x(double value) const;
  double to_value(double x) const;
};

// The unknowns for a design fitted to n_captures captures: every part with a value, the
// supply of each capture, and the chip figures the timing depends on, with the family's
// typical values as prior medians and the spreads in circuit_parameters.cpp.
// supply_V[k] is the supply capture k was taken at (the design's unless a change says).
std::vector<FitParameter> circuit_parameters(const Design& design,
                                             std::span<const double> supply_V);

// A fault path that is not a part of the design, set by a conductance in siemens.
enum class FaultPath { none, cap_leakage, control_load };

// Applies the unknowns (at x) and a fault conductance to a copy of the design's circuit for
// capture k.
void apply_parameters(std::span<const FitParameter> params, std::span<const double> x,
                      std::size_t capture, FaultPath fault, double fault_S, Circuit& circuit);

}  // namespace benchtau
