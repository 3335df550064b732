// benchtau: the sample interval or rate that a file's metadata lines may give.
#pragma once

#include <cstddef>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "drivers/csv_dialect.h"

namespace benchtau::csv {

struct PreambleTiming {
  std::optional<double> interval_s;
  std::size_t interval_line = 0;  // 1-based line it came from
  std::optional<double> rate_Hz;
  std::size_t rate_line = 0;
  std::vector<std::string> notes;  // values that were found but could not be used
};

// Looks for "key, value[, unit]", "key: value unit", "key = value" lines whose
// key names a sample interval ("Sample interval", "dt", "x increment") or a
// sample rate ("Sample rate", "fs", "samples per second"). The first of each
// kind wins. Values may carry a unit (s ... ps; Hz, kHz, S/s, MS/s, Sa/s).
PreambleTiming read_preamble(std::span<const PreambleLine> lines, const CsvDialect& dialect);

enum class KeyKind { none, interval, rate };

// What a metadata key names, judged from its words, case-insensitively.
KeyKind classify_key(std::string_view key);

}  // namespace benchtau::csv
