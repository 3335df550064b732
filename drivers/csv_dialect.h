// benchtau: working out a delimited file's dialect from its first 64 KiB.
#pragma once

#include <cstddef>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "drivers/csv_reader.h"

namespace benchtau::csv {

// How much of a file the sniffer looks at.
inline constexpr std::size_t sniff_bytes = 64 * 1024;
// The widest row benchtau reads.
inline constexpr std::size_t max_columns = 64;

// A line before the data that may hold metadata ("Sample interval, 2 us").
struct PreambleLine {
  std::size_t number = 0;  // 1-based
  std::string text;        // for a comment, without its marker
  bool comment = false;
};

struct Sniffed {
  CsvDialect dialect;
  std::size_t data_begin = 0;       // byte offset of the first data line
  std::size_t columns = 0;          // fields per row, trailing separators dropped
  bool trailing_separator = false;  // the data rows end with an empty extra field
  bool bom = false;
  std::vector<std::string> header_cells;  // empty when there is no header
  std::vector<PreambleLine> preamble;
  std::vector<std::string> notes;
};

// Sniffs the head of a source (the whole of it when whole is true). Throws
// InputError for a file that is not text or holds no rows of numbers.
Sniffed sniff_dialect(std::span<const char> head, bool whole, const std::string& source);

// Splits a line into fields: at each separator outside double quotes, or for
// ' ' at runs of blanks (leading and trailing blanks ignored).
void split_fields(std::string_view line, char separator, std::vector<std::string_view>& out);

}  // namespace benchtau::csv
