// benchtau: the live fit's lines under `watch --design`, as exact text.
#include <catch2/catch.hpp>

#include "src/cli/watch_fit.h"

using namespace benchtau;

TEST_CASE("watch --design: each part with its sigma and mark, then the verdict") {
  Diagnosis d;
  d.verdict = Verdict::fail;
  d.reason = "C1 has lost about 38 % of its capacitance";
  FittedPart r;
  r.ref = "R1";
  r.unit = "ohm";
  r.nominal = 10e3;
  r.fitted = 10.02e3;
  r.sigma = 50.0;
  r.status = PartStatus::in_spec;
  FittedPart c;
  c.ref = "C1";
  c.unit = "F";
  c.nominal = 100e-9;
  c.fitted = 62e-9;
  c.sigma = 0.29e-9;
  c.status = PartStatus::low;
  d.parts = {r, c};
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
