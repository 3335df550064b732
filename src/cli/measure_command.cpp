// benchtau: `benchtau measure CAPTURE`, cycle-by-cycle timing of a capture.
#include <fmt/format.h>

#include <cstdio>
#include <memory>

#include "drivers/csv_reader.h"
#include "src/cli/commands.h"
#include "src/cli/measure_report.h"
#include "src/cli/rate_option.h"
#include "src/core/engineering.h"
#include "src/core/input_error.h"
#include "src/core/measure.h"

namespace benchtau::cli {
namespace {

struct MeasureArgs {
  std::string path;
  NodeRequest nodes;
  std::string rate;
  std::string time_column;
  bool json = false;
  bool per_cycle = false;
  double hysteresis = EdgeOptions{}.hysteresis;
  double glitch = EdgeOptions{}.glitch_fraction;
};

int run_measure(const MeasureArgs& a) {
  try {
    CsvOptions options;
    options.rate_Hz = rate_option(a.rate);
    options.time_column = a.time_column;
    CsvResult read = read_csv_file(a.path, options);
    const NodeMap nodes = map_nodes(read.capture, a.nodes);
    MeasureOptions mo;
    mo.edges.hysteresis = a.hysteresis;
    mo.edges.glitch_fraction = a.glitch;
    const Measurement m = measure(read.capture, nodes, mo);
    std::vector<std::string> notes = read.notes;
    notes.insert(notes.end(), nodes.notes.begin(), nodes.notes.end());
    const MeasureReport report{read.capture, nodes, m, notes};
    const std::string text = a.json ? measure_json(report) : measure_table(report, a.per_cycle);
    std::fwrite(text.data(), 1, text.size(), stdout);
    return m.summary.cycles > 0 ? kMeasured : kNothingFound;
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    return kInputError;
  }
}

}  // namespace

void add_measure_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<MeasureArgs>();
  CLI::App* cmd = app.add_subcommand(
      "measure",
      "measure every cycle of a capture: high and low times, period, duty, jitter, drift and the "
      "capacitor's turnaround voltages");
  cmd->add_option("capture", args->path,
                  "capture file (CSV or similar text; - reads standard input)")
      ->required();
  cmd->add_option("--out", args->nodes.out,
                  "output-pin channel, by header name or 1-based file column (default: guessed)");
  cmd->add_option("--cap", args->nodes.cap, "capacitor-node channel (threshold and trigger)");
  cmd->add_option("--ctl", args->nodes.ctl, "control-pin channel");
  cmd->add_option("--rate", args->rate,
                  "samples per second when the file has no time column, e.g. 1M, 250k, 2.5 MS/s");
  cmd->add_option("--time", args->time_column,
                  "the time column by name or 1-based index, or \"none\" (default: guessed)");
  cmd->add_flag("--json", args->json, "write JSON for scripts instead of the table");
  cmd->add_flag("--cycles", args->per_cycle, "list every cycle in the table");
  cmd->add_option("--hysteresis", args->hysteresis,
                  "edge hysteresis either side of the midpoint, as a fraction of the swing")
      ->check(CLI::Range(0.02, 0.45));
  cmd->add_option("--glitch", args->glitch,
                  "segments shorter than this fraction of a typical one are glitches")
      ->check(CLI::Range(0.0, 0.5));
  cmd->callback([args, &exit_code] { exit_code = run_measure(*args); });
}

}  // namespace benchtau::cli
