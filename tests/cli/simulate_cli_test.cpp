// benchtau: `benchtau simulate` end to end: the file written, read back by `benchtau measure`.
#include <cmath>
#include <cstdio>
#include <string>

#include "tests/cli/cli_support.h"

using namespace cli_support;

namespace {

// The numbers `predict --json` and `measure --json` give for one key pair.
struct Pair {
  double predicted = 0.0;
  double measured = 0.0;
};

Pair predicted_and_measured(const std::string& design, const fs::path& csv,
                            const std::string& predicted_key, const std::string& measured_key) {
  const std::string p =
      "import json,sys; print(json.load(sys.stdin)['nominal']['" + predicted_key + "'])";
  const std::string m =
      "import json,sys; print(json.load(sys.stdin)['summary']['" + measured_key + "']['mean'])";
  const Run a = run(exe() + " predict --draws 0 --json --design " + design +
                    " | /usr/bin/python3 -c \"" + p + "\"");
  const Run b =
      run(exe() + " measure --json '" + csv.string() + "' | /usr/bin/python3 -c \"" + m + "\"");
  Pair out;
  REQUIRE(std::sscanf(a.out.c_str(), "%lf", &out.predicted) == 1);
  REQUIRE(std::sscanf(b.out.c_str(), "%lf", &out.measured) == 1);
  return out;
}

constexpr const char* kOneShot = R"(name = "bench test: one-shot"
supply_V = 12.0
family = "bipolar"
[circuit]
kind = "monostable"
[parts]
R1 = { value = "100k", tolerance = "1%", role = "timing-res" }
C1 = { value = "1u", tolerance = "10%", kind = "film", role = "timing-cap" }
)";

}  // namespace

TEST_CASE("simulate -> measure gives back the predicted high and low times within 0.1 %") {
  const fs::path csv = scratch("mister-sim.csv");
  fs::remove(csv);
  const std::string design = demo("mister-rev-b.toml");
  const Run r = run(exe() + " simulate --design " + design + " -o '" + csv.string() + "'");
  CHECK(r.exit_code == 0);
  // Defaults: 1000 samples a cycle rounded up to a 1-2-5 step (1000 / 3.40 ms
  // is 294 kS/s, so 500 kS/s), over 10 cycles.
  CHECK(r.out == csv.string() + ": 16990 samples at 500 kS/s, 34.0 ms long\n");
  // The design's [capture] names the columns.
  const std::string text = read_file(csv);
  CHECK(text.substr(0, text.find('\n')) == "t_s,out (V),cap (V),ctl (V)");
  for (const auto& [p, m] : {std::pair{"high_s", "high_s"}, std::pair{"low_s", "low_s"},
                             std::pair{"period_s", "period_s"}}) {
    const Pair v = predicted_and_measured(design, csv, p, m);
    INFO(p);
    CHECK(v.measured == Approx(v.predicted).epsilon(1e-3));
  }
  // With an 8-bit ADC over 10 V and 5 mV of noise, still within 0.1 %.
  const fs::path rough = scratch("mister-rough.csv");
  CHECK(run(exe() + " simulate --force --bits 8 --noise 5m --cycles 20 --design " + design +
            " -o '" + rough.string() + "'")
            .exit_code == 0);
  for (const char* key : {"high_s", "low_s"}) {
    const Pair v = predicted_and_measured(design, rough, key, key);
    INFO(key);
    CHECK(v.measured == Approx(v.predicted).epsilon(1e-3));
  }
}

TEST_CASE("simulate refuses to overwrite a file unless --force") {
  const fs::path csv = write_file("existing.csv", "keep me\n");
  const std::string base =
      exe() + " simulate --design " + demo("mister-rev-b.toml") + " -o '" + csv.string() + "'";
  const Run r = run(base);
  CHECK(r.exit_code == 2);
  CHECK(r.out.empty());
  CHECK(r.err == "benchtau: " + csv.string() + ": exists already; pass --force to overwrite it\n");
  CHECK(read_file(csv) == "keep me\n");
  CHECK(run(base + " --force").exit_code == 0);
  CHECK(read_file(csv).rfind("t_s,", 0) == 0);
}

