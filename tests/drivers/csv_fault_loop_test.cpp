// benchtau: every prefix of a valid capture reads as its complete rows, or fails clearly.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstring>
#include <string>
#include <vector>

#include "tests/drivers/csv_test_support.h"

namespace {

struct Capture {
  std::string text;
  std::vector<std::size_t> row_ends;  // offset of each data row's '\n'
};

// Builds a capture from lines; data rows are marked with a leading '!'.
Capture build(const std::vector<std::string>& lines, const char* eol) {
  Capture c;
  for (const auto& line : lines) {
    const bool row = !line.empty() && line[0] == '!';
    c.text += row ? line.substr(1) : line;
    c.text += eol;
    if (row) c.row_ends.push_back(c.text.size() - 1);
  }
  return c;
}

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

// Reads every prefix (every stride-th) and checks it against the whole read.
void fault_loop(const Capture& c, std::size_t stride, const benchtau::CsvOptions& options = {}) {
  const auto whole = benchtau::read_csv_text(c.text, "scope.csv", options);
  REQUIRE(whole.capture.samples() == c.row_ends.size());
  std::size_t failures = 0, successes = 0;
  for (std::size_t n = 0; n <= c.text.size(); n += stride) {
    const std::string_view prefix(c.text.data(), n);
    std::size_t complete = 0;
    while (complete < c.row_ends.size() && c.row_ends[complete] < n) ++complete;
    CAPTURE(n, complete);
    try {
      const auto part = benchtau::read_csv_text(prefix, "scope.csv", options);
      ++successes;
      REQUIRE(part.capture.samples() == complete);
      REQUIRE(part.capture.channels.size() == whole.capture.channels.size());
      for (std::size_t ch = 0; ch < whole.capture.channels.size(); ++ch) {
        const auto& got = part.capture.channels[ch];
        const auto& want = whole.capture.channels[ch];
        CHECK(got.name == want.name);
        CHECK(got.unit == want.unit);
        for (std::size_t i = 0; i < complete; ++i)
          REQUIRE(same_bits(got.values[i], want.values[i]));
      }
      const auto& t = part.capture.time;
      CHECK(t.uniform() == whole.capture.time.uniform());
      for (std::size_t i = 0; i < complete; ++i)
        REQUIRE(same_bits(t.at(i), whole.capture.time.at(i)));
    } catch (const benchtau::InputError& e) {
      ++failures;
      // With two complete rows under the header the capture must read.
      CHECK(complete < 2);
      CHECK(std::string(e.what()).rfind("scope.csv", 0) == 0);
    }
  }
  CHECK(successes > 0);
  CHECK(failures > 0);
}

std::vector<std::string> rows_of(int n, const char* format_kind) {
  std::vector<std::string> rows;
  for (int i = 0; i < n; ++i) {
    const double out_V = (i / 7) % 2 ? 8.25 : 0.0625;
    const double cap_mV = 3000.0 + 125.5 * (i % 7);
    char buf[96];
    if (std::string(format_kind) == "comma") {
      std::snprintf(buf, sizeof buf, "!%d,%.4f,%.1f", i, out_V, cap_mV);
    } else if (std::string(format_kind) == "semicolon") {
      std::snprintf(buf, sizeof buf, "!%.4f;%.1f", out_V, cap_mV);
      for (char* p = buf; *p; ++p) *p = *p == '.' ? ',' : *p;
    } else if (std::string(format_kind) == "blank") {
      std::snprintf(buf, sizeof buf, "!  %.6e   %.4f   %.3e", i * 1e-6, out_V, cap_mV * 1e-3);
    } else {
      if (i % 5 == 3) {
        std::snprintf(buf, sizeof buf, "!%d\t\t%.1f", i * 10, cap_mV);
      } else {
        std::snprintf(buf, sizeof buf, "!%d\t%.4f\t%s", i * 10, out_V, i % 6 == 1 ? "NaN" : "12.5");
      }
    }
    rows.emplace_back(buf);
  }
  return rows;
}

}  // namespace

TEST_CASE("csv fault loop: comma, preamble, units, a blank line and a comment among the rows") {
  std::vector<std::string> lines = {"# Invented bench capture", "Sample interval,1,us", "",
                                    "t [us],out (V),cap (mV)"};
  auto rows = rows_of(40, "comma");
  lines.insert(lines.end(), rows.begin(), rows.begin() + 20);
  lines.push_back("");
  lines.push_back("# trigger re-armed");
  lines.insert(lines.end(), rows.begin() + 20, rows.end());
  fault_loop(build(lines, "\n"), 1);
}

TEST_CASE("csv fault loop: semicolons and decimal commas, rate in the preamble, CRLF") {
  std::vector<std::string> lines = {"Sample rate;1;MHz", "out (V);cap (mV)"};
  const auto rows = rows_of(40, "semicolon");
  lines.insert(lines.end(), rows.begin(), rows.end());
  fault_loop(build(lines, "\r\n"), 1);
}

TEST_CASE("csv fault loop: blank-separated, no header, time taken from column 1") {
  fault_loop(build(rows_of(40, "blank"), "\n"), 1);
}

TEST_CASE("csv fault loop: tabs with empty and NaN cells") {
  std::vector<std::string> lines = {"time (ns)\tout\tcap"};
  const auto rows = rows_of(40, "tab");
  lines.insert(lines.end(), rows.begin(), rows.end());
  fault_loop(build(lines, "\n"), 1);
}

TEST_CASE("csv fault loop: a capture large enough to split, read with two threads") {
  std::vector<std::string> lines = {"t [us],out (V),cap (mV)"};
  const auto rows = rows_of(12000, "comma");
  lines.insert(lines.end(), rows.begin(), rows.end());
  fault_loop(build(lines, "\n"), 1009, benchtau::test::with_threads(2));
}
