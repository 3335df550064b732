// benchtau: the `fit` command's two outputs: the diagnosis as a terminal table and as JSON.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "fit/diagnosis.h"
#include "src/core/design.h"

namespace benchtau::cli {

// Everything a fit report shows: the design, each capture as measured and fitted (with the
// reader's and the node map's notes, one list per capture), and the diagnosis.
struct FitReport {
  const Design& design;
  std::span<const BoardCapture> captures;
  std::span<const std::vector<std::string>> notes;  // empty, or one entry per capture
  const Diagnosis& diagnosis;
};

// The table for people: verdict, parts, ranked explanations, what the data fixes and cannot
// separate, the measurements' findings, what to measure next and the replacement. per_cycle
// adds each capture's segment fits, one row per charge or discharge.
std::string fit_table(const FitReport& report, bool per_cycle);

// Schema "benchtau-fit-1" (keys listed in fit_report.cpp's fit_json). per_cycle adds each
// capture's segment fits.
std::string fit_json(const FitReport& report, bool per_cycle);

}  // namespace benchtau::cli