TEST_CASE("simulate never writes over the design file it reads") {
  const fs::path d = write_file("self.toml", kOneShot);
  const Run r =
      run(exe() + " simulate --force --design '" + d.string() + "' -o '" + d.string() + "'");
  CHECK(r.exit_code == 2);
  CHECK(r.err == "benchtau: " + d.string() +
                     ": is the design file; benchtau never writes to a file it reads\n");
  CHECK(read_file(d) == kOneShot);
}

TEST_CASE("simulate a monostable as a pulse train, measure finds the predicted pulse") {
  const fs::path d = write_file("one-shot.toml", kOneShot);
  const fs::path csv = scratch("one-shot.csv");
  fs::remove(csv);
  const Run r = run(exe() + " simulate --design '" + d.string() + "' --trigger-every 250m -o '" +
                    csv.string() + "'");
  CHECK(r.exit_code == 0);
  // 1000 samples a trigger interval is 4 kS/s, rounded up to 5 kS/s; 10 triggers.
  CHECK(r.out ==
        csv.string() + ": 12501 samples at 5.00 kS/s, 2.50 s long, a trigger every 250 ms\n");
  // The pulse is about ln 3 R C = 110 ms (Horowitz and Hill, from memory).
  const Pair v = predicted_and_measured("'" + d.string() + "'", csv, "high_s", "high_s");
  CHECK(v.predicted == Approx(std::log(3.0) * 0.1).epsilon(0.01));
  CHECK(v.measured == Approx(v.predicted).epsilon(1e-3));
  const Pair period = predicted_and_measured("'" + d.string() + "'", csv, "high_s", "period_s");
  CHECK(period.measured == Approx(0.250).epsilon(1e-6));
  // A trigger interval shorter than the pulse and its recovery is refused.
  const Run short_r = run(exe() + " simulate --force --design '" + d.string() +
                          "' --trigger-every 100m -o '" + csv.string() + "'");
  CHECK(short_r.exit_code == 2);
  CHECK(short_r.err.rfind("benchtau: --trigger-every: 100 ms is too short: the pulse (", 0) == 0);
}

TEST_CASE("simulate: options that do not fit the design are input errors") {
  const fs::path csv = scratch("unused.csv");
  const std::string base = exe() + " simulate --force --design " + demo("mister-rev-b.toml") +
                           " -o '" + csv.string() + "'";
  const Run t = run(base + " --trigger-every 10m");
  CHECK(t.exit_code == 2);
  CHECK(t.err ==
        "benchtau: --trigger-every: applies only to a monostable; this design is an "
        "astable-two-resistor circuit\n");
  const Run rate = run(base + " --rate fast");
  CHECK(rate.err ==
        "benchtau: --rate: expected a number such as 1M, 250k or 2.5 MS/s, found \"fast\"\n");
  CHECK(run(base + " --seconds 1 --cycles 3").exit_code == 2);  // one length, not two
  const Run big = run(base + " --rate 100M --seconds 10");
  CHECK(big.exit_code == 2);
  CHECK(big.err ==
        "benchtau: --seconds: 10.0 s at 100 MS/s would be 1000000001 samples; the limit is "
        "50000000\n");
}

TEST_CASE("simulate writes nothing for a design that cannot oscillate, exit 1") {
  // The control pin tied to the output through 1 ohm (see predict's tests).
  const fs::path d = write_file("stuck-sim.toml", R"(supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
control = "feedback-from-output"
[parts]
R1 = { value = "10k", role = "upper" }
R2 = { value = "47k", role = "lower" }
C1 = { value = "100n", kind = "film", role = "timing-cap" }
R3 = { value = "1", role = "control-res" }
)");
  const fs::path csv = scratch("stuck.csv");
  fs::remove(csv);
  const Run r = run(exe() + " simulate --design '" + d.string() + "' -o '" + csv.string() + "'");
  CHECK(r.exit_code == 1);
  CHECK(r.out.empty());
  CHECK(r.err.rfind("benchtau: " + d.string() + ": will not oscillate: while discharging", 0) == 0);
  CHECK(r.err.find("; nothing written\n") != std::string::npos);
  CHECK_FALSE(fs::exists(csv));
}
