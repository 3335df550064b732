// benchtau tests: `ports`, `watch` and `capture` end to end on ptys: exact errors, a clean stop
// on SIGINT and SIGTERM, an unplugged board, and a record that `benchtau measure` reads back.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <thread>

#include "serial_test_support.h"
#include "src/core/synth.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

struct Result {
  int code = -1;
  std::string out, err;
};

Result run_benchtau(const std::vector<std::string>& args) {
  const fs::path out = scratch("cli-out.txt"), err = scratch("cli-err.txt");
  Result r;
  r.code = wait_child(spawn_benchtau(args, out.string(), err.string()));
  r.out = slurp(out);
  r.err = slurp(err);
  return r;
}

// The astable of R1 10k, R2 47k, C 100n on 9 V (out, cap) as 12-bit counts
// behind a 3:1 divider with a 5 V reference, rate_Hz samples a second.
std::vector<std::uint16_t> astable_counts(double rate_Hz, double seconds, double c_F = 100e-9) {
  const AstableWave w = two_resistor_astable(9.0, 10e3, 47e3, c_F);
  SynthOptions o;
  o.rate_Hz = rate_Hz;
  o.duration_s = seconds;
  o.with_ctl = false;
  const SynthRecord rec = synth_astable(w, o);
  const double volts_per_count = 5.0 / 4096 * 3.0;
  std::vector<std::uint16_t> counts;
  for (std::size_t i = 0; i < rec.capture.samples(); ++i) {
    for (std::size_t c = 0; c < 2; ++c) {
      counts.push_back(static_cast<std::uint16_t>(
          std::lround(rec.capture.channels[c].values[i] / volts_per_count)));
    }
  }
  counts.resize(counts.size() / 32 * 32);  // whole frames of 16 sets
  return counts;
}

}  // namespace

TEST_CASE("cli: ports lists what libserialport finds, or says there is none") {
  const Result r = run_benchtau({"ports"});
  CHECK(r.code == 0);
  CHECK(r.err.empty());
  // Which ports a test machine has is not known; the table's shape is.
  const bool none = r.out == "no serial ports found\n";
  CHECK((none || r.out.starts_with("port ")));
}

TEST_CASE("cli: a port that is not there, or not a port, is an input error with the reason") {
  Result r = run_benchtau({"watch", "--port", "/dev/ttyBENCHTAU-NONE", "--rate", "1k"});
  CHECK(r.code == 2);
  CHECK(r.out.empty());
  CHECK(r.err ==
        "benchtau: /dev/ttyBENCHTAU-NONE: no such port (is the board plugged in? \"benchtau "
        "ports\" lists the serial ports found)\n");
  r = run_benchtau({"capture", "--port", "/dev/null", "-o", scratch("never.csv").string()});
  CHECK(r.code == 2);
  CHECK(r.err == "benchtau: /dev/null: not a serial port: it is not a terminal device\n");
  CHECK_FALSE(fs::exists(scratch("never.csv")));
  r = run_benchtau({"watch", "--port", "/dev/null", "--format", "frames"});
  CHECK(r.code == 2);
  CHECK(r.err == "benchtau: --format frames: frames carry no sample times: give --rate too\n");
}

TEST_CASE("cli: capture never replaces an existing file without --force") {
  PtyPair pty;
  const fs::path p = scratch("kept.csv");
  std::ofstream(p) << "t_s,ch1_V\n0,1\n";
  const Result r =
      run_benchtau({"capture", "--port", pty.slave_path, "--rate", "1k", "-o", p.string()});
  CHECK(r.code == 2);
  CHECK(r.err == "benchtau: " + p.string() +
                     ": already exists; give --force to replace it, or choose another name\n");
  CHECK(slurp(p) == "t_s,ch1_V\n0,1\n");
}

