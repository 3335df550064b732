// benchtau: the data model of a capture: one time base, named channels with units.
#pragma once

#include <cstddef>
#include <optional>
#include <span>
#include <string>
#include <vector>

namespace benchtau {

// When each sample was taken. Either uniform (t0_s + i * dt_s), as when the
// file gives only a rate, or explicit per-sample times read from a time column.
struct TimeBase {
  double t0_s = 0.0;
  double dt_s = 0.0;        // the nominal interval; for explicit times, the median step
  std::vector<double> t_s;  // empty when uniform

  bool uniform() const { return t_s.empty(); }
  double at(std::size_t i) const {
    return uniform() ? t0_s + static_cast<double>(i) * dt_s : t_s[i];
  }
};

// One captured node. Values are in SI units after any scaling from the header
// (a "CH2 (mV)" column is stored in volts, unit "V"). A missing or NaN cell is
// stored as NaN and counted; it is never filled in.
struct Channel {
  std::string name;        // as written in the header, or "column N"
  std::string unit;        // SI unit after scaling ("V", "A"), or "" when the header gave none
  std::size_t column = 0;  // 1-based column in the source file (0: not from a file)
  std::vector<double> values;
  std::size_t missing = 0;             // cells that were empty or NaN
  std::size_t first_missing_line = 0;  // 1-based file line of the first of them, 0 if none
};

// A whole capture, as read from one source.
struct Capture {
  std::string source;  // file name, or "<stdin>"
  TimeBase time;
  std::vector<Channel> channels;
  // Where the time base came from, for reports: "time column \"t [ms]\"",
  // "sample interval in the file's preamble", "--rate".
  std::string time_origin;

  std::size_t samples() const { return channels.empty() ? 0 : channels.front().values.size(); }
  double duration_s() const { return samples() < 2 ? 0.0 : time.at(samples() - 1) - time.at(0); }
};

}  // namespace benchtau
