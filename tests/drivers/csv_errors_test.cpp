// benchtau: hostile inputs each give one clear error naming file, line and column.
#include <catch2/catch.hpp>

#include <sys/stat.h>
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <string>

#include "tests/drivers/csv_test_support.h"

using benchtau::test::error_of;
using benchtau::test::file_error_of;
using benchtau::test::read;
using benchtau::test::scratch_file;
using namespace std::string_view_literals;

TEST_CASE("csv errors: nothing to read") {
  CHECK(error_of("") == "scope.csv: no data rows: the file is empty");
  CHECK(error_of("\n\n   \n\r\n") == "scope.csv: no data rows: the file holds no lines of data");
  CHECK(error_of("# a comment\n% another\n") ==
        "scope.csv: no data rows: the file holds no lines of data");
  CHECK(error_of("\xEF\xBB\xBF") == "scope.csv: no data rows: the file holds no lines of data");
  CHECK(error_of("hello there\nthis is a note\n") ==
        "scope.csv: no data rows: found no line of numbers");
}

TEST_CASE("csv errors: a header and nothing under it") {
  CHECK(error_of("t,out,cap\n") ==
        "scope.csv: no data rows: line 1 looks like a header, but no rows of numbers follow it");
  CHECK(error_of("Sample interval,1e-6\nt;out\n\n# end\n") ==
        "scope.csv: no data rows: line 2 looks like a header, but no rows of numbers follow it");
}

TEST_CASE("csv errors: ragged rows") {
  CHECK(error_of("t,a,b\n0,1,2\n1,2\n2,3,4\n") ==
        "scope.csv:3: expected 3 fields like the header on line 1, found 2");
  CHECK(error_of("t,a,b\n0,1,2\n1,2,3,4\n") ==
        "scope.csv:3: expected 3 fields like the header on line 1, found 4");
  CHECK(error_of("0,1,2\n1,2,3,4\n") == "scope.csv:2: expected 3 fields like line 1, found 4");
  CHECK(error_of("# x\n\nt a b\n0 1 2\n1 2\n") ==
        "scope.csv:5: expected 3 fields like the header on line 3, found 2");
  CHECK(error_of("t,a\n0,1\n1,2,,\n") ==
        "scope.csv:3: expected 2 fields like the header on line 1, found 4");
  // The sample's odd row out is found wherever it is, not just near the top.
  std::string many = "t,a,b\n";
  for (int i = 0; i < 79; ++i) many += std::to_string(i) + ",1,2\n";
  many += "79,1\n";
  CHECK(error_of(many) == "scope.csv:81: expected 3 fields like the header on line 1, found 2");
}

TEST_CASE("csv errors: cells that are not numbers") {
  CHECK(error_of("t,a\n0,1\n1,abc\n") ==
        "scope.csv:3:3: expected a number in column \"a\", found \"abc\"");
  CHECK(error_of("t,CH2 (mV)\n0,1\n1,  12x  \n") ==
        "scope.csv:3:5: expected a number in column \"CH2 (mV)\", found \"12x\"");
  CHECK(error_of("0,1\n1,2\n2,3 4\n") ==
        "scope.csv:3:3: expected a number in column 2, found \"3 4\"");
  CHECK(error_of("t;a\n0;1,5\n1;2.5\n") ==
        "scope.csv:2:3: expected a number in column \"a\", found \"1,5\"");
  CHECK(error_of("t,a\n0,abc\n1,2\n") ==
        "scope.csv:2:3: expected a number in column \"a\", found \"abc\"");
  CHECK(error_of("t,a\n0,1\n1,0x10\n") ==
        "scope.csv:3:3: expected a number in column \"a\", found \"0x10\"");
  CHECK(error_of("t,a\n0,1\n1,1.2.3\n") ==
        "scope.csv:3:3: expected a number in column \"a\", found \"1.2.3\"");
  CHECK(error_of("t,a\n0,1\n1,2\n2,3\nEnd of data\n") ==
        "scope.csv:5:1: expected a number in column \"t\", found \"End of data\"");
  // A long cell is cut short in the message.
  CHECK(error_of("t,a\n0,1\n1," + std::string(100, 'x') + "\n") ==
        "scope.csv:3:3: expected a number in column \"a\", found \"" + std::string(40, 'x') +
            "...\"");
}

TEST_CASE("csv errors: infinities and numbers a double cannot hold") {
  CHECK(error_of("t,a\n0,inf\n") ==
        "scope.csv:2:3: expected a finite number in column \"a\", found \"inf\"");
  CHECK(error_of("t,a\n0,1\n1,-Infinity\n") ==
        "scope.csv:3:3: expected a finite number in column \"a\", found \"-Infinity\"");
  CHECK(error_of("t,a\n0,1e999\n") ==
        "scope.csv:2:3: the number in column \"a\" is out of range: \"1e999\"");
  CHECK(error_of("t,a\n0,1\n1,1e-400\n") ==
        "scope.csv:3:3: the number in column \"a\" is out of range: \"1e-400\"");
}

