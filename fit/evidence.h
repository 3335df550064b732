// benchtau: scoring an explanation by its evidence, the probability of the captures under it.
#pragma once

// For an explanation whose unknowns all sit well inside their priors, the Laplace
// approximation at the fit's minimum (circuit_fit.h) is the evidence: a normal posterior's
// integral, ln Z = -cost/2 + ln det(cov)/2 - sum ln w (less a constant shared by every
// explanation). It rewards a fit that explains the figures and charges for every unknown the
// data had to pin down beyond its prior (the Occam factor det(cov)^(1/2) / prod w).
//
// A fault path (a leakage across the capacitor, a load on the control pin) is different:
// "none" is a physical value at the edge of its range, and on a healthy board the fit's best
// conductance sits there, where the Laplace approximation has no meaning. So its evidence is
// integrated over the conductance G, log-uniform on [lo_S, hi_S] (a fault's size is unknown to
// within decades; common practice for a scale parameter), each point's inner integral over
// the other unknowns done by Laplace:
//
//   Z = integral of Z(G) d(ln G) / ln(hi / lo)
//
// on a grid in ln G (trapezoid rule), refined around the peak so that a sharply determined
// fault is resolved.
#include <vector>

#include "fit/circuit_fit.h"

namespace benchtau {

struct FaultEvidence {
  bool ok = false;
  double log_evidence = 0.0;
  CircuitFitResult best;   // the fit at the grid point of highest Z(G)
  double fault_S = 0.0;    // that point's conductance
  double median_S = 0.0;   // the posterior median of G
  double log_sigma = 0.0;  // the posterior's spread of ln G (16 % to 84 %, halved)
  double peak_chi2 = 0.0;  // chi2_data at the peak
};

FaultEvidence integrate_fault(const CircuitProblem& problem, const FitSpec& spec, double lo_S,
                              double hi_S, const std::vector<double>& z_start);

}  // namespace benchtau
