// benchtau: the verdicts that are not a number: a board or design that cannot oscillate, a
// record too short to fit, a capture of another circuit; and captures fitted jointly.
#include <catch2/catch.hpp>

#include <string>

#include "src/core/input_error.h"
#include "tests/fit/diagnosis_support.h"

namespace benchtau {
namespace {

const Design& design() {
  static const Design d = read_design_text(test::kTwoResistorDesign, "test.toml");
  return d;
}

// The design text with one line replaced, and optionally "[capture]" too (to add parts).
Design edited(std::string_view from, std::string_view to, std::string_view capture_to = {}) {
  std::string text(test::kTwoResistorDesign);
  auto swap = [&](std::string_view a, std::string_view b) {
    const auto at = text.find(a);
    REQUIRE(at != std::string::npos);
    text.replace(at, a.size(), b);
  };
  swap(from, to);
  if (!capture_to.empty()) swap("[capture]", capture_to);
  return read_design_text(text, "edited.toml");
}

TEST_CASE("a design that cannot oscillate is said to, before any fit", "[diagnosis]") {
  // The control pin driven at 9.5 V on a 9 V supply: the upper threshold sits above where
  // the capacitor can charge to, so the output never falls.
  const Design d = edited(R"(control = "decoupled")", "control = \"driven\"\ncontrol_V = 9.5");
  REQUIRE_FALSE(predict_cycle(nominal_circuit(d)).oscillates);
  const test::BenchCapture c = test::capture_board(design(), {}, true);
  const Diagnosis g = diagnose(d, std::span(&c.board, 1));
  CHECK(g.verdict == Verdict::no_oscillation);
  CHECK(g.reason.rfind("the design cannot oscillate: ", 0) == 0);
}

TEST_CASE("a capture whose output never moves is no oscillation", "[diagnosis]") {
  test::BenchCapture c = test::capture_board(design(), {}, true);
  Capture stuck = *c.board.capture;
  for (double& v : stuck.channels[0].values) v = 7.3;
  c.board.capture = &stuck;
  c.board.measurement = measure(stuck, c.board.nodes);
  const Diagnosis g = diagnose(design(), std::span(&c.board, 1));
  CHECK(g.verdict == Verdict::no_oscillation);
  CHECK(g.reason.find("does not oscillate") != std::string::npos);
  CHECK(g.suspects.empty());
  REQUIRE_FALSE(g.next.empty());
  CHECK(g.next.front().find("a short or a heavy leak across C1") != std::string::npos);
}

TEST_CASE("a record too short to hold two cycles is inconclusive", "[diagnosis]") {
  test::BenchCapture c = test::capture_board(design(), {}, true);
  Capture cut = *c.board.capture;
  const std::size_t keep = cut.samples() * 3 / 24;  // 1.5 of the 12 cycles
  for (Channel& ch : cut.channels) ch.values.resize(keep);
  c.board.capture = &cut;
  c.board.measurement = measure(cut, c.board.nodes);
  c.board.segments.reset();
  const Diagnosis g = diagnose(design(), std::span(&c.board, 1));
  CHECK(g.verdict == Verdict::inconclusive);
  CHECK(g.reason.find("too short to fit") != std::string::npos);
}

TEST_CASE("a capture of another circuit is inconclusive, saying why", "[diagnosis]") {
  // The board is diode-steered (duty below a half); the design says two resistors.
  const Design steered =
      edited(R"(kind = "astable-two-resistor")", R"(kind = "astable-diode-steered")",
             R"(D1 = { vf_V = 0.6, kind = "signal-diode", role = "diode" }
[capture])");
  const test::BenchCapture c = test::capture_board(steered, {}, true);
  REQUIRE(c.board.measurement.summary.duty.mean < 0.45);
  const Diagnosis g = diagnose(design(), std::span(&c.board, 1));
  INFO(g.reason);
  CHECK(g.verdict == Verdict::inconclusive);
  CHECK(g.reason.find("does not fit the design's circuit") != std::string::npos);
}

TEST_CASE("a second capture with a known resistor across R2 separates R2 from C1", "[diagnosis]") {
  // From the output alone, lost capacitance and low resistances explain one capture alike;
  // a 47k across R2 halves R2 but leaves C1, which only C1's explanation can follow.
  const test::BenchCapture first = test::capture_board(design(), {"C1", 0.7}, false, 5);
  test::BenchCapture second = test::capture_board(
      edited(R"(R2 = { value = "47k")", R"(R2 = { value = "23.5k")"), {"C1", 0.7}, false, 6);
  second.board.change.across_ref = "R2";
  second.board.change.across_ohm = 47e3;
  const BoardCapture both[] = {first.board, second.board};
  const Diagnosis g = diagnose(design(), both);
  INFO(g.reason);
  REQUIRE_FALSE(g.suspects.empty());
  CHECK(g.suspects.front().ref == "C1");
  CHECK(g.suspects.front().fitted == Approx(70e-9).epsilon(0.03));
  CHECK_FALSE(g.suspects.front().ranked_by_prior);
}

TEST_CASE("a design giving an ideal timer (no delay, stiff output) is fitted, not refused",
          "[diagnosis]") {
  // Zero is a fair value for a figure fitted on a log scale elsewhere: such figures are
  // fitted on a linear one around it.
  const Design ideal = edited("[parts]",
                              "[timer]\npropagation_delay_s = 0\nout_source_ohm = 0\n"
                              "threshold_current_A = 0\n[parts]");
  CHECK(ideal.figures_given.size() == 3);
  const test::BenchCapture c = test::capture_board(ideal, {}, true);
  const Diagnosis healthy = diagnose(ideal, std::span(&c.board, 1));
  INFO(healthy.reason);
  CHECK(healthy.verdict == Verdict::pass);
  const test::BenchCapture f = test::capture_board(ideal, {"C1", 0.7}, true);
  const Diagnosis dried = diagnose(ideal, std::span(&f.board, 1));
  REQUIRE_FALSE(dried.suspects.empty());
  CHECK(dried.suspects.front().ref == "C1");
}

TEST_CASE("a capture taken at another supply than the design's, unsaid, is inconclusive",
          "[diagnosis]") {
  const test::BenchCapture c =
      test::capture_board(edited("supply_V = 9.0", "supply_V = 12.0"), {}, true);
  const Diagnosis unsaid = diagnose(design(), std::span(&c.board, 1));
  INFO(unsaid.reason);
  CHECK(unsaid.verdict == Verdict::inconclusive);
  CHECK(unsaid.reason.find("another supply") != std::string::npos);
  BoardCapture said = c.board;
  said.change.supply_V = 12.0;
  CHECK(diagnose(design(), std::span(&said, 1)).verdict == Verdict::pass);
}

TEST_CASE("a change naming a part the design lacks is an input error", "[diagnosis]") {
  test::BenchCapture c = test::capture_board(design(), {}, false);
  c.board.change.across_ref = "R9";
  c.board.change.across_ohm = 10e3;
  CHECK_THROWS_AS(diagnose(design(), std::span(&c.board, 1)), InputError);
}

}  // namespace
}  // namespace benchtau