TEST_CASE("csv errors: not a text file") {
  CHECK(error_of(std::string("t,a\n0,1\n1,2\0\n", 13)) ==
        "scope.csv: not a text file: it holds NUL bytes");
  CHECK(error_of("\xFF\xFEt\0,\0a\0"sv) ==
        "scope.csv: not a text file benchtau can read: it is UTF-16; save it as UTF-8");
  std::string control(400, '\x01');
  CHECK(error_of("t,a\n" + control + "\n") == "scope.csv: not a text file: it holds control bytes");
  // Random bytes, as from a binary dump.
  std::mt19937 rng(7);
  std::string noise(4096, '\0');
  for (auto& c : noise) c = static_cast<char>(rng() & 0xFF);
  CHECK(error_of(noise) == "scope.csv: not a text file: it holds NUL bytes");
  // A NUL byte beyond the part the sniffer reads is still caught, at its row.
  std::string late = "t,a\n";
  for (int i = 0; i < 20000; ++i) late += std::to_string(i) + ",1\n";
  late += "20000,";
  late += '\0';
  late += "\n";
  CHECK(error_of(late) ==
        "scope.csv:20002:7: found a NUL byte in column \"a\": this is not a text file");
}

TEST_CASE("csv errors: lines ending in a bare carriage return") {
  CHECK(error_of("t,a\r0,1\r1,2\r") ==
        "scope.csv: its lines end with a bare carriage return; save it with LF or CRLF line ends");
}

TEST_CASE("csv errors: very long lines and very wide rows stay linear and bounded") {
  CHECK(error_of(std::string(10'000'000, '1')) ==
        "scope.csv:1: longer than 64 KiB without a line end; a capture's rows are short (at most "
        "64 columns)");
  std::string commas;
  for (int i = 0; i < 5'000'000; ++i) commas += "1,";
  CHECK(error_of(commas) ==
        "scope.csv:1: longer than 64 KiB without a line end; a capture's rows are short (at most "
        "64 columns)");
  CHECK(error_of("t,a\n0,1\n" + commas + "\n") ==
        "scope.csv:3: expected 2 fields like the header on line 1, found more than 64");
  std::string wide_header, wide_row;
  for (int i = 0; i < 70; ++i) {
    wide_header += (i ? "," : "") + std::string("c") + std::to_string(i);
    wide_row += i ? ",1" : "1";
  }
  CHECK(error_of(wide_header + "\n" + wide_row + "\n") ==
        "scope.csv:2: found 70 fields; benchtau reads at most 64 columns");
  // 64 columns is fine.
  std::string row64 = "1";
  for (int i = 1; i < 64; ++i) row64 += ",1";
  CHECK(read(row64 + "\n" + row64 + "\n", benchtau::test::with_rate(1.0)).capture.channels.size() ==
        64);
}

TEST_CASE("csv errors: no time base at all") {
  CHECK(error_of("out\n1\n2\n") ==
        "scope.csv: no time column and no sample rate: give --rate (samples per second)");
  CHECK(error_of("out\n1\n2\n", benchtau::test::with_rate(-5.0)) ==
        "scope.csv: --rate must be a positive number of samples per second, not -5");
  CHECK(error_of("out\n1\n2\n", benchtau::test::with_rate(std::nan(""))) ==
        "scope.csv: --rate must be a positive number of samples per second, not nan");
}

TEST_CASE("csv errors: meaningless but well-formed data reads fine") {
  SECTION("a flat line") {
    std::string text = "t,v\n";
    for (int i = 0; i < 1000; ++i) text += std::to_string(i) + "e-3,5\n";
    const auto r = read(text);
    CHECK(r.capture.samples() == 1000);
    CHECK(r.capture.channels[0].values.front() == 5.0);
    CHECK(r.capture.channels[0].values.back() == 5.0);
    CHECK(r.capture.time.dt_s == Approx(1e-3));
  }
  SECTION("noise only") {
    std::mt19937 rng(3);
    std::normal_distribution<double> gauss(0.0, 1.0);
    std::string text = "t,v\n";
    std::vector<double> written;
    for (int i = 0; i < 1000; ++i) {
      std::ostringstream line;
      line.precision(17);
      written.push_back(gauss(rng));
      line << i << "," << written.back() << "\n";
      text += line.str();
    }
    const auto r = read(text);
    CHECK(r.capture.channels[0].values == written);  // 17 digits round-trip exactly
  }
  SECTION("a single row") {
    const auto r = read("t,v\n0.5,1\n");
    CHECK(r.capture.samples() == 1);
    CHECK(r.capture.time.t0_s == 0.5);
    CHECK(r.capture.time.dt_s == 0.0);
  }
}

TEST_CASE("csv errors: files that cannot be opened") {
  const auto missing =
      (std::filesystem::path(BENCHTAU_BINARY_DIR) / "no-such-capture.csv").string();
  CHECK(file_error_of(missing) == missing + ": cannot open: No such file or directory");
  const auto dir = std::filesystem::path(BENCHTAU_BINARY_DIR).string();
  CHECK(file_error_of(dir) == dir + ": cannot open: Is a directory");
  if (::geteuid() != 0) {  // root reads anything
    const auto locked = scratch_file("locked.csv", "t,a\n0,1\n");
    ::chmod(locked.c_str(), 0);
    CHECK(file_error_of(locked) == locked + ": cannot open: Permission denied");
    ::chmod(locked.c_str(), 0644);
  }
}

TEST_CASE("csv errors: the user's file is left as it was") {
  const std::string text = "t,a\n0,1\n1,x\n";
  const auto path = scratch_file("untouched.csv", text);
  ::chmod(path.c_str(), 0444);
  const auto before = std::filesystem::last_write_time(path);
  CHECK(file_error_of(path) == path + ":3:3: expected a number in column \"a\", found \"x\"");
  CHECK(std::filesystem::last_write_time(path) == before);
  std::ifstream in(path, std::ios::binary);
  const std::string after((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  CHECK(after == text);
  ::chmod(path.c_str(), 0644);
}
