// benchtau: the E-series tables and rounding to them, against IEC 60063.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>

#include "src/core/preferred_values.h"

using namespace benchtau;

namespace {

bool contains(std::span<const double> s, double v) {
  return std::any_of(s.begin(), s.end(), [&](double m) { return std::fabs(m - v) < 1e-12; });
}

}  // namespace

// Lengths and members below are IEC 60063's tables, recalled from memory.
TEST_CASE("each E-series has as many members per decade as its name says (IEC 60063)") {
  CHECK(series_values(ESeries::e3).size() == 3);
  CHECK(series_values(ESeries::e6).size() == 6);
  CHECK(series_values(ESeries::e12).size() == 12);
  CHECK(series_values(ESeries::e24).size() == 24);
  CHECK(series_values(ESeries::e48).size() == 48);
  CHECK(series_values(ESeries::e96).size() == 96);
  CHECK(series_values(ESeries::e192).size() == 192);
  for (ESeries s : {ESeries::e3, ESeries::e6, ESeries::e12, ESeries::e24, ESeries::e48,
                    ESeries::e96, ESeries::e192}) {
    const auto v = series_values(s);
    CHECK(std::is_sorted(v.begin(), v.end()));
    CHECK(v.front() == 1.0);
    CHECK(v.back() < 10.0);
  }
}

TEST_CASE("each coarser series is a subset of the next (IEC 60063)") {
  const auto e12 = series_values(ESeries::e12);
  const auto e24 = series_values(ESeries::e24);
  for (double v : e12) CHECK(contains(e24, v));
  for (double v : series_values(ESeries::e6)) CHECK(contains(e12, v));
  for (double v : series_values(ESeries::e3)) CHECK(contains(series_values(ESeries::e6), v));
  // The three-figure series: E48 is every other E96 member, E96 every other E192.
  const auto e48 = series_values(ESeries::e48);
  const auto e96 = series_values(ESeries::e96);
  const auto e192 = series_values(ESeries::e192);
  for (std::size_t i = 0; i < e48.size(); ++i) CHECK(e48[i] == e96[2 * i]);
  for (std::size_t i = 0; i < e96.size(); ++i) CHECK(e96[i] == e192[2 * i]);
}

TEST_CASE("E24 keeps its well-known irregular members (IEC 60063, from memory)") {
  const auto e24 = series_values(ESeries::e24);
  // 10^(i/24) rounded to two figures would give 2.6, 2.9, 3.2, 3.5, 3.8, 4.2,
  // 4.6 and 8.3; the standard's table has these instead.
  for (double v : {2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2}) CHECK(contains(e24, v));
  for (double v : {2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6, 8.3}) CHECK_FALSE(contains(e24, v));
  CHECK(contains(e24, 9.1));
  CHECK(contains(e24, 5.1));
}

TEST_CASE("the three-figure series follow 10^(i/n) to three figures, but E192's 9.20") {
  // IEC 60063 (from memory): E48, E96 and E192 are the rounded geometric
  // series, with the single exception of 9.20 in E192 (the formula gives 9.19).
  for (ESeries s : {ESeries::e48, ESeries::e96, ESeries::e192}) {
    const auto v = series_values(s);
    const double n = static_cast<double>(v.size());
    for (std::size_t i = 0; i < v.size(); ++i) {
      const double formula = std::round(100.0 * std::pow(10.0, static_cast<double>(i) / n)) / 100;
      if (s == ESeries::e192 && i == 185) {
        CHECK(v[i] == 9.20);
        CHECK(formula == 9.19);
      } else {
        CHECK(v[i] == formula);
      }
    }
  }
}

TEST_CASE("E96 members round-trip through nearest_preferred in every decade") {
  for (int decade = -12; decade <= 6; ++decade) {
    for (double m : series_values(ESeries::e96)) {
      const double v = m * std::pow(10.0, decade);
      const double got = nearest_preferred(v, ESeries::e96);
      CHECK(got == Approx(v).epsilon(1e-12));
      const PreferredNeighbours n = preferred_neighbours(v, ESeries::e96);
      CHECK(n.below == got);
      CHECK(n.above == got);
    }
  }
}

TEST_CASE("nearest_preferred rounds by ratio and crosses decades") {
  CHECK(nearest_preferred(4.5e3, ESeries::e12) == 4.7e3);
  CHECK(nearest_preferred(4.2e3, ESeries::e24) == 4.3e3);
  CHECK(nearest_preferred(9.6e3, ESeries::e24) == 10e3);  // up into the next decade
  CHECK(nearest_preferred(9.4e-9, ESeries::e12) == Approx(10e-9).epsilon(1e-12));
  CHECK(nearest_preferred(1.04, ESeries::e6) == 1.0);
  // Between 1.0 and 1.5 the geometric midpoint is sqrt(1.5) = 1.2247: 1.22
  // goes down and 1.23 up, where the arithmetic midpoint 1.25 would not.
  CHECK(nearest_preferred(1.22, ESeries::e6) == 1.0);
  CHECK(nearest_preferred(1.23, ESeries::e6) == 1.5);
  const PreferredNeighbours n = preferred_neighbours(50e3, ESeries::e24);
  CHECK(n.below == 47e3);
  CHECK(n.above == 51e3);
  const PreferredNeighbours top = preferred_neighbours(9.5, ESeries::e12);
  CHECK(top.below == 8.2);
  CHECK(top.above == 10.0);
  CHECK(std::isnan(nearest_preferred(0.0, ESeries::e24)));
  CHECK(std::isnan(nearest_preferred(-1.0, ESeries::e24)));
}

TEST_CASE("series names parse both ways") {
  CHECK(series_name(ESeries::e192) == "E192");
  CHECK(parse_series("e24") == ESeries::e24);
  CHECK(parse_series("E96") == ESeries::e96);
  CHECK_FALSE(parse_series("E25").has_value());
  CHECK_FALSE(parse_series("24").has_value());
  CHECK(series_tolerance(ESeries::e96) == 0.01);
}
