// benchtau: empty and NaN cells are stored as NaN and counted, never filled in.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "tests/drivers/csv_test_support.h"

using benchtau::test::has_note;
using benchtau::test::read;
using benchtau::test::with_rate;

TEST_CASE("csv missing: empty and NaN cells are counted per channel") {
  const auto r = read("t,a,b\n0,1,2\n1,,3\n2,NaN,nan\n3,4,5\n4,-nan,\n");
  const auto& a = r.capture.channels[0];
  const auto& b = r.capture.channels[1];
  REQUIRE(a.values.size() == 5);
  CHECK(a.missing == 3);
  CHECK(a.first_missing_line == 3);
  CHECK(std::isnan(a.values[1]));
  CHECK(std::isnan(a.values[2]));
  CHECK(a.values[3] == 4.0);
  CHECK(std::isnan(a.values[4]));
  CHECK(b.missing == 2);
  CHECK(b.first_missing_line == 4);
  CHECK(b.values[0] == 2.0);
  CHECK(std::isnan(b.values[4]));
  CHECK(has_note(
      r,
      "Column \"a\" has 3 missing values (empty or NaN), the first on line 3; they are kept as "
      "gaps, not filled in."));
  CHECK(has_note(r, "Column \"b\" has 2 missing values"));
}

TEST_CASE("csv missing: a complete channel has none and no note") {
  const auto r = read("t,a\n0,1\n1,2\n");
  CHECK(r.capture.channels[0].missing == 0);
  CHECK(r.capture.channels[0].first_missing_line == 0);
  CHECK_FALSE(has_note(r, "missing"));
}

TEST_CASE("csv missing: gaps with other dialects") {
  SECTION("tab-separated, an empty middle cell") {
    const auto r = read("t\ta\tb\n0\t\t1\n1\t2\t3\n");
    CHECK(r.capture.channels[0].missing == 1);
    CHECK(std::isnan(r.capture.channels[0].values[0]));
    CHECK(r.capture.channels[1].values[0] == 1.0);
  }
  SECTION("blank-separated, NaN written out") {
    const auto r = read("0 1 2\n1 NaN 3\n2 4 5\n");
    CHECK(r.capture.channels[0].missing == 1);
    CHECK(r.capture.channels[0].first_missing_line == 2);
  }
  SECTION("semicolons with decimal commas") {
    const auto r = read("t;a\n0;1,5\n1;\n2;nan\n");
    CHECK(r.capture.channels[0].missing == 2);
    CHECK(r.capture.channels[0].values[0] == 1.5);
  }
  SECTION("a row of nothing but separators") {
    const auto r = read("a,b\n1,2\n,\n3,4\n", with_rate(1.0));
    CHECK(r.capture.channels[0].missing == 1);
    CHECK(r.capture.channels[1].missing == 1);
    CHECK(r.capture.samples() == 3);
  }
}
