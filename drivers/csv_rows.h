// benchtau: parsing a file's data rows, in parallel parts, into preallocated columns.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "drivers/file_chunks.h"

namespace benchtau::csv {

// What every data row must look like.
struct RowLayout {
  char separator = ',';
  bool decimal_comma = false;
  std::size_t columns = 0;
  std::vector<std::string> labels;  // for messages: "column \"CH2 (mV)\"" or "column 3"
  std::vector<double> to_si;        // factor applied to each column's values
  std::string fields_reference;     // "the header on line 4", or "line 5"
  // A column whose values must increase: strict makes a failure an error (a
  // time column); otherwise the first line where it fails is only recorded.
  std::optional<std::size_t> watch;
  bool watch_strict = false;
  std::string watch_label;  // "time in column \"t\""
};

struct ColumnGaps {
  std::size_t missing = 0;
  std::size_t first_line = 0;  // 0 when none
};

struct ParsedRows {
  std::vector<std::vector<double>> columns;
  std::vector<ColumnGaps> gaps;
  std::size_t rows = 0;
  std::size_t watch_fail_line = 0;  // non-strict watch: first line it did not increase
  // The file's last line, when it has no line end and was therefore not read
  // (a row cut short reads as a wrong number: "2.5" cut to "2."); 0 if none.
  std::size_t unterminated_line = 0;
  unsigned parts = 1;    // how many parts the rows were split into
  unsigned workers = 1;  // threads that parsed them
};

// Parts smaller than this are not worth splitting off.
inline constexpr std::size_t min_part_bytes = 64 * 1024;
inline constexpr std::size_t max_parts = 256;
// A few parts a thread, handed out as threads come free, even out the work.
inline constexpr unsigned parts_per_worker = 4;

// Parses [data_begin, source.size()), whose first line is first_line, with up
// to threads threads (0: one per core). The first error by line number is
// thrown as an InputError naming name.
ParsedRows parse_rows(const ByteSource& source, std::size_t data_begin, std::size_t first_line,
                      const RowLayout& layout, unsigned threads, const std::string& name);

}  // namespace benchtau::csv
