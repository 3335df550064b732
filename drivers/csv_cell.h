// benchtau: what one delimited cell holds: a number, a gap, or text.
#pragma once

#include <string_view>

namespace benchtau::csv {

enum class CellKind {
  empty,         // nothing but blanks: a missing value
  nan,           // NaN written out: a missing value
  number,        // a finite number
  out_of_range,  // a number too large or too small for a double
  infinite,      // "inf": not a measurement
  text,          // anything else
};

struct Cell {
  CellKind kind = CellKind::text;
  double value = 0.0;
};

// Reads one cell, blanks around it and one pair of double quotes allowed. With
// decimal_comma, "1,25" is 1.25 and a '.' makes the cell text (it could be a
// thousands mark). A leading '+' is allowed.
Cell parse_cell(std::string_view cell, bool decimal_comma);

inline bool is_missing(CellKind k) { return k == CellKind::empty || k == CellKind::nan; }

}  // namespace benchtau::csv
