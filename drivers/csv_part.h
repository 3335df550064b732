// benchtau: one part of the data rows, parsed by one thread (private to csv_rows.cpp).
#pragma once

#include <atomic>
#include <cstddef>
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "drivers/csv_rows.h"
#include "src/core/input_error.h"

namespace benchtau::csv {

struct PartOutput {
  std::size_t rows = 0;
  std::vector<ColumnGaps> gaps;
  // The watched column at the part's first and last rows, for the checks
  // across part boundaries.
  std::size_t first_row_line = 0;
  std::size_t first_row_column = 0;
  double first_watch = std::numeric_limits<double>::quiet_NaN();
  double last_watch = std::numeric_limits<double>::quiet_NaN();
  std::size_t watch_fail_line = 0;
  // A last line with no line end, not read: it may be a row cut short.
  std::size_t unterminated_line = 0;
  std::optional<InputError> error;  // the part's first error
};

// Where a part writes: column c of its row r goes to columns[c][r].
struct PartTarget {
  std::span<double* const> columns;
  std::size_t capacity = 0;
};

// Parses the whole lines of [begin, end), the first of which is first_line.
// Gives up early once stop_line (the earliest error line any part has found)
// is before the part, and lowers stop_line when it finds an error itself.
void parse_part(const ByteSource& source, std::size_t begin, std::size_t end,
                std::size_t first_line, const RowLayout& layout, const PartTarget& target,
                const std::string& name, std::atomic<std::size_t>& stop_line, PartOutput& out);

}  // namespace benchtau::csv
