// benchtau: the diagnosis names the part that was changed, on boards simulated by the circuit
// model (the ngspice checks in tests/reference/faults do the same against an independent
// simulator). The values checked are the ones put into the simulated board.
#include <catch2/catch.hpp>

#include <cmath>

#include "tests/fit/diagnosis_support.h"

namespace benchtau {
namespace {

const Design& design() {
  static const Design d = read_design_text(test::kTwoResistorDesign, "test.toml");
  return d;
}

Diagnosis run(const test::BoardFault& fault, bool with_cap = true, std::uint64_t seed = 1) {
  const test::BenchCapture c = test::capture_board(design(), fault, with_cap, seed);
  return diagnose(design(), std::span(&c.board, 1));
}

const FittedPart& part(const Diagnosis& d, std::string_view ref) {
  for (const FittedPart& p : d.parts) {
    if (p.ref == ref) return p;
  }
  FAIL("no part " << ref);
  return d.parts.front();
}

TEST_CASE("a healthy board passes", "[diagnosis]") {
  const Diagnosis d = run({});
  INFO(d.reason);
  CHECK(d.verdict == Verdict::pass);
  CHECK(d.healthy_probability > 0.5);
  for (const FittedPart& p : d.parts) CHECK(p.status == PartStatus::in_spec);
  // The output's levels come from the output channel: the board was simulated with the
  // family's typical 1.7 V drop, and the fit finds it from the data, not the prior.
  bool found = false;
  for (const FittedPart& f : d.figures) {
    if (f.ref != "output high drop") continue;
    found = true;
    CHECK(f.fitted == Approx(1.7).margin(0.05));
    CHECK(f.data_share > 0.9);
  }
  CHECK(found);
}

TEST_CASE("lost capacitance is named, with its value", "[diagnosis]") {
  const Diagnosis d = run({"C1", 0.62});
  INFO(d.reason);
  REQUIRE(d.verdict == Verdict::fail);
  REQUIRE_FALSE(d.suspects.empty());
  CHECK(d.suspects.front().ref == "C1");
  CHECK(d.suspects.front().kind == SuspectKind::value_low);
  CHECK(d.suspects.front().fitted == Approx(62e-9).epsilon(0.03));
  CHECK(part(d, "C1").status == PartStatus::low);
  CHECK(part(d, "R1").status == PartStatus::in_spec);
  REQUIRE(d.replacement.has_value());
  CHECK(d.replacement->ref == "C1");
}

TEST_CASE("a drifted resistor is named", "[diagnosis]") {
  const Diagnosis d = run({"R2", 1.3});
  INFO(d.reason);
  REQUIRE_FALSE(d.suspects.empty());
  CHECK(d.suspects.front().ref == "R2");
  CHECK(d.suspects.front().kind == SuspectKind::value_high);
  CHECK(d.suspects.front().fitted == Approx(47e3 * 1.3).epsilon(0.03));
}

TEST_CASE("a leaking capacitor is named, with the leakage's resistance", "[diagnosis]") {
  test::BoardFault f;
  f.leak_ohm = 600e3;
  const Diagnosis d = run(f);
  INFO(d.reason);
  REQUIRE_FALSE(d.suspects.empty());
  CHECK(d.suspects.front().ref == "C1-leakage");
  CHECK(d.suspects.front().fitted == Approx(600e3).epsilon(0.03));
}

TEST_CASE("an unexpected load on the control pin is named", "[diagnosis]") {
  test::BoardFault f;
  f.control_ohm = 22e3;
  const Diagnosis d = run(f);
  INFO(d.reason);
  REQUIRE_FALSE(d.suspects.empty());
  CHECK(d.suspects.front().ref == "control-pin-load");
  CHECK(d.suspects.front().fitted == Approx(22e3).epsilon(0.03));
}

TEST_CASE("from the output alone, R and C cannot be told apart, and the tool says so",
          "[diagnosis]") {
  const Diagnosis d = run({"C1", 0.62}, false);
  INFO(d.reason);
  CHECK(d.mode == "output-only");
  CHECK(d.verdict == Verdict::fail);
  CHECK_FALSE(d.unseparated.empty());
}

}  // namespace
}  // namespace benchtau
