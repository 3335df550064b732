// benchtau: reading from a path, from standard input and from a pipe.
#include <catch2/catch.hpp>

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <string>
#include <thread>

#include "tests/drivers/csv_test_support.h"

using benchtau::test::scratch_file;

namespace {

const std::string sample = "Sample interval,10,us\nout (V),cap (V)\n0.1,3.0\n8.2,3.5\n8.2,4.1\n";

// Points standard input at a file for the life of the object.
class StdinFrom {
 public:
  explicit StdinFrom(const std::string& path) : saved_(::dup(STDIN_FILENO)) {
    const int fd = ::open(path.c_str(), O_RDONLY);
    ::dup2(fd, STDIN_FILENO);
    ::close(fd);
  }
  StdinFrom(const StdinFrom&) = delete;
  StdinFrom& operator=(const StdinFrom&) = delete;
  ~StdinFrom() {
    ::dup2(saved_, STDIN_FILENO);
    ::close(saved_);
  }

 private:
  int saved_;
};

}  // namespace

TEST_CASE("csv file: a path reads like the same text in memory") {
  const auto path = scratch_file("sample.csv", sample);
  const auto r = benchtau::read_csv_file(path);
  CHECK(r.capture.source == path);
  CHECK(r.capture.samples() == 3);
  CHECK(r.capture.time.dt_s == Approx(10e-6).epsilon(1e-15));
  CHECK(r.capture.channels[1].values == std::vector<double>{3.0, 3.5, 4.1});
  const auto m = benchtau::read_csv_text(sample, path);
  CHECK(m.capture.channels[0].values == r.capture.channels[0].values);
  CHECK(m.notes == r.notes);
}

TEST_CASE("csv file: an empty file on disk") {
  const auto path = scratch_file("empty.csv", "");
  CHECK(benchtau::test::file_error_of(path) == path + ": no data rows: the file is empty");
}

TEST_CASE("csv file: standard input, as \"-\" and as text read by the caller") {
  SECTION("\"-\" reads standard input") {
    const auto path = scratch_file("stdin.csv", sample);
    const StdinFrom redirect(path);
    const auto r = benchtau::read_csv_file("-");
    CHECK(r.capture.source == "<stdin>");
    CHECK(r.capture.channels[0].values == std::vector<double>{0.1, 8.2, 8.2});
  }
  SECTION("errors name <stdin>") {
    const auto path = scratch_file("stdin-bad.csv", "t,a\n0,1\n1,x\n");
    const StdinFrom redirect(path);
    CHECK(benchtau::test::file_error_of("-") ==
          "<stdin>:3:3: expected a number in column \"a\", found \"x\"");
  }
  SECTION("text already read from standard input") {
    const auto r = benchtau::read_csv_text(sample, "<stdin>", benchtau::test::with_threads(2));
    CHECK(r.capture.source == "<stdin>");
    CHECK(r.capture.samples() == 3);
    try {
      benchtau::read_csv_text("t,a\n0,1\n1,2,3\n", "<stdin>");
      FAIL("no error");
    } catch (const benchtau::InputError& e) {
      CHECK(std::string(e.what()) ==
            "<stdin>:3: expected 2 fields like the header on line 1, found 3");
      CHECK(e.file() == "<stdin>");
      CHECK(e.line() == 3);
      CHECK(e.column() == 0);
    }
  }
}

TEST_CASE("csv file: a named pipe is read to its end") {
  const auto dir = std::filesystem::path(BENCHTAU_BINARY_DIR) / "test-scratch" / "csv";
  std::filesystem::create_directories(dir);
  const auto fifo = (dir / "pipe.csv").string();
  std::filesystem::remove(fifo);
  REQUIRE(::mkfifo(fifo.c_str(), 0600) == 0);
  std::thread writer([&] {
    const int fd = ::open(fifo.c_str(), O_WRONLY);
    std::size_t done = 0;
    while (done < sample.size()) {
      const auto n = ::write(fd, sample.data() + done, sample.size() - done);
      if (n <= 0) break;
      done += static_cast<std::size_t>(n);
    }
    ::close(fd);
  });
  const auto r = benchtau::read_csv_file(fifo);
  writer.join();
  CHECK(r.capture.samples() == 3);
  CHECK(r.capture.channels[1].values == std::vector<double>{3.0, 3.5, 4.1});
  std::filesystem::remove(fifo);
}
