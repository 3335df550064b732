// benchtau: from a board's captures and its design to which part is out of spec.
#pragma once

// What the caller provides: the design, and one or more captures of the same board, each
// already measured (src/core/measure.h) and, when the capacitor node was captured, fitted
// segment by segment (fit/segment_fit.h). A capture may carry a known change to the board
// (another supply, or a known resistor added across a part), so that captures taken before
// and after the change are fitted jointly.
//
// What comes back: the verdict; every part's effective value with its standard deviation and
// status; the ranked explanations (all parts in tolerance, one part off, capacitor leakage, an
// unexpected control-pin load), each with a probability and one sentence; what the data fixes
// and what it cannot separate, in plain words; the measurement that would settle a close call;
// and an E-series replacement that brings the timing back to the design's.
//
// circuit_fit.h holds the fit behind it, hypotheses.h the explanations compared, and
// evidence.h how each is scored.
#include <cstddef>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "fit/segment_fit.h"
#include "src/core/capture.h"
#include "src/core/design.h"
#include "src/core/measure.h"

namespace benchtau {

enum class Verdict {
  pass,            // every part in tolerance, and the explanation "all in tolerance" ranks first
  fail,            // a part (or a leakage, or a load) is out of spec
  no_oscillation,  // the board does not oscillate (or the design cannot)
  inconclusive,    // too little data, or the capture does not fit the design's circuit
};

enum class PartStatus { in_spec, low, high, undetermined };

enum class SuspectKind { value_low, value_high, leakage, unexpected_load };

// A known change to the board for one capture, against the design.
struct BoardChange {
  std::optional<double> supply_V;  // the supply this capture was taken at
  std::string across_ref;          // a part a known resistor was added across ("R2")...
  double across_ohm = kOpen;       // ...and its value
};

// One capture of the board, measured, and its segments fitted when the capacitor node was
// captured (segments may then be empty: the timing is used alone).
struct BoardCapture {
  std::string label;  // for messages: usually the file name
  const Capture* capture = nullptr;
  NodeMap nodes;
  Measurement measurement;
  std::optional<SegmentFitResult> segments;
  BoardChange change;
};

// One design part (or a fault outside the parts list) with its fitted effective value.
struct FittedPart {
  std::string ref;   // "R1", "C1"; a fault outside the parts list: "C1-leakage"
  std::string unit;  // "ohm", "F", "V", "A"
  double nominal = std::numeric_limits<double>::quiet_NaN();
  double tolerance = std::numeric_limits<double>::quiet_NaN();  // fraction
  double fitted = std::numeric_limits<double>::quiet_NaN();
  double sigma = std::numeric_limits<double>::quiet_NaN();
  double deviation = std::numeric_limits<double>::quiet_NaN();  // fitted / nominal - 1
  // How much of what is known of the value came from the captures rather than the prior:
  // 1 - posterior variance / prior variance (of ln value), clamped to [0, 1].
  double data_share = 0.0;
  PartStatus status = PartStatus::undetermined;
};

struct Suspect {
  std::string ref;  // a design part, or "C1-leakage", "control-pin-load"
  SuspectKind kind = SuspectKind::value_low;
  double probability = 0.0;
  std::string sentence;  // "C1 has lost about 38 % of its capacitance (62 nF +/- 1 against ...)"
  // The value fitted under this explanation (the part's value, the leakage resistance, the
  // load's resistance), with its unit.
  double fitted = std::numeric_limits<double>::quiet_NaN();
  double sigma = std::numeric_limits<double>::quiet_NaN();
  std::string unit;
  // Its lead over the next explanation comes from the priors, not from the data.
  bool ranked_by_prior = false;
};

// A preferred value (IEC 60063) for one part that brings the timing back to the design's.
struct Replacement {
  std::string ref;
  std::string series;                                       // "E24"
  double exact = std::numeric_limits<double>::quiet_NaN();  // the value that would be exact
  double preferred = std::numeric_limits<double>::quiet_NaN();
  double period_s = std::numeric_limits<double>::quiet_NaN();  // predicted with it fitted
  double design_period_s = std::numeric_limits<double>::quiet_NaN();
  std::string sentence;
};

struct Diagnosis {
  Verdict verdict = Verdict::inconclusive;
  std::string reason;             // one sentence behind the verdict
  std::string mode;               // what was captured: "both-nodes", "output-only", "cap-only"
  std::vector<FittedPart> parts;  // the design's parts, under the explanation ranked first
  // The supply and the timer's own figures as fitted there (unit, fitted, sigma, data_share;
  // nominal is the prior's centre, tolerance NaN; status in-spec within two prior sigmas).
  std::vector<FittedPart> figures;
  double healthy_probability = 0.0;      // of "all parts in tolerance"
  std::vector<Suspect> suspects;         // every other explanation, most probable first
  std::vector<std::string> fixed;        // what the captures fix, in plain words
  std::vector<std::string> unseparated;  // what they cannot tell apart
  std::vector<std::string> next;         // what to measure next
  std::optional<Replacement> replacement;
  double chi2_per_dof = std::numeric_limits<double>::quiet_NaN();  // of the best explanation
};

struct DiagnoseOptions {
  // Suspects whose probability ratio to the leader is above this are a close call.
  double close_ratio = 0.25;
  int threads = 2;
};

// Throws InputError when a capture lacks what the design says it holds, or a change names a
// part the design does not have.
Diagnosis diagnose(const Design& design, std::span<const BoardCapture> captures,
                   const DiagnoseOptions& options = {});

std::string_view verdict_name(Verdict v);  // "pass", "fail", "no-oscillation", "inconclusive"
std::string_view part_status_name(PartStatus s);    // "in-spec", "low", "high", "undetermined"
std::string_view suspect_kind_name(SuspectKind k);  // "value-low", "value-high", "leakage", ...

}  // namespace benchtau
