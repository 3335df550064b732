// benchtau: plain rows (numbers, separators, line end) read the same by the plain and general
// paths.
#include <catch2/catch.hpp>

#include <cstring>
#include <random>
#include <string>

#include "tests/drivers/csv_test_support.h"

using namespace benchtau;
using benchtau::test::error_of;
using benchtau::test::read;

namespace {

// A capture whose rows are plain ("t,a,b\n") or, with padded, carry a blank
// after each separator, which sends every row down the general path.
std::string capture_text(bool padded, std::uint32_t seed) {
  std::mt19937 rng(seed);
  std::uniform_int_distribution<int> pick(0, 99);
  const std::string sep = padded ? ", " : ",";
  std::string s = "t [ms],out [V],cap (mV)\n";
  for (int i = 0; i < 3000; ++i) {
    s += std::to_string(i) + "." + std::to_string(pick(rng) % 10);  // time rises
    // Cells of each kind: short decimals, exponents, long mantissas (from_chars), gaps.
    const int kind = pick(rng);
    std::string a = kind < 60   ? std::to_string(pick(rng)) + "." + std::to_string(pick(rng))
                    : kind < 75 ? "-" + std::to_string(pick(rng)) + "e-3"
                    : kind < 90 ? "0.12345678901234567891"
                    : kind < 95 ? ""
                                : "NaN";
    s += sep + a + sep + std::to_string(pick(rng) * 37) + "\n";
  }
  return s;
}

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

}  // namespace

TEST_CASE("csv plain rows: the plain path and the general path give the same samples") {
  for (const std::uint32_t seed : {1U, 2U, 3U}) {
    const CsvResult plain = read(capture_text(false, seed));
    const CsvResult padded = read(capture_text(true, seed));
    REQUIRE(plain.capture.samples() == 3000);
    REQUIRE(padded.capture.samples() == 3000);
    for (std::size_t i = 0; i < 3000; ++i) {
      REQUIRE(same_bits(plain.capture.time.t_s[i], padded.capture.time.t_s[i]));
    }
    REQUIRE(plain.capture.channels.size() == padded.capture.channels.size());
    for (std::size_t c = 0; c < plain.capture.channels.size(); ++c) {
      const Channel &a = plain.capture.channels[c], &b = padded.capture.channels[c];
      CHECK(a.missing == b.missing);
      CHECK(a.first_missing_line == b.first_missing_line);
      std::size_t differ = 0;
      for (std::size_t i = 0; i < 3000; ++i) differ += !same_bits(a.values[i], b.values[i]);
      CHECK(differ == 0);
    }
  }
}

TEST_CASE("csv plain rows: a plain row whose time goes back gets the general path's error") {
  // The same message, line and column either way: the plain path hands the row over.
  CHECK(error_of("t (s),out (V)\n0.1,5\n0.2,5\n0.15,0\n0.3,0\n") ==
        "scope.csv:4:1: time in column \"t (s)\" does not increase: 0.15 s after 0.2 s");
  CHECK(error_of("out (V),t (s)\n5,0.1\n5,0.2\n0,0.2\n") ==
        "scope.csv:4:3: time in column \"t (s)\" does not increase: 0.2 s after 0.2 s");
}

TEST_CASE("csv plain rows: rows with too few or too many cells are still caught") {
  CHECK(error_of("t (s),out (V),cap (V)\n0.1,5,3\n0.2,5\n") ==
        "scope.csv:3: expected 3 fields like the header on line 1, found 2");
  CHECK(error_of("t (s),out (V)\n0.1,5\n0.2,5,7\n") ==
        "scope.csv:3: expected 2 fields like the header on line 1, found 3");
}
