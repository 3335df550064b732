// benchtau: libFuzzer entry point: any bytes either read as a sound capture or throw InputError.
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <string>
#include <string_view>
#include <vector>

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

// The outcome of one read, for comparing two reads of the same text.
struct Outcome {
  bool ok = false;
  std::string error;
  benchtau::CsvResult result;
};

Outcome outcome(std::string_view text, unsigned threads) {
  benchtau::CsvOptions options;
  options.threads = threads;
  Outcome o;
  try {
    o.result = benchtau::read_csv_text(text, "fuzz.csv", options);
    o.ok = true;
  } catch (const benchtau::InputError& e) {
    o.error = e.what();
  }
  return o;
}

bool same_bits(const std::vector<double>& a, const std::vector<double>& b) {
  return a.size() == b.size() &&
         (a.empty() || std::memcmp(a.data(), b.data(), a.size() * sizeof(double)) == 0);
}

// Parsing in parts must not change anything: the same values, or the same error.
void check_parts_agree(std::string_view text) {
  const Outcome one = outcome(text, 1);
  const Outcome many = outcome(text, 2);
  if (one.ok != many.ok || one.error != many.error) __builtin_trap();
  if (!one.ok) return;
  const auto& a = one.result.capture;
  const auto& b = many.result.capture;
  if (a.channels.size() != b.channels.size() || !same_bits(a.time.t_s, b.time.t_s))
    __builtin_trap();
  for (std::size_t c = 0; c < a.channels.size(); ++c) {
    if (!same_bits(a.channels[c].values, b.channels[c].values)) __builtin_trap();
    if (a.channels[c].missing != b.channels[c].missing) __builtin_trap();
    if (a.channels[c].first_missing_line != b.channels[c].first_missing_line) __builtin_trap();
  }
  if (one.result.notes != many.result.notes) __builtin_trap();
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
  // For one input in 128, repeat it until it is big enough to split in two.
  if (size > 0 && size < 4096 && (data[0] & 127) == 0) {
    std::string big;
    while (big.size() < 2 * 64 * 1024 + 4096) big.append(text);
    check_parts_agree(big);
  }
  return 0;
}
