// benchtau: `benchtau predict` end to end: the table, JSON read by Python, exit codes.
#include <cmath>
#include <cstdio>
#include <string>

#include "tests/cli/cli_support.h"

using namespace cli_support;

namespace {

// A CMOS two-resistor astable (R1 10k, R2 47k, C 100n, 9 V) whose chip has
// none of the second-order figures, so the textbook relations hold.
constexpr const char* kIdeal = R"(name = "bench test: ideal astable"
supply_V = 9.0
family = "cmos"
[circuit]
kind = "astable-two-resistor"
[timer]
discharge_on_ohm = "1m"
threshold_current_A = 0
trigger_current_A = 0
propagation_delay_s = 0
[parts]
R1 = { value = "10k", tolerance = "1%", role = "upper" }
R2 = { value = "47k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
)";

// The control pin tied to the output through 1 ohm: the lower threshold
// follows the output's low level down below the discharge floor.
constexpr const char* kStuck = R"(name = "bench test: control fed from the output"
supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
control = "feedback-from-output"
[parts]
R1 = { value = "10k", tolerance = "1%", role = "upper" }
R2 = { value = "47k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
R3 = { value = "1", tolerance = "5%", role = "control-res" }
)";

constexpr double kLn2 = 0.69314718055994530942;

}  // namespace

TEST_CASE("predict prints the nominal cycle, corners and percentiles as a table") {
  const fs::path d = write_file("ideal.toml", kIdeal);
  const Run r = run(exe() + " predict --design '" + d.string() + "'");
  CHECK(r.exit_code == 0);
  CHECK(r.err.empty());
  // Textbook: t_high = ln 2 (R1 + R2) C = 3.951 ms, t_low = ln 2 R2 C = 3.258 ms
  // (P. Horowitz and W. Hill, The Art of Electronics, 3rd ed., from memory);
  // thresholds at 2/3 and 1/3 of the supply (common practice).
  CHECK(has_line(r.out, "  high time         3.95 ms"));
  CHECK(has_line(r.out, "  low time          3.26 ms"));
  CHECK(has_line(r.out, "  period            7.21 ms"));
  CHECK(has_line(r.out, "  duty              54.81 %"));
  CHECK(has_line(r.out, "  cap max            6.00 V"));
  CHECK(has_line(r.out, "  cap min            3.00 V"));
  CHECK(has_line(r.out, "  control pin        6.00 V high, 6.00 V low"));
  CHECK(has_line(r.out, "  parts: R1 10.0 kohm +/- 1 %, R2 47.0 kohm +/- 1 %, C1 100 nF +/- 5 %"));
  CHECK(has_line(r.out, "  8 worst-case corners (every part at either end of its tolerance)"));
  // Corners of the period, ln 2 (R1 + 2 R2) C with every part low or high:
  // 0.693 x 104 k x 0.99 x 95 nF = 6.78 ms and x 1.01 x 105 nF = 7.64 ms.
  CHECK(r.out.find("\n  period             6.78 ms     7.64 ms ") != std::string::npos);
  CHECK(has_line(r.out,
                 "  100000 Monte Carlo draws (seed 1), each part a normal with its "
                 "tolerance at 3 sigma"));
  CHECK(has_line(r.out,
                 "                      0.1 %        1 %        5 %       50 %       95 "
                 "%       99 %     99.9 %"));
  CHECK(has_line(r.out, "  every draw oscillates"));
  CHECK(r.out.find("findings") == std::string::npos);  // a healthy design
}

TEST_CASE("predict --json holds the documented keys, readable by Python's json module") {
  const fs::path d = write_file("ideal-json.toml", kIdeal);
  const std::string py =
      "import json,sys; d=json.load(sys.stdin); n=d['nominal']; c=d['corners']; "
      "m=d['monte_carlo']; "
      "print(d['schema'], d['oscillates'], 'reason' in d, c['method'], c['count'], "
      "m['draws'], m['seed'], sorted(m['period_s']['percentiles']), d['findings'], "
      "[v['name'] for v in d['variations']]); "
      "print(n['high_s'], n['low_s'], n['period_s'], n['duty'], n['cap_max_V'], "
      "n['cap_min_V'], c['period_s']['min'], c['period_s']['max'], "
      "m['period_s']['percentiles']['50'], m['stopped_fraction'])";
  const Run r = run(exe() + " predict --json --draws 20000 --seed 3 --design '" + d.string() +
                    "' | /usr/bin/python3 -c \"" + py + "\"");
  CHECK(r.exit_code == 0);
  const auto newline = r.out.find('\n');
  REQUIRE(newline != std::string::npos);
  CHECK(r.out.substr(0, newline) ==
        "benchtau-predict-1 True False every-corner 8 20000 3 ['0.1', '1', '5', '50', '95', "
        "'99', '99.9'] [] ['R1', 'R2', 'C1']");
  double high = 0, low = 0, period = 0, duty = 0, cmax = 0, cmin = 0, pmin = 0, pmax = 0, p50 = 0,
         stopped = -1;
  REQUIRE(std::sscanf(r.out.c_str() + newline + 1, "%lf %lf %lf %lf %lf %lf %lf %lf %lf %lf", &high,
                      &low, &period, &duty, &cmax, &cmin, &pmin, &pmax, &p50, &stopped) == 10);
  // The textbook relations (Horowitz and Hill, from memory), to the 1 mohm
  // left in the discharge switch.
  CHECK(high == Approx(kLn2 * 57e3 * 100e-9).epsilon(1e-6));
  CHECK(low == Approx(kLn2 * 47e3 * 100e-9).epsilon(1e-6));
  CHECK(period == Approx(kLn2 * 104e3 * 100e-9).epsilon(1e-6));
  CHECK(duty == Approx(57.0 / 104.0).epsilon(1e-6));
  CHECK(cmax == Approx(6.0).epsilon(1e-9));
  CHECK(cmin == Approx(3.0).epsilon(1e-9));
  CHECK(pmin == Approx(kLn2 * 104e3 * 0.99 * 95e-9).epsilon(1e-6));
  CHECK(pmax == Approx(kLn2 * 104e3 * 1.01 * 105e-9).epsilon(1e-6));
  CHECK(p50 == Approx(period).epsilon(0.003));  // the median sits at the nominal
  CHECK(stopped == 0.0);
}

