// benchtau: the reader's building blocks checked against plain reference computations.
#include <catch2/catch.hpp>

#include <fcntl.h>
#include <unistd.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstring>
#include <random>
#include <string>
#include <vector>

#include "drivers/csv_cell.h"
#include "drivers/fast_decimal.h"
#include "drivers/file_chunks.h"
#include "drivers/median_step.h"
#include "tests/drivers/csv_test_support.h"

namespace csv = benchtau::csv;

namespace {

bool same_bits(double a, double b) { return std::memcmp(&a, &b, sizeof a) == 0; }

std::string random_number(std::mt19937& rng) {
  std::uniform_int_distribution<int> pick(0, 99);
  const auto digits = [&](int n) {
    std::string s;
    for (int i = 0; i < n; ++i) s += static_cast<char>('0' + pick(rng) % 10);
    return s;
  };
  std::string s;
  if (pick(rng) < 40) s += '-';
  s += digits(pick(rng) % 12);
  if (pick(rng) < 80) s += "." + digits(pick(rng) % 14);
  if (pick(rng) < 30) {
    s += pick(rng) < 50 ? 'e' : 'E';
    if (pick(rng) < 50) s += pick(rng) < 50 ? '-' : '+';
    s += std::to_string(pick(rng) % 40);
  }
  return s;
}

double reference_median(std::vector<double> steps) {
  const std::size_t n = steps.size();
  std::sort(steps.begin(), steps.end());
  return n % 2 ? steps[n / 2] : 0.5 * (steps[n / 2 - 1] + steps[n / 2]);
}

std::vector<double> steps_of(const std::vector<double>& t) {
  std::vector<double> s;
  for (std::size_t i = 1; i < t.size(); ++i) s.push_back(t[i] - t[i - 1]);
  return s;
}

}  // namespace

TEST_CASE("csv internals: the short-decimal fast path agrees bit for bit with std::from_chars") {
  std::mt19937 rng(2024);
  std::size_t fast = 0;
  for (int i = 0; i < 200000; ++i) {
    // Alone (digit by digit near the end) and followed by more bytes (eight at a time).
    const std::string number = random_number(rng);
    for (const std::string& s :
         {number + ",", number + ",1234567890123456", number + "\n9e9e9e9e"}) {
      const char* end = s.data() + s.size();
      const char* p = s.data();
      double mine = 0.0;
      if (!csv::parse_short_decimal(p, end, mine)) continue;
      ++fast;
      // Without bounds checks, before a line end, it reads the same.
      const std::string line = s + "\n";
      const char* q = line.data();
      double unchecked = 0.0;
      REQUIRE(csv::parse_short_decimal<false>(q, nullptr, unchecked));
      REQUIRE(q - line.data() == p - s.data());
      REQUIRE(same_bits(unchecked, mine));
      double lib = 0.0;
      const auto r = std::from_chars(s.data(), end, lib);
      CAPTURE(s);
      REQUIRE(r.ec == std::errc());
      REQUIRE(r.ptr == p);
      REQUIRE(same_bits(mine, lib));
    }
  }
  CHECK(fast > 300000);  // most of these take the fast path
}

TEST_CASE("csv internals: the fast path takes the usual capture numbers and leaves the rest") {
  const char* usual[] = {"3.00583", "-0.000123",       "1e-6", "8.2", "0", "-0", ".5",
                         "7.",      "1234567890123456"};
  for (const char* s : usual) {
    CAPTURE(s);
    const char* p = s;
    double v = 0.0;
    REQUIRE(csv::parse_short_decimal(p, s + std::strlen(s), v));
    CHECK(p == s + std::strlen(s));
    double lib = 0.0;
    std::from_chars(s, s + std::strlen(s), lib);
    CHECK(same_bits(v, lib));
  }
  // Too many digits, an exponent beyond 10^22, words, signs from_chars refuses.
  const char* others[] = {"12345678901234567890123",
                          "12345678901234567",
                          "1e30",
                          "4.5e-23",
                          "nan",
                          "inf",
                          "+1",
                          "-",
                          ".",
                          "1e",
                          "1e+"};
  for (const char* s : others) {
    CAPTURE(s);
    const char* p = s;
    double v = 0.0;
    CHECK_FALSE(csv::parse_short_decimal(p, s + std::strlen(s), v));
    CHECK(p == s);
  }
}

TEST_CASE("csv internals: cells") {
  using csv::CellKind;
  CHECK(csv::parse_cell("  2.5 ", false).kind == CellKind::number);
  CHECK(csv::parse_cell("  2.5 ", false).value == 2.5);
  CHECK(csv::parse_cell("\"2.5\"", false).value == 2.5);
  CHECK(csv::parse_cell("+2.5", false).value == 2.5);
  CHECK(csv::parse_cell("+-2.5", false).kind == CellKind::text);
  CHECK(csv::parse_cell("2,5", true).value == 2.5);
  CHECK(csv::parse_cell("2,5", false).kind == CellKind::text);
  CHECK(csv::parse_cell("1.234,5", true).kind == CellKind::text);
  CHECK(csv::parse_cell("", false).kind == CellKind::empty);
  CHECK(csv::parse_cell("   ", false).kind == CellKind::empty);
  CHECK(csv::parse_cell("NaN", false).kind == CellKind::nan);
  CHECK(csv::parse_cell("-nan", false).kind == CellKind::nan);
  CHECK(csv::parse_cell("inf", false).kind == CellKind::infinite);
  CHECK(csv::parse_cell("1e999", false).kind == CellKind::out_of_range);
  CHECK(csv::parse_cell("1.5V", false).kind == CellKind::text);
}

