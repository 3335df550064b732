// benchtau: engineering notation, exact text both ways.
#include <catch2/catch.hpp>

#include <cmath>

#include "src/core/engineering.h"

using benchtau::format_eng;
using benchtau::format_percent;
using benchtau::parse_eng;

TEST_CASE("format_eng prints three significant figures with an SI prefix") {
  CHECK(format_eng(0.00487, "s") == "4.87 ms");
  CHECK(format_eng(6.01, "V") == "6.01 V");
  CHECK(format_eng(205.3, "Hz") == "205 Hz");
  CHECK(format_eng(1.2e-6, "s") == "1.20 us");
  CHECK(format_eng(47e3, "ohm") == "47.0 kohm");
  CHECK(format_eng(-0.0315, "V") == "-31.5 mV");
  CHECK(format_eng(0.0, "V") == "0 V");
  CHECK(format_eng(NAN, "V") == "-");
  CHECK(format_eng(2.5e6, "S/s") == "2.50 MS/s");
}

TEST_CASE("format_eng carries rounding into the next prefix") {
  CHECK(format_eng(0.99996, "s") == "1.00 s");
  CHECK(format_eng(999.96e-6, "s") == "1.00 ms");
  CHECK(format_eng(999.4e-6, "s") == "999 us");
}

TEST_CASE("format_eng gives exactly the significant figures asked for, at a decade too") {
  // Rounding to three significant figures (common practice): a value that
  // rounds up into the next decade keeps three figures, not four.
  CHECK(format_eng(0.1, "V") == "100 mV");
  CHECK(format_eng(-0.1, "V") == "-100 mV");
  CHECK(format_eng(0.3, "V") == "300 mV");
  CHECK(format_eng(99.96e-3, "V") == "100 mV");
  CHECK(format_eng(9.9996, "V") == "10.0 V");
  CHECK(format_eng(1.0, "V") == "1.00 V");
  CHECK(format_eng(0.001, "s") == "1.00 ms");
  CHECK(format_eng(1e3, "ohm") == "1.00 kohm");
  CHECK(format_eng(10e3, "ohm") == "10.0 kohm");
  CHECK(format_eng(0.5, "") == "500 m");
  CHECK(format_eng(4.87e-3, "s", 2) == "4.9 ms");
  CHECK(format_eng(0.1, "V", 2) == "100 mV");
  CHECK(format_eng(0.1234, "V", 4) == "123.4 mV");
  // Beyond the prefixes, the figures stay and the point moves.
  CHECK(format_eng(1e-18, "F") == "0.00100 fF");
  CHECK(format_eng(2.5e16, "Hz") == "25000 THz");
}

TEST_CASE("format_percent") {
  CHECK(format_percent(0.523) == "52.3 %");
  CHECK(format_percent(0.5, 2) == "50.00 %");
  CHECK(format_percent(NAN) == "-");
}

TEST_CASE("parse_eng reads part values as they are printed on schematics") {
  // The letter standing for the decimal point ("4k7") is the marking of
  // IEC 60062 (from memory): R, k, M for ohms.
  CHECK(*parse_eng("4k7") == Approx(4700.0));
  CHECK(*parse_eng("2M2") == Approx(2.2e6));
  CHECK(*parse_eng("4R7") == Approx(4.7));
  CHECK(*parse_eng("10k") == Approx(10e3));
  CHECK(*parse_eng("4.7u") == Approx(4.7e-6));
  CHECK(*parse_eng("100n") == Approx(100e-9));
  CHECK(*parse_eng("1e-6") == Approx(1e-6));
  CHECK(*parse_eng("  33p ") == Approx(33e-12));
  CHECK(*parse_eng("4.7\xC2\xB5") == Approx(4.7e-6));
}

TEST_CASE("parse_eng with a unit accepts its usual spellings") {
  CHECK(*parse_eng("500 kHz", "Hz") == Approx(500e3));
  CHECK(*parse_eng("2.5 MS/s", "Hz") == Approx(2.5e6));
  CHECK(*parse_eng("1MSa/s", "Hz") == Approx(1e6));
  CHECK(*parse_eng("1M", "Hz") == Approx(1e6));
  CHECK(*parse_eng("20 us", "s") == Approx(20e-6));
  CHECK(*parse_eng("2e-6 s", "s") == Approx(2e-6));
  CHECK(*parse_eng("250", "Hz") == Approx(250.0));
}

TEST_CASE("parse_eng refuses what is not a number") {
  CHECK_FALSE(parse_eng(""));
  CHECK_FALSE(parse_eng("abc"));
  CHECK_FALSE(parse_eng("10 kHz"));  // a unit where none was asked for
  CHECK_FALSE(parse_eng("10 kV", "Hz"));
  CHECK_FALSE(parse_eng("4.7k7"));
  CHECK_FALSE(parse_eng("1e999"));
  CHECK_FALSE(parse_eng("nan"));
}
