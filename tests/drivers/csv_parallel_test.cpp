// benchtau: parsing in parallel parts gives bit-identical results and the right error lines.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <string>
#include <vector>

#include "drivers/csv_rows.h"
#include "tests/drivers/csv_test_support.h"

using benchtau::test::with_threads;

namespace {

bool same_bits(const std::vector<double>& a, const std::vector<double>& b) {
  return a.size() == b.size() && std::memcmp(a.data(), b.data(), a.size() * sizeof(double)) == 0;
}

void require_identical(const benchtau::CsvResult& a, const benchtau::CsvResult& b) {
  REQUIRE(a.capture.samples() == b.capture.samples());
  REQUIRE(a.capture.channels.size() == b.capture.channels.size());
  for (std::size_t c = 0; c < a.capture.channels.size(); ++c) {
    const auto& x = a.capture.channels[c];
    const auto& y = b.capture.channels[c];
    CHECK(x.name == y.name);
    CHECK(x.unit == y.unit);
    CHECK(x.missing == y.missing);
    CHECK(x.first_missing_line == y.first_missing_line);
    CHECK(same_bits(x.values, y.values));
  }
  CHECK(same_bits(a.capture.time.t_s, b.capture.time.t_s));
  CHECK(std::memcmp(&a.capture.time.dt_s, &b.capture.time.dt_s, sizeof(double)) == 0);
  CHECK(a.capture.time.t0_s == b.capture.time.t0_s);
  CHECK(a.capture.time_origin == b.capture.time_origin);
  CHECK(a.notes == b.notes);
  CHECK(a.dialect.first_data_line == b.dialect.first_data_line);
}

// A capture of rows lines, about 30 bytes each, with blank lines, comments and
// gaps sprinkled through it so that every part has some. bad_line (1-based
// file line, 0 for none) holds a cell that is not a number.
std::string big_capture(int rows, std::size_t bad_line = 0) {
  std::string text = "# Invented capture for the parallel tests\nt [us],out (V),cap (mV)\n";
  std::size_t line = 3;
  char buf[96];
  for (int i = 0; i < rows; ++i) {
    if (i % 997 == 500) {
      text += "\n";
      ++line;
    }
    if (i % 1543 == 700) {
      text += "# marker\n";
      ++line;
    }
    const double out_V = (i / 61) % 2 ? 8.2 + 1e-4 * (i % 13) : 0.05 - 1e-4 * (i % 11);
    const double cap_mV = 3000.0 + 0.37 * (i % 4099);
    if (line == bad_line) {
      std::snprintf(buf, sizeof buf, "%d,%.5f,oops\n", i, out_V);
    } else if (i % 4001 == 17) {
      std::snprintf(buf, sizeof buf, "%d,,%.3f\n", i, cap_mV);
    } else {
      std::snprintf(buf, sizeof buf, "%d,%.5f,%.3f\n", i, out_V, cap_mV);
    }
    text += buf;
    ++line;
  }
  return text;
}

}  // namespace

TEST_CASE("csv parallel: the capture is big enough to be split") {
  const std::string text = big_capture(60000);
  REQUIRE(text.size() > 7 * benchtau::csv::min_part_bytes);
  const auto source = benchtau::csv::ByteSource::memory(text);
  benchtau::csv::RowLayout layout;
  layout.columns = 3;
  layout.labels = {"column 1", "column 2", "column 3"};
  layout.to_si = {1, 1, 1};
  layout.fields_reference = "line 3";
  const auto rows = benchtau::csv::parse_rows(source, text.find("0,"), 3, layout, 7, "scope.csv");
  CHECK(rows.workers == 7);
  // Split finer than the threads, but no part under the minimum size.
  CHECK(rows.parts > rows.workers);
  CHECK(rows.parts <= (text.size() - text.find("0,")) / benchtau::csv::min_part_bytes);
  CHECK(rows.rows == 60000);
}

TEST_CASE("csv parallel: threads 2, 3 and 7 give bit-identical results to one thread") {
  const std::string text = big_capture(60000);
  const auto one = benchtau::read_csv_text(text, "scope.csv", with_threads(1));
  REQUIRE(one.capture.samples() == 60000);
  CHECK(one.capture.channels[0].missing == 15);
  CHECK(one.capture.channels[0].first_missing_line == 20);
  CHECK(one.capture.time.t_s[59999] == Approx(59999e-6).epsilon(1e-15));
  CHECK(one.capture.channels[1].values[4098] ==
        Approx((3000.0 + 0.37 * 4098) * 1e-3).epsilon(1e-12));
  for (unsigned threads : {2u, 3u, 7u, 0u}) {
    CAPTURE(threads);
    require_identical(one, benchtau::read_csv_text(text, "scope.csv", with_threads(threads)));
  }
}

