// benchtau: reads a capture from the delimited text that scopes, loggers and
// people's scripts write, working out its dialect by itself.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "src/core/capture.h"

namespace benchtau {

// What the reader worked out about a file, reported back so that the user can
// see (and a test can check) what was assumed.
struct CsvDialect {
  char separator = ',';        // ',', ';', '\t', or ' ' for runs of blanks
  bool decimal_comma = false;  // "1,25" means 1.25 (only with ';', tab or blanks)
  bool has_header = false;
  std::size_t header_line = 0;      // 1-based, 0 when there is none
  std::size_t first_data_line = 0;  // 1-based
  std::size_t preamble_lines = 0;   // metadata and comment lines before the header or data
};

struct CsvOptions {
  // Samples per second, when the file has no time column and its preamble
  // gives no interval or rate. Overrides the preamble; ignored (with a note)
  // when there is a time column.
  std::optional<double> rate_Hz;
  // Force the time column by header name or 1-based index, or "none" to say
  // the file has none. Empty: decide from names, units and values.
  std::string time_column;
  // Threads to parse with; 0 means one per core.
  unsigned threads = 0;
};

struct CsvResult {
  Capture capture;
  CsvDialect dialect;
  std::vector<std::string> notes;  // sentences for the report: what was assumed or ignored
};

// Reads path ("-" is standard input). Throws InputError naming file, line and
// column for anything it cannot read; never returns made-up values.
CsvResult read_csv_file(const std::string& path, const CsvOptions& options = {});

// Same, from text already in memory; source names it in messages.
CsvResult read_csv_text(std::string_view text, const std::string& source,
                        const CsvOptions& options = {});

}  // namespace benchtau
