// benchtau: what one capture tells the circuit fit, as figures with their uncertainties.
#pragma once

// The circuit fit reads the capacitor node's waveform through the joint phase fits
// (segment_fit.h): for each phase, ln(tau) and Vinf with their covariance. The phase fit is the
// least-squares estimate of exactly those two per phase, each segment keeping its own
// amplitude (which is what lets each segment's start move: A exp(-(t - t0 - d)/tau) is
// A' exp(-(t - t0)/tau)), so to first order the pair carries what the samples say of the
// circuit's time constants and targets. The turnaround voltages (the thresholds), the output's
// high and low levels, the control pin, and the high and low times come from the measurement.
// With the capacitor node fitted, the high and low times are left out: they follow from tau,
// Vinf and the thresholds, and counting them again would double the evidence.
//
// Each figure's sigma adds, in quadrature, the statistical error and a floor for what the
// model does not hold (stated beside each floor in observations.cpp).
#include <array>
#include <cstddef>
#include <string_view>
#include <vector>

#include "src/core/circuit.h"

namespace benchtau {

struct BoardCapture;

enum class Quantity {
  log_charge_tau,  // ln(tau / 1 s), charging (output high)
  charge_target,   // Vinf, charging
  log_discharge_tau,
  discharge_target,
  cap_max,  // upper turnaround
  cap_min,  // lower turnaround
  high_time,
  low_time,
  out_high,
  out_low,
  ctl_high,  // control pin during the high phase
  ctl_low,
};

std::string_view quantity_name(Quantity q);  // "charging time constant", ...

// The model's value of a quantity for a solved cycle.
double predicted(Quantity q, const CyclePrediction& p);

// One or two correlated figures. Residuals are whiten * (predicted - value): whiten is the
// inverse of the lower Cholesky factor of their covariance.
struct ObservationBlock {
  std::size_t size = 1;
  std::array<Quantity, 2> q{};
  std::array<double, 2> value{};
  std::array<double, 4> whiten{};  // row-major 2 x 2, lower triangular
  std::array<double, 2> sigma{};   // each figure's own sigma, for messages
};

struct CaptureObservations {
  std::vector<ObservationBlock> blocks;
  bool has_cap_fit = false;  // the capacitor node's phase fits were used
  bool has_out = false;
  bool has_ctl = false;
  double dt_s = 0.0;  // sample interval
};

// What a capture lacks is simply not observed. A monostable's discharge and low time are left
// out: the trigger, not the circuit, sets them.
CaptureObservations observe(const BoardCapture& capture, double supply_V, bool monostable);

std::size_t residual_count(const CaptureObservations& obs);

}  // namespace benchtau
