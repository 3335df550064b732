// benchtau: a fitted part written in one line, for the report tests.
#pragma once

#include "fit/diagnosis.h"

namespace benchtau::test {

inline FittedPart part(const char* ref, const char* unit, double nominal, double tolerance,
                       double fitted, double sigma, double data_share, PartStatus status) {
  FittedPart p;
  p.ref = ref;
  p.unit = unit;
  p.nominal = nominal;
  p.tolerance = tolerance;
  p.fitted = fitted;
  p.sigma = sigma;
  p.deviation = fitted / nominal - 1.0;
  p.data_share = data_share;
  p.status = status;
  return p;
}

}  // namespace benchtau::test
