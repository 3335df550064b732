// benchtau: the command line end to end: exact text, JSON, exit codes.
#include <fmt/format.h>
#include <sys/wait.h>
#include <catch2/catch.hpp>

#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include "src/core/synth.h"
#include "tests/cli/cli_support.h"

namespace {

namespace fs = std::filesystem;

using cli_support::Run;
using cli_support::run;

std::string exe() { return fmt::format("'{}'", BENCHTAU_EXE); }

fs::path scratch(const std::string& name) {
  const fs::path dir = fs::path(BENCHTAU_BINARY_DIR) / "cli-test";
  fs::create_directories(dir);
  return dir / name;
}

// A two-resistor astable (R1 10k, R2 47k, C 100n, 9 V) written as a CSV file.
fs::path astable_csv(const std::string& name, double cycles) {
  using namespace benchtau;
  const AstableWave w = two_resistor_astable(9.0, 10e3, 47e3, 100e-9);
  SynthOptions o;
  const double period = w.high_s() + w.low_s();
  o.rate_Hz = 250e3;
  o.duration_s = cycles * period;
  o.phase_s = 0.25 * period;
  o.with_ctl = false;
  const SynthRecord rec = synth_astable(w, o);
  const fs::path path = scratch(name);
  std::ofstream f(path);
  f << "time_s,out_V,cap_V\n";
  for (std::size_t i = 0; i < rec.capture.samples(); ++i) {
    f << fmt::format("{:.8g},{:.6g},{:.6g}\n", rec.capture.time.at(i),
                     rec.capture.channels[0].values[i], rec.capture.channels[1].values[i]);
  }
  return path;
}

}  // namespace

TEST_CASE("benchtau --version prints the name and version") {
  const Run r = run(exe() + " --version");
  CHECK(r.exit_code == 0);
  CHECK(r.out == "benchtau 0.1.0\n");
}

TEST_CASE("benchtau with no command, or an unknown option, is an input error") {
  CHECK(run(exe()).exit_code == 2);
  CHECK(run(exe() + " measure --no-such-option x.csv").exit_code == 2);
  const Run help = run(exe() + " measure --help");
  CHECK(help.exit_code == 0);
  CHECK(help.out.find("--cap TEXT") != std::string::npos);
}

TEST_CASE("a file that cannot be opened: exit 2 and the reason") {
  const Run r = run(exe() + " measure /nonexistent/capture.csv");
  CHECK(r.exit_code == 2);
  CHECK(r.out.empty());
  CHECK(r.err == "benchtau: /nonexistent/capture.csv: cannot open: No such file or directory\n");
}

TEST_CASE("a bad --rate names what was expected") {
  const fs::path p = astable_csv("rate.csv", 3.3);
  const Run r = run(exe() + " measure --rate fast '" + p.string() + "'");
  CHECK(r.exit_code == 2);
  CHECK(r.err ==
        "benchtau: --rate: expected a sample rate such as 1M, 250k or 2.5 MS/s, found \"fast\"\n");
}

TEST_CASE("a channel that does not exist lists the ones that do") {
  const fs::path p = astable_csv("nochan.csv", 3.3);
  const Run r = run(exe() + " measure --cap pin6 '" + p.string() + "'");
  CHECK(r.exit_code == 2);
  CHECK(r.err == fmt::format("benchtau: {}: --cap \"pin6\": no such channel; channels are "
                             "\"out_V\" (column 2), \"cap_V\" (column 3)\n",
                             p.string()));
}

TEST_CASE("measure prints the table people read") {
  const fs::path p = astable_csv("table.csv", 4.5);
  const Run r = run(exe() + " measure '" + p.string() + "'");
  CHECK(r.exit_code == 0);
  CHECK(r.err.empty());
  // The textbook relations give 3.951 ms high and 3.258 ms low (Horowitz and
  // Hill, from memory); the table shows them to three figures.
  CHECK(r.out.find("  high time        3.95 ms") != std::string::npos);
  CHECK(r.out.find("  low time         3.26 ms") != std::string::npos);
  CHECK(r.out.find("  period           7.21 ms") != std::string::npos);
  CHECK(r.out.find("  duty             54.81 %") != std::string::npos);
  CHECK(r.out.find("  cap max           6.00 V") != std::string::npos);
  CHECK(r.out.find("  cap min           3.00 V") != std::string::npos);
  CHECK(r.out.find("edges from the output pin, timed on the capacitor node") != std::string::npos);
  CHECK(r.out.find("info     partial_cycles: ") != std::string::npos);
}

