// benchtau: units in column names, SI scaling, and which column is time.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "drivers/csv_units.h"
#include "tests/drivers/csv_test_support.h"

using benchtau::test::error_of;
using benchtau::test::has_note;
using benchtau::test::read;
using benchtau::test::with_rate;
using benchtau::test::with_time_column;

TEST_CASE("csv: column names split into name and unit") {
  using benchtau::csv::parse_column_name;
  using benchtau::csv::Quantity;
  struct Case {
    const char* cell;
    const char* base;
    const char* unit;
    Quantity quantity;
    double to_si;
    const char* si;
  };
  const Case cases[] = {
      {"t [ms]", "t", "ms", Quantity::time, 1e-3, "s"},
      {"Time (us)", "Time", "us", Quantity::time, 1e-6, "s"},
      {"time (\xC2\xB5s)", "time", "\xC2\xB5s", Quantity::time, 1e-6, "s"},
      {"time (\xCE\xBCs)", "time", "\xCE\xBCs", Quantity::time, 1e-6, "s"},
      {"t(ns)", "t", "ns", Quantity::time, 1e-9, "s"},
      {"time_s", "time", "s", Quantity::time, 1.0, "s"},
      {"CH2 (mV)", "CH2", "mV", Quantity::voltage, 1e-3, "V"},
      {"out_V", "out", "V", Quantity::voltage, 1.0, "V"},
      {"cap/mV", "cap", "mV", Quantity::voltage, 1e-3, "V"},
      {"supply [kV]", "supply", "kV", Quantity::voltage, 1e3, "V"},
      {"I_load (mA)", "I_load", "mA", Quantity::current, 1e-3, "A"},
      {"leak/uA", "leak", "uA", Quantity::current, 1e-6, "A"},
      {"temp (degC)", "temp", "degC", Quantity::other, 1.0, "degC"},
      {"ch_a", "ch_a", "", Quantity::none, 1.0, ""},  // "a" is no safe suffix
      {"my_signal", "my_signal", "", Quantity::none, 1.0, ""},
      {" \"out\" ", "out", "", Quantity::none, 1.0, ""},
  };
  for (const auto& c : cases) {
    CAPTURE(c.cell);
    const auto n = parse_column_name(c.cell);
    CHECK(n.base == c.base);
    CHECK(n.unit == c.unit);
    CHECK(n.quantity == c.quantity);
    CHECK(n.to_si == c.to_si);
    CHECK(n.si_unit == c.si);
  }
}

TEST_CASE("csv: header units scale the values to SI") {
  const auto r = read("t [ms],CH1 (mV),CH2 (V),I (uA)\n0,1500,1.5,250\n0.5,-20,2,-1\n");
  REQUIRE(r.capture.channels.size() == 3);
  const auto& ch1 = r.capture.channels[0];
  CHECK(ch1.name == "CH1 (mV)");
  CHECK(ch1.unit == "V");
  CHECK(ch1.values[0] == Approx(1.5).epsilon(1e-15));
  CHECK(ch1.values[1] == Approx(-0.020).epsilon(1e-15));
  CHECK(r.capture.channels[1].unit == "V");
  CHECK(r.capture.channels[1].values[1] == 2.0);
  CHECK(r.capture.channels[2].unit == "A");
  CHECK(r.capture.channels[2].values[0] == Approx(250e-6).epsilon(1e-15));
  CHECK(r.capture.time.t_s[1] == Approx(0.5e-3).epsilon(1e-15));
  CHECK(r.capture.time.dt_s == Approx(0.5e-3).epsilon(1e-15));
  CHECK(has_note(r, "Time is read from column \"t [ms]\" in ms and converted to seconds."));
  CHECK(has_note(r, "Column \"CH1 (mV)\" is in mV; its values were converted to V."));
}

TEST_CASE("csv: a column without a unit keeps an empty unit, an unknown unit is kept as written") {
  const auto r = read("time,out,temp (degC)\n0,1,20\n1,2,21\n");
  CHECK(r.capture.channels[0].unit.empty());
  CHECK(r.capture.channels[1].unit == "degC");
  CHECK(r.capture.channels[1].values == std::vector<double>{20, 21});
  CHECK(has_note(r, "Column \"temp (degC)\" is in \"degC\", a unit benchtau does not know"));
  CHECK(has_note(
      r,
      "Time is read from column \"time\", which gives no unit of time; it is taken as seconds."));
}

TEST_CASE("csv: time columns in s, ms, us and ns") {
  struct Case {
    const char* header;
    double step_s;
  };
  const Case cases[] = {
      {"t (s),v\n", 1.0}, {"t (ms),v\n", 1e-3}, {"t (us),v\n", 1e-6}, {"t (ns),v\n", 1e-9}};
  for (const auto& c : cases) {
    CAPTURE(c.header);
    const auto r = read(std::string(c.header) + "10,1\n12,2\n14,3\n");
    CHECK(r.capture.time.t0_s == Approx(10 * c.step_s).epsilon(1e-15));
    CHECK(r.capture.time.dt_s == Approx(2 * c.step_s).epsilon(1e-15));
    CHECK(r.capture.duration_s() == Approx(4 * c.step_s).epsilon(1e-15));
    CHECK(r.capture.channels.size() == 1);
  }
}

