// benchtau: internal to fit/: the scored explanations, shared by the diagnosis and its sentences.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "fit/circuit_fit.h"
#include "fit/diagnosis.h"
#include "fit/evidence.h"
#include "fit/hypotheses.h"

namespace benchtau::detail {

struct Scored {
  Explanation explanation;
  bool ok = false;
  CircuitFitResult fit;  // at the peak, for a fault path
  FaultEvidence fault;   // fault paths only
  double log_evidence = 0.0;
  double probability = 0.0;
};

// Everything the sentences need.
struct DiagnosisContext {
  const Design& design;
  const CircuitProblem& problem;
  std::vector<Scored> scored;  // most probable first
  bool cap_captured = false;
  bool ctl_captured = false;
};

// Suspects, in the order of `scored`, healthy left out.
std::vector<Suspect> describe_suspects(const DiagnosisContext& c);

// Statements of what the best fit fixes and what it cannot separate.
void describe_identifiability(const DiagnosisContext& c, std::vector<std::string>& fixed,
                              std::vector<std::string>& unseparated);

// What to measure to separate the two leading explanations.
std::vector<std::string> suggest_measurements(const DiagnosisContext& c);

// The fitted values of the design's parts under the best explanation.
std::vector<FittedPart> fitted_parts(const DiagnosisContext& c);
// The supply and the timer's figures, likewise.
std::vector<FittedPart> fitted_figures(const DiagnosisContext& c);

// A preferred value for the leading suspect's part, when it is one.
std::optional<Replacement> suggest_replacement(const DiagnosisContext& c);

}  // namespace benchtau::detail
