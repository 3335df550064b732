// benchtau: libFuzzer entry point: any bytes either read as a sound capture or throw InputError.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "drivers/csv_reader.h"
#include "src/core/input_error.h"

namespace {

// What every capture the reader returns must satisfy; a breach is a bug.
void check(const benchtau::CsvResult& r) {
  const auto& c = r.capture;
  if (c.channels.empty() || c.samples() == 0) __builtin_trap();
  for (const auto& ch : c.channels) {
    if (ch.values.size() != c.samples()) __builtin_trap();
    std::size_t nan = 0;
    for (const double v : ch.values) {
      if (std::isnan(v)) {
        ++nan;
      } else if (!std::isfinite(v)) {
        __builtin_trap();  // infinities are refused, never stored
      }
    }
    if (nan != ch.missing || (nan > 0) != (ch.first_missing_line > 0)) __builtin_trap();
  }
  if (c.time.uniform()) {
    if (!(c.time.dt_s > 0.0) || !std::isfinite(c.time.dt_s)) __builtin_trap();
  } else {
    if (c.time.t_s.size() != c.samples()) __builtin_trap();
    for (std::size_t i = 1; i < c.time.t_s.size(); ++i) {
      if (!(c.time.t_s[i] > c.time.t_s[i - 1])) __builtin_trap();
    }
    if (c.samples() > 1 && !(c.time.dt_s > 0.0)) __builtin_trap();
  }
  if (c.time_origin.empty()) __builtin_trap();
}

void read_with(std::string_view text, const benchtau::CsvOptions& options) {
  try {
    check(benchtau::read_csv_text(text, "fuzz.csv", options));
  } catch (const benchtau::InputError&) {
    // A clear refusal is a fine answer to hostile bytes.
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  read_with(text, {});
  benchtau::CsvOptions rate;
  rate.rate_Hz = 1e3;
  rate.threads = 2;
  read_with(text, rate);
  benchtau::CsvOptions forced;
  forced.time_column = "1";
  read_with(text, forced);
  return 0;
}
