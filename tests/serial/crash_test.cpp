// benchtau tests: `benchtau capture` killed with SIGKILL mid-stream: the record holds every
// sample up to the last flush, in order, and what is there parses.
#include <catch2/catch.hpp>

#include <thread>

#include "drivers/csv_reader.h"
#include "serial_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

// The expected record lines for the samples in counts (two channels) at rate_Hz.
std::string expected_line(std::size_t i, std::span<const std::uint16_t> counts, double rate_Hz,
                          double k) {
  return fmt::format("{},{},{}", static_cast<double>(i) / rate_Hz, counts[2 * i] * k,
                     counts[2 * i + 1] * k);
}

void crash_run(const std::string& format, std::span<const std::uint8_t> phase1,
               std::span<const std::uint8_t> phase2, std::size_t phase1_samples,
               std::span<const std::uint16_t> counts, const std::string& name) {
  PtyPair pty;
  const fs::path p = scratch(name);
  const pid_t child = spawn_benchtau({"capture", "--port", pty.slave_path, "--format", format,
                                      "--rate", "10k", "--bits", "12", "-o", p.string()});
  // The record exists once the port is open.
  REQUIRE(wait_for([&] { return fs::exists(p); }));
  pty.write(phase1);
  // Longer than the 0.2 s flush interval, with room for a slow machine.
  std::this_thread::sleep_for(std::chrono::milliseconds(1200));
  pty.write(phase2, 512);
  ::kill(child, SIGKILL);
  CHECK(wait_child(child) == 128 + SIGKILL);

  const std::string text = slurp(p);
  auto lines = lines_of(text);
  REQUIRE(!lines.empty());
  CHECK(lines[0] == "t_s,ch1_V,ch2_V");
  const double k = 5.0 / 4096;
  // A last line cut off by the kill must be the start of the next sample's.
  std::size_t rows = lines.size() - 1;
  if (text.back() != '\n') {
    const std::string cut = lines.back();
    lines.pop_back();
    --rows;
    CHECK(expected_line(rows, counts, 10000.0, k).starts_with(cut));
  }
  CHECK(rows >= phase1_samples);
  for (std::size_t i = 0; i < rows; ++i)
    REQUIRE(lines[1 + i] == expected_line(i, counts, 10000.0, k));
  // And the whole lines read as a capture.
  std::string whole;
  for (const auto& l : lines) whole += l + "\n";
  const CsvResult r = read_csv_text(whole, p.string());
  CHECK(r.capture.samples() == rows);
}

}  // namespace

TEST_CASE("crash: frames, SIGKILL mid-stream keeps every sample up to the last flush") {
  const std::size_t frames = 4000;
  const auto counts = pattern_counts(16 * frames, 2);
  std::vector<std::uint16_t> c12(counts.size());
  for (std::size_t i = 0; i < counts.size(); ++i) c12[i] = counts[i] & 0x0FFF;
  const EncodedFrames f = encode_frames(c12, 2, 16);
  const std::size_t split = f.offsets[frames / 2];
  crash_run("frames", std::span(f.bytes).first(split), std::span(f.bytes).subspan(split),
            16 * (frames / 2), c12, "crash-frames.csv");
}

TEST_CASE("crash: text lines, SIGKILL mid-stream keeps every sample up to the last flush") {
  const std::size_t n = 40000;
  const auto counts = pattern_counts(n, 2);
  std::vector<std::uint16_t> c12(counts.size());
  std::string text1, text2;
  for (std::size_t i = 0; i < n; ++i) {
    c12[2 * i] = counts[2 * i] & 0x0FFF;
    c12[2 * i + 1] = counts[2 * i + 1] & 0x0FFF;
    (i < n / 2 ? text1 : text2) += fmt::format("{} {}\n", c12[2 * i], c12[2 * i + 1]);
  }
  const auto as_bytes = [](const std::string& s) {
    return std::span(reinterpret_cast<const std::uint8_t*>(s.data()), s.size());
  };
  crash_run("text", as_bytes(text1), as_bytes(text2), n / 2, c12, "crash-text.csv");
}
