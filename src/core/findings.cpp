// benchtau: finding severities.
#include "src/core/findings.h"

namespace benchtau {

const char* severity_name(Severity s) {
  switch (s) {
    case Severity::info:
      return "info";
    case Severity::warning:
      return "warning";
    case Severity::problem:
      return "problem";
  }
  return "info";
}

}  // namespace benchtau
