// benchtau: Monte Carlo benchmark: draws per second of the spread of one circuit of each kind.
#include <fmt/format.h>

#include <array>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <string_view>
#include <vector>

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

// Times one run of what `statistics` asks for: "all" is the whole Monte Carlo
// (draws, then mean, std and percentiles of all seven outputs); "period" is
// the same draws with the period (a monostable's pulse) alone kept and
// summarised, the like-for-like peer of a NumPy run that works out the period
// only. Returns the statistic's mean, as a check.
double run_once(const Circuit& c, const std::vector<Variation>& vars, MonteCarloOptions o,
                Output shown, bool period_only) {
  if (period_only) o.outputs = only(shown);
  return monte_carlo(c, vars, o).outputs[static_cast<std::size_t>(shown)].mean;
}

}  // namespace

// Usage: benchtau_mc_bench KIND DRAWS THREADS REPEATS [all|period]
// Prints key=value lines: the best of REPEATS runs, and the period's (or
// pulse's) mean as a check.
int main(int argc, char** argv) {
  if (argc != 5 && argc != 6) {
    std::fputs("usage: benchtau_mc_bench KIND DRAWS THREADS REPEATS [all|period]\n", stderr);
    return 2;
  }
  const std::string text = design_text(argv[1]);
  const std::string_view statistics = argc == 6 ? argv[5] : "all";
  if (text.empty() || (statistics != "all" && statistics != "period")) {
    fmt::print(stderr, "unknown circuit kind {} or statistics {}\n", argv[1], statistics);
    return 2;
  }
  const Design d = read_design_text(text, argv[1]);
  const Circuit c = nominal_circuit(d);
  const std::vector<Variation> vars = design_variations(d, false);
  MonteCarloOptions o;
  o.draws = std::strtoull(argv[2], nullptr, 10);
  o.threads = static_cast<unsigned>(std::strtoul(argv[3], nullptr, 10));
  const int repeats = std::atoi(argv[4]);
  const Output shown = d.kind == CircuitKind::monostable ? Output::high_s : Output::period_s;
  double best_s = 1e300, mean = 0.0;
  for (int i = 0; i < repeats; ++i) {
    const auto t0 = std::chrono::steady_clock::now();
    mean = run_once(c, vars, o, shown, statistics == "period");
    const auto t1 = std::chrono::steady_clock::now();
    best_s = std::min(best_s, std::chrono::duration<double>(t1 - t0).count());
  }
  fmt::print(
      "kind={}\nstatistics={}\ndraws={}\nthreads={}\nseconds={:.6f}\ndraws_per_s={:.0f}\n"
      "mean={:.9g}\n",
      argv[1], statistics, o.draws, o.threads, best_s, static_cast<double>(o.draws) / best_s, mean);
  return 0;
}