TEST_CASE("csv parallel: a file read in blocks matches the same text read from memory") {
  // Over 1 MiB, so that rows straddle the reader's block boundaries.
  const std::string text = big_capture(80000);
  REQUIRE(text.size() > (std::size_t{1} << 20) + 100000);
  const auto path = benchtau::test::scratch_file("parallel.csv", text);
  const auto memory = benchtau::read_csv_text(text, path, with_threads(1));
  for (unsigned threads : {1u, 2u, 3u, 7u}) {
    CAPTURE(threads);
    require_identical(memory, benchtau::read_csv_file(path, with_threads(threads)));
  }
}

TEST_CASE("csv parallel: the first error by line wins, whichever part finds it") {
  const std::string text = big_capture(60000, 50000);
  const std::string want = "scope.csv:50000:";
  for (unsigned threads : {1u, 2u, 3u, 7u}) {
    CAPTURE(threads);
    const auto e = benchtau::test::error_of(text, with_threads(threads));
    CHECK(e.rfind(want, 0) == 0);
    CHECK(e.find("expected a number in column \"cap (mV)\", found \"oops\"") != std::string::npos);
  }
  // Two bad rows, in the first and the last part: the earlier is reported.
  std::string two = big_capture(60000, 58000);
  const auto at = two.find("\n1000,");
  two.replace(two.find(',', at + 1), 1, ";");
  const std::string cell = two.substr(at + 1, two.find(',', at + 1) - at - 1);
  REQUIRE(cell.rfind("1000;", 0) == 0);
  for (unsigned threads : {1u, 2u, 7u}) {
    CAPTURE(threads);
    // Row 1000 sits on line 1005: two header lines, a blank and a comment before it.
    CHECK(benchtau::test::error_of(two, with_threads(threads)) ==
          "scope.csv:1005:1: expected a number in column \"t [us]\", found \"" + cell + "\"");
  }
}

TEST_CASE("csv parallel: time that goes back at a part boundary is caught") {
  // Put the fault on each line around the middle of the data, so that one of
  // them is the first row of the second part when split in two.
  const std::string base = big_capture(20000);
  const std::size_t middle = base.size() / 2;
  std::size_t line_start = base.rfind('\n', middle) + 1;
  std::size_t line = 1 + static_cast<std::size_t>(std::count(
                             base.begin(), base.begin() + static_cast<long>(line_start), '\n'));
  for (int k = 0; k < 12; ++k) {
    const std::size_t end = base.find('\n', line_start);
    std::string text = base;
    // Rewrite this row's time as 0.
    const std::size_t comma = text.find(',', line_start);
    if (text[line_start] != '#' && comma < end) {
      text.replace(line_start, comma - line_start, "0");
      CAPTURE(line);
      const std::string want =
          "scope.csv:" + std::to_string(line) + ":1: time in column \"t [us]\" does not increase";
      for (unsigned threads : {1u, 2u}) {
        CHECK(benchtau::test::error_of(text, with_threads(threads)).rfind(want, 0) == 0);
      }
    }
    line_start = end + 1;
    ++line;
  }
}

TEST_CASE("csv parallel: a headerless first column that stops rising is found across parts") {
  std::string text;
  char buf[64];
  for (int i = 0; i < 30000; ++i) {
    std::snprintf(buf, sizeof buf, "%d,%.4f\n", i, 0.5 * (i % 17));
    text += buf;
  }
  const std::size_t middle = text.rfind('\n', text.size() / 2) + 1;
  for (int k = 0; k < 6; ++k) {
    std::string t = text;
    std::size_t at = middle;
    for (int j = 0; j < k; ++j) at = t.find('\n', at) + 1;
    const std::size_t line = 1 + static_cast<std::size_t>(std::count(
                                     t.begin(), t.begin() + static_cast<long>(at), '\n'));
    t.replace(at, t.find(',', at) - at, "-1");
    const std::string want =
        "scope.csv: no time column and no sample rate: give --rate (samples per second); column 1 "
        "does not increase on line " +
        std::to_string(line) + ", so it is not time";
    for (unsigned threads : {1u, 2u, 3u}) {
      CAPTURE(k, threads);
      CHECK(benchtau::test::error_of(t, with_threads(threads)) == want);
    }
  }
}

TEST_CASE("csv parallel: a long last line with no line end is reported whatever the threads") {
  // The last line is longer than a part, so the parts after the one that
  // holds its start are empty: the note must still come from that one.
  std::string text = big_capture(60000);
  const std::size_t lines = static_cast<std::size_t>(std::count(text.begin(), text.end(), '\n'));
  text += "60000," + std::string(text.size(), '7');
  const std::string note = "Line " + std::to_string(lines + 1) +
                           " has no line end, as if the file were cut short, so it was not read "
                           "(a row cut short can read as a wrong number).";
  for (unsigned threads : {1u, 2u, 7u}) {
    CAPTURE(threads);
    const auto r = benchtau::read_csv_text(text, "scope.csv", with_threads(threads));
    CHECK(r.capture.samples() == 60000);
    CHECK(std::find(r.notes.begin(), r.notes.end(), note) != r.notes.end());
  }
}
