// benchtau: units in column names and metadata values, and their scaling to SI.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace benchtau::csv {

enum class Quantity { none, time, voltage, current, rate, other };

// A unit benchtau knows: what it measures and the factor to its SI unit.
struct KnownUnit {
  Quantity quantity = Quantity::none;
  double to_si = 1.0;
  std::string_view si;  // "s", "V", "A", "Hz"
};

// Looks a unit up as written ("ms", "µs", "mV", "kS/s"). strict accepts only
// spellings safe to take from a bare name suffix ("out_V", "cap/mV"), so that
// a name like "ch_a" is not read as amperes.
std::optional<KnownUnit> lookup_unit(std::string_view unit, bool strict = false);

// A header cell split into the name and the unit it carries.
struct ColumnName {
  std::string name;                    // the whole cell, trimmed and unquoted: "CH2 (mV)"
  std::string base;                    // without the unit: "CH2"
  std::string unit;                    // as written: "mV"; empty when none
  Quantity quantity = Quantity::none;  // other: a unit benchtau does not know
  double to_si = 1.0;
  std::string si_unit;  // "V"; the unit as written when unknown; empty when none
};

// Reads "t [ms]", "Time (us)", "CH2 (mV)", "time_s", "out_V", "cap/mV".
ColumnName parse_column_name(std::string_view cell);

// Whether a unitless column name means time ("t", "time", "Timestamp").
bool is_time_name(std::string_view base);

// Trims blanks (spaces and tabs) from both ends.
std::string_view trim_blanks(std::string_view text);

// ASCII lower case.
std::string lower_ascii(std::string_view text);

}  // namespace benchtau::csv