TEST_CASE("predict gives the same JSON whatever the thread count") {
  const fs::path d = write_file("ideal-threads.toml", kIdeal);
  const std::string base = exe() + " predict --json --chip-spread --draws 30000 --design '" +
                           d.string() + "' --threads ";
  const Run one = run(base + "1");
  const Run two = run(base + "2");
  const Run five = run(base + "5");
  CHECK(one.exit_code == 0);
  CHECK(one.out == two.out);
  CHECK(one.out == five.out);
  CHECK(one.out.find("\"chip_spread\": true") != std::string::npos);
}

TEST_CASE("predict: a design that cannot oscillate says why, with no timing numbers, exit 1") {
  const fs::path d = write_file("stuck.toml", kStuck);
  const Run r = run(exe() + " predict --design '" + d.string() + "'");
  CHECK(r.exit_code == 1);
  CHECK(r.err.empty());
  CHECK(r.out.find("\nwill not oscillate: while discharging, the capacitor node settles at ") !=
        std::string::npos);
  CHECK(has_line(r.out, "  reset pin    9.00 V at its lowest, threshold 700 mV"));
  CHECK(r.out.find("high time") == std::string::npos);
  CHECK(r.out.find("period") == std::string::npos);
  CHECK(r.out.find("corners") == std::string::npos);
  const std::string py =
      "import json,sys; d=json.load(sys.stdin); n=d['nominal']; "
      "print(d['oscillates'], d['reason'][:37], n['high_s'], n['period_s'], d['corners'], "
      "d['monte_carlo'], [f['code'] for f in d['findings']])";
  const Run j = run(exe() + " predict --json --design '" + d.string() +
                    "' | /usr/bin/python3 -c \"" + py + "\"");
  // It stops by 14 mV, inside the output low level's 0.1 V spread (the
  // control pin follows that level): another timer may run it.
  CHECK(j.out ==
        "False will not oscillate: while discharging None None None None ['marginal', "
        "'no_oscillation']\n");
}

TEST_CASE("predict: a missing design file or a bad option is an input error, exit 2") {
  const Run r = run(exe() + " predict --design /nonexistent/design.toml");
  CHECK(r.exit_code == 2);
  CHECK(r.out.empty());
  CHECK(r.err ==
        "benchtau: /nonexistent/design.toml: cannot read the design file: No such file or "
        "directory\n");
  CHECK(run(exe() + " predict").exit_code == 2);  // --design is required
  const fs::path d = write_file("ideal-bad.toml", kIdeal);
  CHECK(run(exe() + " predict --draws -5 --design '" + d.string() + "'").exit_code == 2);
}

TEST_CASE("predict on the healthy demo board: no findings, exit 0") {
  const Run r = run(exe() + " predict --draws 2000 --design " + demo("mister-rev-b.toml"));
  CHECK(r.exit_code == 0);
  CHECK(r.out.find("findings") == std::string::npos);
  CHECK(r.out.rfind("captures/mister-rev-b.toml: greenhouse mister timer, rev B\n") !=
        std::string::npos);
}

TEST_CASE("predict lists design findings and exits 1 on a problem") {
  // An electrolytic rated 6.3 V on a 9 V supply.
  std::string text = kIdeal;
  text.replace(text.find("kind = \"film\""), 13, "kind = \"electrolytic\", rated_V = 6.3");
  const fs::path d = write_file("rating.toml", text);
  const Run r = run(exe() + " predict --draws 1000 --design '" + d.string() + "'");
  CHECK(r.exit_code == 1);
  CHECK(has_line(r.out, "  problem  cap_rating_low: C1 is rated 6.30 V, below the 9.00 V supply"));
}
