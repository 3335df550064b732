// benchtau: the measurement checked against ngspice runs of the team's own timer model.
#include <fmt/format.h>
#include <catch2/catch.hpp>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstddef>
#include <cstdlib>
#include <filesystem>
#include <numbers>
#include <string>

#include "drivers/csv_reader.h"
#include "src/core/findings.h"
#include "src/core/measure.h"
#include "src/core/nodes.h"
#include "tests/reference/spice_run.h"

namespace {

namespace fs = std::filesystem;
namespace spice = benchtau::spice;

// Circuit constants, as written in tests/reference/spice/astable_two_resistor.cir
// and the defaults of timer_behavioural.lib.
constexpr double supply_V = 9.0;
constexpr double discharge_on_ohm = 10.0;  // ron
constexpr double out_drop_V = 1.7;         // vdrop
constexpr double out_low_V = 0.1;          // vlow
constexpr double out_source_ohm = 20.0;    // rsrc
constexpr double out_sink_ohm = 10.0;      // rsink
constexpr double load_ohm = 10e3;          // Rload
constexpr int steady_cycles = 10;          // whole cycles simulated after the start-up
constexpr double samples_per_short_segment = 1000.0;

// Tolerances.
// Textbook relations, 0.5 %: the model's discharge switch (ron = 10 ohm) lengthens
// the low time by ron/R2 in series and by the offset supply*ron/(R1+ron) it leaves on
// the discharge node (about 2.2 ron/R1 of the low time); the parts below keep that
// bias under 0.3 % (checked). The simulator's step adds up to about 0.05 % (seen by
// refining the step tenfold) and the capture's sampling, one sample per 1/1000 of the
// shorter segment, up to 0.1 % per segment. Bias plus both stays under 0.45 %, so a
// measurement 1 % wrong fails in either direction.
constexpr double textbook_rel = 0.005;
// The same RC law with the switch's resistance included is exact for this model (its
// comparators switch within 1 mV of their references); only step and sampling
// remain, 0.15 %, so 0.2 % leaves a margin and catches errors the bias could hide.
constexpr double model_rel = 0.002;
// Turnaround and control voltages, 0.1 % of the supply (9 mV): the comparators'
// 1 mV width plus the step's 0.05 % of a segment times the capacitor's slope at the
// turnaround (3 ln 2 V per segment) is about 2 mV; a 1 % error at 3 V is 30 mV.
constexpr double turnaround_abs_V = 0.001 * supply_V;
// Output levels: the stage's own sources and resistors into the load; the measured
// level is a median of flat samples, so 10 mV is loose.
constexpr double out_level_abs_V = 0.01;

struct Parts {
  const char* label;  // used in names of scratch directories
  double r1_ohm;
  double r2_ohm;
  double c_F;
};

struct Expected {
  double high_s, low_s, period_s, duty;  // textbook
  double model_low_s;                    // with the discharge switch's resistance
  double startup_s;                      // first charge from 0 V to two-thirds
  double step_s, stop_s;                 // simulator step (and sample interval), duration
};

Expected expected_for(const Parts& p) {
  Expected e{};
  // Textbook 555 astable relations, P. Horowitz and W. Hill, The Art of
  // Electronics, 3rd ed. (Cambridge University Press, 2015), the section on the
  // 555 timer (from memory): t_high = ln 2 (R1 + R2) C, t_low = ln 2 R2 C.
  e.high_s = std::numbers::ln2 * (p.r1_ohm + p.r2_ohm) * p.c_F;
  e.low_s = std::numbers::ln2 * p.r2_ohm * p.c_F;
  e.period_s = e.high_s + e.low_s;
  e.duty = e.high_s / e.period_s;
  // While the switch is on, the discharge node is supply*ron/(R1+ron) behind R1||ron
  // (Thevenin); the capacitor falls from 2/3 to 1/3 of the supply towards that offset
  // through R2 plus R1||ron. Derived here from the RC law.
  const double offset_V = supply_V * discharge_on_ohm / (p.r1_ohm + discharge_on_ohm);
  const double r_on_side_ohm = p.r1_ohm * discharge_on_ohm / (p.r1_ohm + discharge_on_ohm);
  e.model_low_s = (p.r2_ohm + r_on_side_ohm) * p.c_F *
                  std::log((2.0 / 3.0 * supply_V - offset_V) / (1.0 / 3.0 * supply_V - offset_V));
  // Charging from 0 V towards the supply, two-thirds is reached after RC ln 3.
  e.startup_s = std::log(3.0) * (p.r1_ohm + p.r2_ohm) * p.c_F;
  e.step_s = std::min(e.high_s, e.low_s) / samples_per_short_segment;
  // Start-up, the first low, the steady cycles, then half a high phase of margin so
  // that the last rising edge is well inside the record.
  e.stop_s = e.startup_s + e.low_s + steady_cycles * e.period_s + 0.5 * e.high_s;
  return e;
}

// Writes the netlist for p into dir, runs ngspice there and returns the path of
// the capture it wrote.
fs::path simulate(const Parts& p, const Expected& e, const fs::path& dir) {
  const fs::path spice_dir = spice::source_dir();
  fs::copy_file(spice_dir / "timer_behavioural.lib", dir / "timer_behavioural.lib");
  std::string netlist = spice::read_text(spice_dir / "astable_two_resistor.cir");
  REQUIRE(spice::replace_line(
      netlist, ".param r1=",
      fmt::format(".param r1={:.9g} r2={:.9g} c1={:.9g}", p.r1_ohm, p.r2_ohm, p.c_F)));
  REQUIRE(spice::replace_line(netlist, ".param tstep=",
                              fmt::format(".param tstep={:.9g} tstop={:.9g}", e.step_s, e.stop_s)));
  REQUIRE(spice::write_text(dir / "astable.cir", netlist));

  const std::string quoted = spice::shell_quote(dir);
  REQUIRE(!quoted.empty());
  const std::string command =
      fmt::format("cd {} && ngspice -b astable.cir > ngspice.log 2>&1", quoted);
  const int status = std::system(command.c_str());
  const fs::path capture = dir / "astable.txt";
  const std::string log = spice::read_text(dir / "ngspice.log");
  INFO("ngspice log:\n" << log);
  REQUIRE(status == 0);
  // ngspice exits 0 after an aborted transient and still writes what it has.
  REQUIRE(log.find("aborted") == std::string::npos);
  REQUIRE(fs::exists(capture));
  REQUIRE(fs::file_size(capture) > 0);
  return capture;
}

void check_against_ngspice(const Parts& p) {
  if (!spice::ngspice_available()) {
    FAIL(
        "ngspice is not on PATH; it is a required test dependency (Debian package ngspice, "
        "see scripts/install-deps)");
  }
  const Expected e = expected_for(p);
  INFO(fmt::format("R1 = {:g} ohm, R2 = {:g} ohm, C = {:g} F", p.r1_ohm, p.r2_ohm, p.c_F));
  // The parts must keep the switch's bias small, or the textbook check means little.
  REQUIRE(e.model_low_s / e.low_s - 1.0 < 0.003);

  const spice::ScratchDir dir(spice::scratch_path(p.label));
  const auto started = std::chrono::steady_clock::now();
  const fs::path capture_path = simulate(p, e, dir.path());
  const double simulate_s =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  INFO("capture written by ngspice: " << capture_path.string());

  // ngspice's wrdata: blank-separated columns, one header line of vector names
  // ("time", "v(out)", ...), leading and trailing blanks.
  const benchtau::CsvResult csv = benchtau::read_csv_file(capture_path.string());
  CHECK(csv.dialect.separator == ' ');
  CHECK(csv.dialect.has_header);
  REQUIRE(csv.capture.channels.size() == 3);
  // wrdata prints 9 significant digits: times are quantized at about 1 ns.
  CHECK(csv.capture.time.dt_s == Approx(e.step_s).epsilon(1e-3));
  CHECK(csv.capture.duration_s() == Approx(e.stop_s).margin(e.step_s));

  const benchtau::NodeMap map =
      benchtau::map_nodes(csv.capture, benchtau::NodeRequest{"v(out)", "v(cap)", "v(ctl)"});
  REQUIRE(map.out.has_value());
  REQUIRE(map.cap.has_value());
  REQUIRE(map.ctl.has_value());
  CHECK(*map.out == 0);
  CHECK(*map.cap == 1);
  CHECK(*map.ctl == 2);

  const benchtau::Measurement m = benchtau::measure(csv.capture, map);
  const benchtau::Summary& s = m.summary;
  std::string findings;
  for (const benchtau::Finding& f : m.findings) {
    const std::string said =
        fmt::format("{} ({}): {}", f.code, benchtau::severity_name(f.severity), f.message);
    findings += "\n  finding " + said;
    INFO("finding " << said);
    // A noiseless record with 1000 samples a segment leaves nothing to warn about.
    CHECK(f.severity == benchtau::Severity::info);
  }
  CHECK(m.edge_node == "out");

  // Cycle count: rising edges start at the end of the first low and come every
  // period; the whole cycles that fit before the record ends are the steady ones.
  const double first_rise_s = e.startup_s + e.low_s;
  const auto implied_cycles =
      static_cast<std::size_t>(std::floor((csv.capture.duration_s() - first_rise_s) / e.period_s));
  CHECK(implied_cycles == static_cast<std::size_t>(steady_cycles));
  CHECK(s.cycles == implied_cycles);
  std::size_t steady = 0;
  for (const benchtau::Cycle& c : m.cycles) steady += c.startup ? 0 : 1;
  CHECK(steady == s.cycles);
  CHECK(m.min_samples_per_segment == Approx(samples_per_short_segment).epsilon(0.01));

  WARN(fmt::format(
      "{}: ngspice {:.2f} s; high {:.6e} s (textbook {:.6e}, {:+.3f} %), low {:.6e} s "
      "(textbook {:.6e}, {:+.3f} %; with ron {:.6e}, {:+.3f} %), period {:.6e} s ({:+.3f} %), "
      "duty {:.5f} (textbook {:.5f}), cap {:.5f} / {:.5f} V, ctl {:.5f} V{}",
      p.label, simulate_s, s.high_s.mean, e.high_s, 100 * (s.high_s.mean / e.high_s - 1),
      s.low_s.mean, e.low_s, 100 * (s.low_s.mean / e.low_s - 1), e.model_low_s,
      100 * (s.low_s.mean / e.model_low_s - 1), s.period_s.mean,
      100 * (s.period_s.mean / e.period_s - 1), s.duty.mean, e.duty, s.cap_max_V.mean,
      s.cap_min_V.mean, s.ctl_V.mean, findings));

  // Against the textbook relations.
  CHECK(s.high_s.mean == Approx(e.high_s).epsilon(textbook_rel));
  CHECK(s.low_s.mean == Approx(e.low_s).epsilon(textbook_rel));
  CHECK(s.period_s.mean == Approx(e.period_s).epsilon(textbook_rel));
  CHECK(s.duty.mean == Approx(e.duty).epsilon(textbook_rel));
  // Against the same law with the switch's resistance: exact for this model.
  const double model_period_s = e.high_s + e.model_low_s;
  CHECK(s.high_s.mean == Approx(e.high_s).epsilon(model_rel));
  CHECK(s.low_s.mean == Approx(e.model_low_s).epsilon(model_rel));
  CHECK(s.period_s.mean == Approx(model_period_s).epsilon(model_rel));
  CHECK(s.duty.mean == Approx(e.high_s / model_period_s).epsilon(model_rel));
  CHECK(s.frequency_Hz == Approx(1.0 / model_period_s).epsilon(model_rel));
  // A simulation has no noise: every steady cycle alike, within the sampling.
  CHECK(s.period_s.max - s.period_s.min < 2.5 * e.step_s);

  // Turnarounds at the control voltage and half of it: with three equal divider
  // resistors (common practice) that is 2/3 and 1/3 of the supply.
  CHECK(s.cap_max_V.mean == Approx(2.0 / 3.0 * supply_V).margin(turnaround_abs_V));
  CHECK(s.cap_min_V.mean == Approx(1.0 / 3.0 * supply_V).margin(turnaround_abs_V));
  CHECK(s.ctl_V.mean == Approx(2.0 / 3.0 * supply_V).margin(turnaround_abs_V));

  // Output levels of the model's stage into the 10k load.
  const double high_level_V = (supply_V - out_drop_V) * load_ohm / (load_ohm + out_source_ohm);
  const double low_level_V = out_low_V * load_ohm / (load_ohm + out_sink_ohm);
  CHECK(s.out_high_V == Approx(high_level_V).margin(out_level_abs_V));
  CHECK(s.out_low_V == Approx(low_level_V).margin(out_level_abs_V));
}

}  // namespace

// Part values invented for the check; their duty cycles span about 50 % to 92 %.
TEST_CASE("ngspice astable, duty near 50 %: R1 10k, R2 470k, C 1n", "[reference][ngspice]") {
  check_against_ngspice({"r1_10k_r2_470k_c_1n", 10e3, 470e3, 1e-9});
}

TEST_CASE("ngspice astable, duty 55 %: R1 10k, R2 47k, C 100n", "[reference][ngspice]") {
  check_against_ngspice({"r1_10k_r2_47k_c_100n", 10e3, 47e3, 100e-9});
}

TEST_CASE("ngspice astable, duty 67 %: R1 33k, R2 33k, C 47n", "[reference][ngspice]") {
  check_against_ngspice({"r1_33k_r2_33k_c_47n", 33e3, 33e3, 47e-9});
}

TEST_CASE("ngspice astable, duty 92 %: R1 47k, R2 4.7k, C 1u", "[reference][ngspice]") {
  check_against_ngspice({"r1_47k_r2_4k7_c_1u", 47e3, 4.7e3, 1e-6});
}
