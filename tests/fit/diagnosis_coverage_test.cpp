// benchtau: the circuit fit's uncertainty means something. Boards are drawn as the priors say
// (each resistor log-normal within its tolerance, at sigma = ln(1 + tolerance) / 2, the
// mapping of circuit_parameters.h), with C1 dried out to 62 % of its value, simulated with
// fresh noise, and diagnosed: the reported 1-sigma interval of C1 must hold its true value
// about 68 % of the time. The test enforces 55 % to 81 % over 120 boards (68.3 % +/- three
// binomial standard deviations, 3 x 4.2 %).
#include <catch2/catch.hpp>

#include <cmath>
#include <random>

#include "tests/fit/diagnosis_support.h"

namespace benchtau {
namespace {

TEST_CASE("the fitted capacitance's 1-sigma interval covers the truth about 68 % of the time",
          "[diagnosis][coverage]") {
  const Design design = read_design_text(test::kTwoResistorDesign, "test.toml");
  std::mt19937_64 rng(2026);
  std::normal_distribution<double> z(0.0, 1.0);
  constexpr int kBoards = 120;
  int covered = 0, named = 0;
  for (int k = 0; k < kBoards; ++k) {
    Design board = design;
    for (Part& p : board.parts) {
      if (p.role == PartRole::upper || p.role == PartRole::lower) {
        p.value *= std::exp(std::log1p(p.tolerance) / 2.0 * z(rng));
      }
    }
    const double true_C = 0.62 * 100e-9;
    const test::BenchCapture c =
        test::capture_board(board, {"C1", 0.62}, true, static_cast<std::uint64_t>(100 + k));
    const Diagnosis d = diagnose(design, std::span(&c.board, 1));
    if (d.suspects.empty() || d.suspects.front().ref != "C1") continue;
    ++named;
    const Suspect& s = d.suspects.front();
    if (std::fabs(s.fitted - true_C) <= s.sigma) ++covered;
  }
  CHECK(named == kBoards);
  const double coverage = static_cast<double>(covered) / kBoards;
  INFO("coverage " << coverage);
  CHECK(coverage >= 0.55);
  CHECK(coverage <= 0.81);
}

}  // namespace
}  // namespace benchtau
