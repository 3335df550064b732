// benchtau: the reader works out separators, decimal marks, line ends and layout by itself.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "tests/drivers/csv_test_support.h"

using benchtau::test::has_note;
using benchtau::test::read;
using benchtau::test::with_rate;
using benchtau::test::with_time_column;

namespace {

std::vector<double> values(const benchtau::CsvResult& r, std::size_t channel) {
  return r.capture.channels.at(channel).values;
}

}  // namespace

TEST_CASE("csv: comma-separated with a header and a time column") {
  const auto r = read("t,out,cap\n0,1.5,2.25\n0.001,-3.5,4\n0.002,5,6e-3\n");
  CHECK(r.dialect.separator == ',');
  CHECK_FALSE(r.dialect.decimal_comma);
  CHECK(r.dialect.has_header);
  CHECK(r.dialect.header_line == 1);
  CHECK(r.dialect.first_data_line == 2);
  CHECK(r.dialect.preamble_lines == 0);
  REQUIRE(r.capture.channels.size() == 2);
  CHECK(r.capture.channels[0].name == "out");
  CHECK(r.capture.channels[1].name == "cap");
  CHECK(values(r, 0) == std::vector<double>{1.5, -3.5, 5});
  CHECK(values(r, 1) == std::vector<double>{2.25, 4, 6e-3});
  CHECK(r.capture.time.t_s == std::vector<double>{0, 0.001, 0.002});
  CHECK(r.capture.time_origin == "time column \"t\"");
  CHECK(r.notes.front() == "Read as comma-separated values, with the header on line 1.");
}

TEST_CASE("csv: semicolon, tab and blank separators") {
  SECTION("semicolon") {
    const auto r = read("t;a;b\n0;1;2\n1;3;4\n");
    CHECK(r.dialect.separator == ';');
    CHECK_FALSE(r.dialect.decimal_comma);
    CHECK(values(r, 1) == std::vector<double>{2, 4});
  }
  SECTION("tab") {
    const auto r = read("t\ta\tb\n0\t1.5\t2\n1\t3\t4.5\n");
    CHECK(r.dialect.separator == '\t');
    CHECK(values(r, 0) == std::vector<double>{1.5, 3});
    CHECK(values(r, 1) == std::vector<double>{2, 4.5});
  }
  SECTION("runs of blanks, aligned columns") {
    const auto r = read("   t      a        b\n   0    1.5     -2\n   1   13.5   -4.25  \n");
    CHECK(r.dialect.separator == ' ');
    CHECK(r.dialect.has_header);
    CHECK(values(r, 0) == std::vector<double>{1.5, 13.5});
    CHECK(values(r, 1) == std::vector<double>{-2, -4.25});
    CHECK(r.notes.front() == "Read as blank-separated values, with the header on line 1.");
  }
  SECTION("blanks with units in the header names") {
    const auto r = read("t (ms)  out (V)\n0  1\n1  2\n");
    CHECK(r.dialect.separator == ' ');
    REQUIRE(r.capture.channels.size() == 1);
    CHECK(r.capture.channels[0].name == "out (V)");
    CHECK(r.capture.time.t_s == std::vector<double>{0, 1e-3});
  }
  SECTION("comma with blanks after it") {
    const auto r = read("t, a, b\n0, 1, 2\n1, 3, 4\n");
    CHECK(r.dialect.separator == ',');
    CHECK(r.capture.channels[0].name == "a");
    CHECK(values(r, 1) == std::vector<double>{2, 4});
  }
}

TEST_CASE("csv: decimal commas") {
  SECTION("with semicolons") {
    const auto r = read("t;out\n0;1,25\n0,5;-2,5\n1;3\n");
    CHECK(r.dialect.separator == ';');
    CHECK(r.dialect.decimal_comma);
    CHECK(r.capture.time.t_s == std::vector<double>{0, 0.5, 1});
    CHECK(values(r, 0) == std::vector<double>{1.25, -2.5, 3});
    CHECK(r.notes.front() ==
          "Read as semicolon-separated values with decimal commas, with the header on line 1.");
  }
  SECTION("with tabs") {
    const auto r = read("t\tout\n0\t1,25\n1\t2,5e-1\n");
    CHECK(r.dialect.separator == '\t');
    CHECK(r.dialect.decimal_comma);
    CHECK(values(r, 0) == std::vector<double>{1.25, 0.25});
  }
  SECTION("with blanks") {
    const auto r = read("0 1,5\n1 2,75\n2 3\n");
    CHECK(r.dialect.separator == ' ');
    CHECK(r.dialect.decimal_comma);
    CHECK(values(r, 0) == std::vector<double>{1.5, 2.75, 3});
  }
  SECTION("semicolons without any comma keep the decimal point") {
    const auto r = read("t;out\n0;1.25\n1;2\n");
    CHECK_FALSE(r.dialect.decimal_comma);
    CHECK(values(r, 0) == std::vector<double>{1.25, 2});
  }
}