TEST_CASE("csv internals: newline counting matches a plain count at every length and offset") {
  std::mt19937 rng(11);
  std::string bytes(5000, '\0');
  for (auto& c : bytes) c = (rng() % 5 == 0) ? '\n' : static_cast<char>('a' + rng() % 26);
  // Long runs of newlines overflow naive byte counters.
  bytes += std::string(4000, '\n');
  for (std::size_t offset = 0; offset < 20; ++offset) {
    for (std::size_t length :
         {0ul, 1ul, 15ul, 16ul, 17ul, 255ul * 16, 4111ul, bytes.size() - offset}) {
      if (offset + length > bytes.size()) continue;
      const std::span<const char> s(bytes.data() + offset, length);
      CAPTURE(offset, length);
      CHECK(csv::count_newlines(s) ==
            static_cast<std::size_t>(std::count(s.begin(), s.end(), '\n')));
    }
  }
}

TEST_CASE("csv internals: line blocks cover a file exactly, in whole lines") {
  std::string text;
  for (int i = 0; i < 3000; ++i) text += std::string(static_cast<std::size_t>(i % 97), 'x') + "\n";
  text += std::string(5000, 'y') + "\n";  // longer than a block
  text += "last line without an end";
  const auto path = benchtau::test::scratch_file("blocks.csv", text);
  const int fd = ::open(path.c_str(), O_RDONLY);
  REQUIRE(fd >= 0);
  const auto source = csv::ByteSource::file(fd, text.size(), path);
  for (std::size_t block : {64ul, 1000ul, 4096ul, 1ul << 20}) {
    CAPTURE(block);
    csv::LineBlocks blocks(source, 0, text.size(), block);
    std::string joined;
    for (auto span = blocks.next(); !span.empty(); span = blocks.next()) {
      if (!blocks.done()) CHECK(span.back() == '\n');
      joined.append(span.data(), span.size());
    }
    CHECK(joined == text);
  }
  CHECK(source.next_line_start(0) == 1);
  CHECK(source.next_line_start(2) == 3);
  CHECK(source.next_line_start(text.size() - 3) == text.size());
  ::close(fd);
}

TEST_CASE("csv internals: the median step is exact, small and large, with repeated steps") {
  std::mt19937 rng(5);
  SECTION("random steps, odd and even counts") {
    for (std::size_t n : {2ul, 3ul, 4ul, 101ul, 1000ul, 70000ul, 70001ul, 300000ul}) {
      std::vector<double> t(n);
      std::exponential_distribution<double> gap(1.0);
      double now = 0.0;
      for (auto& x : t) x = now += gap(rng) + 1e-9;
      CAPTURE(n);
      CHECK(same_bits(csv::median_step(t), reference_median(steps_of(t))));
    }
  }
  SECTION("a sampled time base: a few step values repeated many times") {
    std::vector<double> t(400001);
    for (std::size_t i = 0; i < t.size(); ++i) {
      char buf[32];
      std::snprintf(buf, sizeof buf, "%.6f", static_cast<double>(i) * 1e-6);
      t[i] = std::strtod(buf, nullptr);
    }
    CHECK(same_bits(csv::median_step(t), reference_median(steps_of(t))));
  }
  SECTION("two step values, half each, so the median falls between them") {
    std::vector<double> t(200001);
    for (std::size_t i = 1; i < t.size(); ++i) t[i] = t[i - 1] + (i % 2 ? 1.0 : 3.0);
    CHECK(csv::median_step(t) == 2.0);
    CHECK(same_bits(csv::median_step(t), reference_median(steps_of(t))));
  }
  SECTION("the lower middle rank on a repeated step, the upper one on the smallest above it") {
    // Half the steps exactly 1, the other half larger, shuffled: the median is between the
    // last 1 and the smallest of the rest.
    const std::size_t steps = 200000;
    std::vector<double> gaps(steps, 1.0);
    // Multiples of 1/1024, so that every time and every step is exact.
    std::uniform_int_distribution<int> above(1536, 2560);
    for (std::size_t i = steps / 2; i < steps; ++i) gaps[i] = above(rng) / 1024.0;
    std::shuffle(gaps.begin(), gaps.end(), rng);
    std::vector<double> t(steps + 1, 0.0);
    for (std::size_t i = 0; i < steps; ++i) t[i + 1] = t[i] + gaps[i];
    CHECK(same_bits(csv::median_step(t), reference_median(steps_of(t))));
    CHECK(csv::median_step(t) == 0.5 * (1.0 + 1536 / 1024.0));
  }
  SECTION("a step distribution the sample misjudges falls back to the radix selection") {
    // Every sixth step is large, at indices the evenly spaced sample never visits,
    // so the sample puts the median too low.
    std::vector<double> t(300001);
    for (std::size_t i = 1; i < t.size(); ++i)
      t[i] = t[i - 1] + ((i % 6) == 5 ? 50.0 + static_cast<double>(i % 7)
                                      : 1.0 + 1e-9 * static_cast<double>(i % 1000));
    CHECK(same_bits(csv::median_step(t), reference_median(steps_of(t))));
  }
  CHECK(csv::median_step(std::vector<double>{}) == 0.0);
  CHECK(csv::median_step(std::vector<double>{4.0}) == 0.0);
}
