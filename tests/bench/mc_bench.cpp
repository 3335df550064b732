// benchtau: Monte Carlo benchmark: draws per second of the spread of one circuit of each kind.
#include <fmt/format.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <string_view>

#include "src/core/design_file.h"
#include "src/core/spread.h"

namespace {

using namespace benchtau;

// One invented board of each circuit kind, with toleranced parts.
std::string design_text(std::string_view kind) {
  const std::string head = "supply_V = 9.0\nfamily = \"bipolar\"\n";
  if (kind == "two-resistor") {
    return head + R"([circuit]
kind = "astable-two-resistor"
[parts]
R1 = { value = "4k7", tolerance = "1%", role = "upper" }
R2 = { value = "22k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
)";
  }
  if (kind == "two-resistor-control-load") {
    return head + R"([circuit]
kind = "astable-two-resistor"
control = "load-to-ground"
[parts]
R1 = { value = "4k7", tolerance = "1%", role = "upper" }
R2 = { value = "22k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
R3 = { value = "47k", tolerance = "5%", role = "control-res" }
)";
  }
  if (kind == "output-resistor") {
    return head + R"([circuit]
kind = "astable-output-resistor"
[parts]
R1 = { value = "33k", tolerance = "1%", role = "timing-res" }
C1 = { value = "220n", tolerance = "5%", kind = "film", role = "timing-cap" }
)";
  }
  if (kind == "diode-steered") {
    return head + R"([circuit]
kind = "astable-diode-steered"
[parts]
R1 = { value = "10k", tolerance = "1%", role = "upper" }
R2 = { value = "47k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
D1 = { vf_V = 0.6, kind = "signal-diode", role = "diode" }
)";
  }
  if (kind == "monostable") {
    return head + R"([circuit]
kind = "monostable"
[parts]
R1 = { value = "100k", tolerance = "1%", role = "timing-res" }
C1 = { value = "1u", tolerance = "10%", kind = "film", role = "timing-cap" }
)";
  }
  return {};
}

}  // namespace

// Usage: benchtau_mc_bench KIND DRAWS THREADS REPEATS
// Prints key=value lines: the best of REPEATS whole Monte Carlo runs (draws,
// statistics and percentiles), and the period's (or pulse's) mean as a check.
int main(int argc, char** argv) {
  if (argc != 5) {
    std::fputs("usage: benchtau_mc_bench KIND DRAWS THREADS REPEATS\n", stderr);
    return 2;
  }
  const std::string text = design_text(argv[1]);
  if (text.empty()) {
    fmt::print(stderr, "unknown circuit kind {}\n", argv[1]);
    return 2;
  }
  const Design d = read_design_text(text, argv[1]);
  const Circuit c = nominal_circuit(d);
  const std::vector<Variation> vars = design_variations(d, false);
  MonteCarloOptions o;
  o.draws = std::strtoull(argv[2], nullptr, 10);
  o.threads = static_cast<unsigned>(std::strtoul(argv[3], nullptr, 10));
  const int repeats = std::atoi(argv[4]);
  double best_s = 1e300;
  MonteCarlo mc;
  for (int i = 0; i < repeats; ++i) {
    const auto t0 = std::chrono::steady_clock::now();
    mc = monte_carlo(c, vars, o);
    const auto t1 = std::chrono::steady_clock::now();
    best_s = std::min(best_s, std::chrono::duration<double>(t1 - t0).count());
  }
  const bool mono = d.kind == CircuitKind::monostable;
  const OutputStats& s =
      mc.outputs[static_cast<std::size_t>(mono ? Output::high_s : Output::period_s)];
  fmt::print("kind={}\ndraws={}\nthreads={}\nseconds={:.6f}\ndraws_per_s={:.0f}\nmean={:.9g}\n",
             argv[1], o.draws, o.threads, best_s, static_cast<double>(o.draws) / best_s, s.mean);
  return 0;
}