TEST_CASE("csv: CRLF line ends, a byte-order mark and blank lines") {
  SECTION("CRLF") {
    const auto r = read("t,a\r\n0,1\r\n1,2\r\n");
    CHECK(values(r, 0) == std::vector<double>{1, 2});
    CHECK(r.capture.channels[0].name == "a");
  }
  SECTION("BOM") {
    const auto r = read("\xEF\xBB\xBFt,a\n0,1\n1,2\n");
    CHECK(r.dialect.has_header);
    CHECK(r.capture.time_origin == "time column \"t\"");
    CHECK(has_note(r, "byte-order mark"));
  }
  SECTION("blank lines before, inside and after the data") {
    const auto r = read("\n\n  \nt,a\n\n0,1\n\r\n   \n1,2\n\n\n2,3\n\n");
    CHECK(r.dialect.header_line == 4);
    CHECK(r.dialect.first_data_line == 6);
    CHECK(values(r, 0) == std::vector<double>{1, 2, 3});
    CHECK(r.capture.time.t_s == std::vector<double>{0, 1, 2});
  }
  SECTION("a last row with no line end is not read: it may be cut short") {
    const auto r = read("t,a\n0,1\n1,2.5\n2,3.2");
    CHECK(values(r, 0) == std::vector<double>{1, 2.5});
    CHECK(
        has_note(r,
                 "Line 4 has no line end, as if the file were cut short, so it was not read (a row "
                 "cut short can read as a wrong number)."));
    CHECK(benchtau::test::error_of("t,a\n0,1") ==
          "scope.csv: no data rows: line 2 has no line end, as if the file were cut short, so it "
          "was not "
          "read");
  }
  SECTION("a last line of blanks or a comment with no line end is no row") {
    const auto r = read("t,a\n0,1\n1,2\n# end");
    CHECK(values(r, 0) == std::vector<double>{1, 2});
    CHECK_FALSE(has_note(r, "no line end"));
    CHECK_FALSE(has_note(read("t,a\n0,1\n1,2\n  \r"), "no line end"));
  }
  SECTION("comment lines among the rows") {
    const auto r = read("t,a\n0,1\n# trigger\n1,2\n% marker\n// note\n2,3\n");
    CHECK(values(r, 0) == std::vector<double>{1, 2, 3});
  }
}

TEST_CASE("csv: trailing separators") {
  SECTION("every row ends with one; the empty last field is dropped") {
    const auto r = read("t,a,b\n0,1,2,\n1,3,4,\n");
    REQUIRE(r.capture.channels.size() == 2);
    CHECK(values(r, 1) == std::vector<double>{2, 4});
    CHECK(r.capture.channels[1].missing == 0);
    CHECK(has_note(r, "end with a separator"));
  }
  SECTION("header and rows both end with one") {
    const auto r = read("t,a,b,\n0,1,2,\n1,3,4,\n");
    REQUIRE(r.capture.channels.size() == 2);
    CHECK(values(r, 0) == std::vector<double>{1, 3});
  }
  SECTION("one row with an extra trailing separator") {
    const auto r = read("t,a,b\n0,1,2\n1,3,4,\n2,5,6\n");
    CHECK(values(r, 1) == std::vector<double>{2, 4, 6});
  }
  SECTION("a row cut short by its separator has an empty (missing) last cell") {
    const auto r = read("t,a,b\n0,1,2\n1,3,\n2,5,6\n");
    const auto& b = r.capture.channels[1];
    REQUIRE(b.values.size() == 3);
    CHECK(std::isnan(b.values[1]));
    CHECK(b.missing == 1);
    CHECK(b.first_missing_line == 3);
  }
  SECTION("headerless rows that all end with a separator") {
    auto options = with_time_column("none");
    options.rate_Hz = 50.0;
    const auto r = read("0,1,2,\n1,3,4,\n", options);
    REQUIRE(r.capture.channels.size() == 3);
    CHECK(r.capture.channels[2].name == "column 3");
    CHECK(values(r, 2) == std::vector<double>{2, 4});
  }
}

TEST_CASE("csv: number spellings") {
  const auto r = read("t,a\n0,1e-3\n1,-2.5E+2\n2,+4\n3,.5\n4,7.\n5,\"6.25\"\n6,-0\n");
  const auto v = values(r, 0);
  REQUIRE(v.size() == 7);
  CHECK(v[0] == 1e-3);
  CHECK(v[1] == -250.0);
  CHECK(v[2] == 4.0);
  CHECK(v[3] == 0.5);
  CHECK(v[4] == 7.0);
  CHECK(v[5] == 6.25);
  CHECK(v[6] == 0.0);
  CHECK(std::signbit(v[6]));
}

TEST_CASE("csv: quoted header cells") {
  const auto r = read("\"t (s)\",\"out, pin 3 (V)\"\n0,1\n1,2\n");
  REQUIRE(r.capture.channels.size() == 1);
  CHECK(r.capture.channels[0].name == "out, pin 3 (V)");
  CHECK(r.capture.channels[0].unit == "V");
}

TEST_CASE("csv: one column of numbers") {
  const auto r = read("1.5\n2.5\n3.5\n", with_rate(1000.0));
  REQUIRE(r.capture.channels.size() == 1);
  CHECK(r.capture.channels[0].name == "column 1");
  CHECK(values(r, 0) == std::vector<double>{1.5, 2.5, 3.5});
  CHECK(r.capture.time.uniform());
  CHECK(r.capture.time.dt_s == 1e-3);
}

TEST_CASE("csv: a header that does not fit the rows is read as metadata, with a note") {
  const auto r = read("Model,Bench logger,rev 2\n0,1\n1,5\n");
  CHECK_FALSE(r.dialect.has_header);
  CHECK(r.dialect.preamble_lines == 1);
  CHECK(r.capture.time_origin == "column 1, taken as time in seconds");
  CHECK(has_note(
      r, "Line 1 was read as metadata, not as the header: it has 3 fields and the data 2."));
}

TEST_CASE("csv: a header written as a comment line") {
  const auto r = read("# t, out, cap\n0,1,2\n1,3,4\n");
  CHECK(r.dialect.has_header);
  CHECK(r.dialect.header_line == 1);
  REQUIRE(r.capture.channels.size() == 2);
  CHECK(r.capture.channels[0].name == "out");
  CHECK(r.capture.time_origin == "time column \"t\"");
}
