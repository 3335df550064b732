// benchtau: `benchtau predict --design FILE`, the design's cycle, its tolerance spread and rules.
#include <fmt/format.h>

#include <algorithm>
#include <cstdio>
#include <memory>

#include "src/cli/commands.h"
#include "src/cli/predict_report.h"
#include "src/core/design_file.h"
#include "src/core/design_rules.h"
#include "src/core/input_error.h"
#include "src/core/spread.h"

namespace benchtau::cli {
namespace {

// More draws than this would hold gigabytes of results in memory.
constexpr std::size_t kMaxDraws = 10'000'000;

struct PredictArgs {
  std::string design;
  std::size_t draws = MonteCarloOptions{}.draws;
  std::uint64_t seed = MonteCarloOptions{}.seed;
  unsigned threads = 0;
  bool json = false;
  bool chip_spread = false;
};

int run_predict(const PredictArgs& a) {
  try {
    const Design design = read_design_file(a.design);
    const Circuit circuit = nominal_circuit(design);
    const CyclePrediction nominal = predict_cycle(circuit);
    const std::vector<Variation> variations = design_variations(design, a.chip_spread);
    Findings findings = check_design(design, circuit, nominal);
    CornerSpread corners;
    MonteCarlo mc;
    PredictReport report{design, nominal, variations, nullptr, nullptr, a.chip_spread, findings};
    if (nominal.oscillates) {
      corners = corner_spread(circuit, variations);
      report.corners = &corners;
      if (a.draws > 0) {
        mc = monte_carlo(circuit, variations, {a.draws, a.seed, a.threads});
        report.monte_carlo = &mc;
      }
      const Findings spread = spread_findings(corners, mc);
      findings.insert(findings.end(), spread.begin(), spread.end());
    }
    const std::string text = a.json ? predict_json(report) : predict_table(report);
    std::fwrite(text.data(), 1, text.size(), stdout);
    const bool problem = std::any_of(findings.begin(), findings.end(), [](const Finding& f) {
      return f.severity == Severity::problem;
    });
    return nominal.oscillates && !problem ? kMeasured : kNothingFound;
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    return kInputError;
  }
}

}  // namespace

void add_predict_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<PredictArgs>();
  CLI::App* cmd = app.add_subcommand(
      "predict",
      "predict a design's cycle from its parts: high and low times, period, duty and node "
      "voltages, their spread over the parts' tolerances, and design-rule findings");
  cmd->add_option("--design", args->design, "design file (TOML; see README.md)")->required();
  cmd->add_option("--draws", args->draws, "Monte Carlo draws (0 skips the Monte Carlo)")
      ->check(CLI::Range(std::size_t{0}, kMaxDraws));
  cmd->add_option("--seed", args->seed, "Monte Carlo seed; a seed gives the same results always");
  cmd->add_option("--threads", args->threads, "threads for the Monte Carlo (0: one per core)")
      ->check(CLI::Range(0U, 256U));
  cmd->add_flag("--json", args->json, "write JSON for scripts instead of the table");
  cmd->add_flag("--chip-spread", args->chip_spread,
                "also draw the timer's own figures within their part-to-part spreads");
  cmd->callback([args, &exit_code] { exit_code = run_predict(*args); });
}

}  // namespace benchtau::cli
