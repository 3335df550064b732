// benchtau: the `measure` command's two outputs: a terminal table and JSON.
#pragma once

#include <string>
#include <vector>

#include "src/core/capture.h"
#include "src/core/measure.h"
#include "src/core/nodes.h"

namespace benchtau::cli {

// Everything a report shows. The reader's and the node map's notes say what
// was assumed; they print under the heading "read as".
struct MeasureReport {
  const Capture& capture;
  const NodeMap& nodes;
  const Measurement& measurement;
  std::vector<std::string> notes;
};

// The table for people. per_cycle adds one row per cycle.
std::string measure_table(const MeasureReport& report, bool per_cycle);

// The JSON document for scripts; its schema is documented in README.md
// ("JSON from measure") and named by its "schema" key.
std::string measure_json(const MeasureReport& report);

}  // namespace benchtau::cli
