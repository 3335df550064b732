// benchtau: the live fit's lines under `watch --design`, as exact text.
#include <catch2/catch.hpp>

#include "src/cli/watch_fit.h"
#include "tests/cli/fitted_part_support.h"

using namespace benchtau;

TEST_CASE("watch --design: each part with its sigma and mark, then the verdict") {
  Diagnosis d;
  d.verdict = Verdict::fail;
  d.reason = "C1 has lost about 38 % of its capacitance";
  d.parts = {test::part("R1", "ohm", 10e3, 0.01, 10.02e3, 50.0, 0.5, PartStatus::in_spec),
             test::part("C1", "F", 100e-9, 0.2, 62e-9, 0.29e-9, 0.9, PartStatus::low)};
  CHECK(cli::live_fit_lines(d) ==
        std::vector<std::string>{"  fit         R1 10.0 kohm +/- 50 ohm (design 10.0 kohm)",
                                 "              C1 62.0 nF +/- 290 pF (design 100 nF)  LOW",
                                 "  verdict     fail: C1 has lost about 38 % of its capacitance"});
}

TEST_CASE("watch --design: a window with nothing to fit says why") {
  Diagnosis d;
  d.verdict = Verdict::inconclusive;
  d.reason = "window: too short to fit";
  CHECK(cli::live_fit_lines(d) ==
        std::vector<std::string>{"  fit         inconclusive: window: too short to fit"});
}