TEST_CASE("measure --json holds the documented keys, readable by Python's json module") {
  const fs::path p = astable_csv("json.csv", 6.5);
  const std::string py =
      "import json,sys; d=json.load(sys.stdin); s=d['summary']; "
      "print(d['schema'], s['cycles'], len(d['cycles']), sorted(s['period_s']), "
      "[f['code'] for f in d['findings']], d['nodes']['out'], d['nodes']['cap'], "
      "d['nodes']['ctl'], d['edge_node']); "
      "print(s['period_s']['mean'], s['high_s']['mean'], s['low_s']['mean'], "
      "s['duty']['mean'], s['cap_max_V']['mean'], s['cap_min_V']['mean'])";
  const Run r =
      run(exe() + " measure --json '" + p.string() + "' | /usr/bin/python3 -c \"" + py + "\"");
  CHECK(r.exit_code == 0);
  const auto newline = r.out.find('\n');
  REQUIRE(newline != std::string::npos);
  // 6.5 periods starting a quarter into one hold 5 whole cycles.
  CHECK(r.out.substr(0, newline) ==
        "benchtau-measure-1 5 5 ['max', 'mean', 'min', 'std'] ['partial_cycles'] out_V cap_V "
        "None out");
  double period = 0, high = 0, low = 0, duty = 0, cap_max = 0, cap_min = 0;
  REQUIRE(std::sscanf(r.out.c_str() + newline + 1, "%lf %lf %lf %lf %lf %lf", &period, &high, &low,
                      &duty, &cap_max, &cap_min) == 6);
  // Textbook: t_high = ln 2 (R1 + R2) C, t_low = ln 2 R2 C (Horowitz and Hill,
  // from memory); thresholds at 2/3 and 1/3 of 9 V (common practice).
  const double high_s = std::log(2.0) * 57e3 * 100e-9, low_s = std::log(2.0) * 47e3 * 100e-9;
  CHECK(high == Approx(high_s).epsilon(5e-4));
  CHECK(low == Approx(low_s).epsilon(5e-4));
  CHECK(period == Approx(high_s + low_s).epsilon(5e-4));
  CHECK(duty == Approx(high_s / (high_s + low_s)).epsilon(5e-4));
  CHECK(cap_max == Approx(6.0).margin(0.005));
  CHECK(cap_min == Approx(3.0).margin(0.005));
}

TEST_CASE("measure reads standard input for -") {
  const fs::path p = astable_csv("stdin.csv", 3.5);
  const Run r = run(exe() + " measure - < '" + p.string() + "'");
  CHECK(r.exit_code == 0);
  CHECK(r.out.rfind("<stdin>: ", 0) == 0);
  // 3.5 periods starting a quarter into one hold 2 whole cycles.
  CHECK(r.out.find("\n2 steady cycles, edges from the output pin") != std::string::npos);
}

TEST_CASE("a capture that holds no cycle exits 1 and says why") {
  const fs::path p = scratch("flat.csv");
  {
    std::ofstream f(p);
    f << "t,out\n";
    for (int i = 0; i < 500; ++i) f << i * 1e-5 << ",7.3\n";
  }
  const Run r = run(exe() + " measure '" + p.string() + "'");
  CHECK(r.exit_code == 1);
  CHECK(
      r.out.find("problem  stuck_high: not oscillating: the output \"out\" stays high at 7.30 V") !=
      std::string::npos);
}

TEST_CASE("benchtau safety prints the bench cautions") {
  const Run r = run(exe() + " safety");
  CHECK(r.exit_code == 0);
  CHECK(r.out.find("Scope ground clips") != std::string::npos);
  CHECK(r.out.find("Discharge\n  them through a suitable resistor") != std::string::npos);
}
