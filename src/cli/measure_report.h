// benchtau: the `measure` command's two outputs: a terminal table and JSON.
#pragma once

#include <string>
#include <vector>

#include "src/cli/json_writer.h"
#include "src/core/capture.h"
#include "src/core/findings.h"
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

// Pieces other reports share with measure's, so that a measurement reads the same everywhere.
// One line per finding, "  severity code: message", without a heading.
std::string finding_lines(const Findings& findings);
// The "summary" object of measure's JSON (written as a value: the caller writes its key).
void summary_json(JsonWriter& j, const Measurement& m);
// The "findings" array of measure's JSON (written as a value).
void findings_json(JsonWriter& j, const Findings& findings);

}  // namespace benchtau::cli
