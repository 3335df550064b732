// benchtau: parsing one cell with std::from_chars, with the dialect's decimal mark.
#include "drivers/csv_cell.h"

#include <array>
#include <charconv>
#include <cmath>
#include <system_error>

#include "drivers/csv_units.h"

namespace benchtau::csv {

Cell parse_cell(std::string_view cell, bool decimal_comma) {
  cell = trim_blanks(cell);
  if (cell.size() >= 2 && cell.front() == '"' && cell.back() == '"') {
    cell = trim_blanks(cell.substr(1, cell.size() - 2));
  }
  if (cell.empty()) return {CellKind::empty, 0.0};

  // from_chars knows only '.', so a decimal comma is swapped in a copy.
  std::array<char, 128> copy;  // filled before use
  if (decimal_comma) {
    if (cell.size() > copy.size() || cell.find('.') != std::string_view::npos) return {};
    for (std::size_t i = 0; i < cell.size(); ++i) copy[i] = cell[i] == ',' ? '.' : cell[i];
    cell = std::string_view(copy.data(), cell.size());
  }
  if (cell.size() >= 2 && cell[0] == '+' &&
      (cell[1] == '.' || (cell[1] >= '0' && cell[1] <= '9'))) {
    cell.remove_prefix(1);
  }
  double v = 0.0;
  const auto [ptr, ec] = std::from_chars(cell.data(), cell.data() + cell.size(), v);
  if (ec == std::errc::invalid_argument || ptr != cell.data() + cell.size()) return {};
  if (ec == std::errc::result_out_of_range) return {CellKind::out_of_range, 0.0};
  if (std::isnan(v)) return {CellKind::nan, v};
  if (std::isinf(v)) return {CellKind::infinite, v};
  return {CellKind::number, v};
}

}  // namespace benchtau::csv