TEST_CASE(
    "cli: watch shows the timer live, records it, stops on SIGINT, and measure reads the record") {
  PtyPair pty;
  const fs::path rec = scratch("watch.csv"), out = scratch("watch-out.txt"),
                 err = scratch("watch-err.txt");
  const pid_t child = spawn_benchtau({"watch", "--port", pty.slave_path, "--rate", "20k", "--bits",
                                      "12", "--divider", "3", "--record", rec.string()},
                                     out.string(), err.string());
  REQUIRE(wait_for([&] { return fs::exists(rec); }));
  const auto counts = astable_counts(20e3, 3.0);
  const EncodedFrames f = encode_frames(counts, 2, 16);
  pty.write(f.bytes);
  // Some updates with a full window, then Ctrl-C.
  REQUIRE(wait_for([&] { return slurp(out).find(" f 139 Hz ") != std::string::npos; },
                   std::chrono::seconds(10)));
  ::kill(child, SIGINT);
  CHECK(wait_child(child) == 0);
  const std::string text = slurp(out);
  // R1 10k, R2 47k, C 100n: 139 Hz, 54.8 % duty, 3 V to 6 V (the textbook
  // relations, from memory).
  CHECK(text.find(" f 139 Hz  duty 54.8 %  cap 3.00 V..6.00 V  samples 60000  gaps 0  lost 0 crc 0 "
                  "skipped 0  link up\n") != std::string::npos);
  CHECK(text.find("stopped by SIGINT after ") != std::string::npos);
  CHECK(text.find("  samples     60000 on 2 channels, 3.00 s of signal, frames format\n") !=
        std::string::npos);
  CHECK(text.find("  record      " + rec.string() + ", closed\n") != std::string::npos);
  CHECK(slurp(err).empty());

  const Result m = run_benchtau({"measure", rec.string()});
  CHECK(m.code == 0);
  CHECK(m.out.find("  high time        3.95 ms") != std::string::npos);
  CHECK(m.out.find("  low time         3.26 ms") != std::string::npos);
  CHECK(m.out.find("  period           7.21 ms") != std::string::npos);
}

TEST_CASE("cli: watch --design fits the window live and marks the part out of spec") {
  // The same board with its capacitor at 62 nF against the design's 100 nF +/- 5 %.
  const fs::path design = scratch("watch-design.toml"), out = scratch("watch-fit-out.txt"),
                 err = scratch("watch-fit-err.txt");
  {
    std::ofstream f(design);
    f << "name = \"watch test board\"\nsupply_V = 9.0\nfamily = \"bipolar\"\n"
         "[circuit]\nkind = \"astable-two-resistor\"\n[parts]\n"
         "R1 = { value = \"10k\", tolerance = \"1%\", role = \"upper\" }\n"
         "R2 = { value = \"47k\", tolerance = \"1%\", role = \"lower\" }\n"
         "C1 = { value = \"100n\", tolerance = \"5%\", kind = \"film\", role = \"timing-cap\" }\n";
  }
  PtyPair pty;
  const pid_t child = spawn_benchtau({"watch", "--port", pty.slave_path, "--rate", "20k", "--bits",
                                      "12", "--divider", "3", "--design", design.string()},
                                     out.string(), err.string());
  const EncodedFrames f = encode_frames(astable_counts(20e3, 3.0, 62e-9), 2, 16);
  pty.write(f.bytes);
  const bool fitted = wait_for(
      [&] {
        return slurp(out).find("  verdict     fail: C1 has lost about 38 % of its capacitance") !=
               std::string::npos;
      },
      std::chrono::seconds(20));
  ::kill(child, SIGINT);
  CHECK(wait_child(child) == 0);
  INFO(slurp(out));
  CHECK(fitted);
  CHECK(slurp(err).empty());
}

TEST_CASE("cli: capture rides out an unplugged board and closes cleanly on SIGTERM") {
  auto pty = std::make_unique<PtyPair>();
  const fs::path rec = scratch("unplug.csv"), out = scratch("unplug-out.txt"),
                 err = scratch("unplug-err.txt");
  const pid_t child = spawn_benchtau({"capture", "--port", pty->slave_path, "--format", "text",
                                      "--rate", "1k", "-o", rec.string()},
                                     out.string(), err.string());
  REQUIRE(wait_for([&] { return fs::exists(rec); }));
  std::string lines;
  for (int i = 0; i < 500; ++i) lines += fmt::format("{},{}\n", i, 1000 - i);
  pty->write(lines);
  REQUIRE(wait_for([&] { return lines_of(slurp(rec)).size() == 501; }));
  pty->close_master();
  const std::string port = pty->slave_path;
  REQUIRE(wait_for([&] { return slurp(err).find("disconnected") != std::string::npos; }));
  ::kill(child, SIGTERM);
  CHECK(wait_child(child) == 0);
  CHECK(slurp(err) ==
        "benchtau: recording " + port + " to " + rec.string() +
            "; Ctrl-C stops\nbenchtau: " + port +
            ": disconnected (the port hung up); the record is kept, waiting for the port "
            "to come back\n");
  const auto record = lines_of(slurp(rec));
  REQUIRE(record.size() == 1 + 500 + 1);
  CHECK(record[1] == "0,0,4.8828125");
  CHECK(record[500] == fmt::format("0.499,{},{}", 499 * 5.0 / 1024, 501 * 5.0 / 1024));
  CHECK(record[501] == "0.5,,");
  const std::string summary = slurp(out);
  CHECK(summary.starts_with("stopped by SIGTERM after "));
  CHECK(summary.find("  samples     500 on 2 channels, 499 ms of signal, text format\n"
                     "  gaps        1 (disconnects 1)\n") != std::string::npos);
}