TEST_CASE("csv: the time column is found by name or by unit, wherever it stands") {
  SECTION("by unit, not first") {
    const auto r = read("out (V),elapsed (ms)\n1,0\n2,1\n");
    CHECK(r.capture.time_origin == "time column \"elapsed (ms)\"");
    REQUIRE(r.capture.channels.size() == 1);
    CHECK(r.capture.channels[0].name == "out (V)");
  }
  SECTION("a name meaning time with a voltage unit is a channel") {
    const auto r = read("t (V),out\n0,1\n1,2\n", with_rate(10.0));
    CHECK(r.capture.channels.size() == 2);
    CHECK(r.capture.time_origin == "--rate");
  }
}

TEST_CASE("csv: median step of an uneven time column") {
  const auto r = read("t,v\n0,0\n1,0\n2,0\n4,0\n5,0\n");  // steps 1 1 2 1
  CHECK(r.capture.time.dt_s == 1.0);
  CHECK(r.capture.time.t_s.back() == 5.0);
}

TEST_CASE("csv: no header: channels are numbered from 1") {
  SECTION("an increasing first column is time in seconds") {
    const auto r = read("0.0,1,4\n0.1,2,5\n0.2,3,6\n");
    CHECK_FALSE(r.dialect.has_header);
    REQUIRE(r.capture.channels.size() == 2);
    CHECK(r.capture.channels[0].name == "column 2");
    CHECK(r.capture.channels[1].name == "column 3");
    CHECK(r.capture.channels[0].unit.empty());
    CHECK(r.capture.time_origin == "column 1, taken as time in seconds");
    CHECK(r.capture.time.dt_s == Approx(0.1));
    CHECK(has_note(r, "first column increases on every row, so it was taken as time in seconds"));
  }
  SECTION("a first column that does not increase is a channel; then a rate is needed") {
    CHECK(
        error_of("0,1\n2,2\n1,3\n") ==
        "scope.csv: no time column and no sample rate: give --rate (samples per second); column 1 "
        "does not increase on line 3, so it is not time");
    const auto r = read("0,1\n2,2\n1,3\n", with_rate(100.0));
    REQUIRE(r.capture.channels.size() == 2);
    CHECK(r.capture.channels[0].name == "column 1");
    CHECK(r.capture.channels[0].values == std::vector<double>{0, 2, 1});
    CHECK(r.capture.time.dt_s == Approx(0.01));
  }
  SECTION("a single column is never taken as time") {
    CHECK(error_of("1\n2\n3\n") ==
          "scope.csv: no time column and no sample rate: give --rate (samples per second)");
  }
}

TEST_CASE("csv: --rate with a time column is ignored, with a note") {
  const auto r = read("t,v\n0,1\n0.5,2\n", with_rate(1e6));
  CHECK(r.capture.time.dt_s == 0.5);
  CHECK(r.capture.time_origin == "time column \"t\"");
  CHECK(has_note(r, "--rate was ignored: the file has a time column."));
}

TEST_CASE("csv: forcing the time column") {
  const std::string text = "a,b,c\n5,0,9\n4,1,8\n3,2,7\n";
  SECTION("by name") {
    const auto r = read(text, with_time_column("B"));
    CHECK(r.capture.time.t_s == std::vector<double>{0, 1, 2});
    REQUIRE(r.capture.channels.size() == 2);
    CHECK(r.capture.channels[0].name == "a");
    CHECK(r.capture.channels[1].name == "c");
  }
  SECTION("by number") {
    const auto r = read(text, with_time_column("2"));
    CHECK(r.capture.time_origin == "time column \"b\"");
  }
  SECTION("none, with a rate") {
    auto o = with_time_column("none");
    o.rate_Hz = 2.0;
    const auto r = read("t,v\n0,1\n1,2\n", o);
    CHECK(r.capture.channels.size() == 2);
    CHECK(r.capture.time.uniform());
    CHECK(r.capture.time.dt_s == 0.5);
  }
  SECTION("a column that is not there") {
    CHECK(error_of(text, with_time_column("x")) ==
          "scope.csv: time column \"x\" is not in the header; its columns are \"a\", \"b\", \"c\"");
    CHECK(error_of(text, with_time_column("4")) ==
          "scope.csv: time column 4 does not exist: the file has 3 columns");
    CHECK(error_of("1,2\n3,4\n", with_time_column("t")) ==
          "scope.csv: time column \"t\" cannot be found by name: the file has no header; give its "
          "number instead");
  }
  SECTION("a forced column that does not increase is an error") {
    CHECK(error_of(text, with_time_column("a")) ==
          "scope.csv:3:1: time in column \"a\" does not increase: 4 s after 5 s");
  }
  SECTION("a forced column in volts is refused") {
    CHECK(error_of("x (V),y\n0,1\n1,2\n", with_time_column("1")) ==
          "scope.csv: time column \"x (V)\" is in V, not in a unit of time");
  }
}

TEST_CASE("csv: a time column that goes back or stands still names the line") {
  CHECK(error_of("t,v\n0,1\n1,2\n1,3\n") ==
        "scope.csv:4:1: time in column \"t\" does not increase: 1 s after 1 s");
  CHECK(error_of("v,t (ms)\n1,0\n2,2\n3,1\n") ==
        "scope.csv:4:3: time in column \"t (ms)\" does not increase: 0.001 s after 0.002 s");
  CHECK(error_of("t,v\n0,1\n,2\n") == "scope.csv:3:1: time in column \"t\" is missing");
  CHECK(error_of("t,v\n0,1\nnan,2\n") == "scope.csv:3:1: time in column \"t\" is missing");
}

TEST_CASE("csv: a file of only a time column has no signal") {
  CHECK(error_of("t\n0\n1\n") ==
        "scope.csv: no signal columns: the only column is the time column \"t\"");
}
