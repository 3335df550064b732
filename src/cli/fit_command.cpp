// benchtau: `benchtau fit CAPTURE... --design FILE`, which part of a board is out of spec.
#include <fmt/format.h>

#include <algorithm>
#include <cstdio>
#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "drivers/csv_reader.h"
#include "fit/diagnosis.h"
#include "fit/segment_fit.h"
#include "src/cli/commands.h"
#include "src/cli/fit_changes.h"
#include "src/cli/fit_report.h"
#include "src/cli/rate_option.h"
#include "src/core/design_file.h"
#include "src/core/engineering.h"
#include "src/core/input_error.h"
#include "src/core/measure.h"

namespace benchtau::cli {
namespace {

struct FitArgs {
  std::vector<std::string> paths;
  std::string design;
  std::vector<std::string> changes;
  NodeRequest nodes;
  std::string rate;
  std::string time_column;
  bool json = false;
  bool per_cycle = false;
};

CsvOptions csv_options(const FitArgs& a) {
  CsvOptions options;
  options.rate_Hz = rate_option(a.rate);
  options.time_column = a.time_column;
  return options;
}

// Whether capture has the channel spec names, by map_nodes' own matching rules.
bool has_channel(const Capture& capture, const std::string& spec) {
  try {
    NodeRequest r;
    r.out = spec;
    return map_nodes(capture, r).out.has_value();
  } catch (const InputError&) {
    return false;
  }
}

// The nodes of one capture: an option names a channel that must exist; the design's [capture]
// section names the columns to look for, and a node whose column this capture lacks was not
// captured (a log without the control pin), never guessed from what is left.
NodeMap capture_nodes(const Capture& capture, const Design& design, const NodeRequest& flags) {
  struct Node {
    const char* what;
    const std::string& flag;
    const CaptureNode& design;
    std::string NodeRequest::*request;
  };
  const Node nodes[] = {{"output pin", flags.out, design.out, &NodeRequest::out},
                        {"capacitor node", flags.cap, design.cap, &NodeRequest::cap},
                        {"control pin", flags.ctl, design.ctl, &NodeRequest::ctl}};
  // Most captures hold every column their design names: one pass over the channels then.
  NodeRequest request;
  for (const Node& n : nodes) request.*n.request = n.flag.empty() ? n.design.column : n.flag;
  try {
    return map_nodes(capture, request);
  } catch (const InputError&) {
    // An option's channel that is missing throws again below, with the option's name.
  }
  std::vector<const Node*> absent;
  for (const Node& n : nodes) {
    if (n.flag.empty() && !n.design.column.empty() && !has_channel(capture, n.design.column)) {
      request.*n.request = "none";
      absent.push_back(&n);
    }
  }
  NodeMap map = map_nodes(capture, request);
  for (const Node* n : absent) {
    map.notes.push_back(fmt::format("{}: not captured (the design's column \"{}\" is not in it)",
                                    n->what, n->design.column));
  }
  return map;
}

int exit_for(Verdict v) {
  switch (v) {
    case Verdict::pass:
      return kMeasured;
    case Verdict::fail:
    case Verdict::no_oscillation:
      return kNothingFound;
    case Verdict::inconclusive:
      return kInconclusive;
  }
  return kInconclusive;
}

int run_fit(const FitArgs& a) {
  try {
    if (std::count(a.paths.begin(), a.paths.end(), "-") > 1) {
      throw InputError("-", 0, 0, "standard input can be read for one capture only");
    }
    const CsvOptions options = csv_options(a);
    const Design design = read_design_file(a.design);
    const std::vector<BoardChange> changes = parse_changes(a.changes, a.paths.size(), design);
    // Captures stay where they are: each BoardCapture points at its own.
    std::vector<CsvResult> reads;
    reads.reserve(a.paths.size());
    std::vector<BoardCapture> boards;
    std::vector<std::vector<std::string>> notes;
    for (std::size_t i = 0; i < a.paths.size(); ++i) {
      reads.push_back(read_csv_file(a.paths[i], options));
      const Capture& capture = reads.back().capture;
      BoardCapture b;
      b.label = capture.source;
      b.capture = &capture;
      b.nodes = capture_nodes(capture, design, a.nodes);
      b.measurement = measure(capture, b.nodes);
      if (b.nodes.cap) {
        try {
          b.segments = fit_segments(capture.time, capture.channels[*b.nodes.cap].values,
                                    b.measurement.edges);
        } catch (const std::invalid_argument& e) {
          throw InputError(capture.source, 0, 0,
                           fmt::format("the capacitor node cannot be fitted: {}", e.what()));
        }
      }
      b.change = changes[i];
      notes.push_back(reads.back().notes);
      notes.back().insert(notes.back().end(), b.nodes.notes.begin(), b.nodes.notes.end());
      boards.push_back(std::move(b));
    }
    const Diagnosis diagnosis = diagnose(design, boards);
    const FitReport report{design, boards, notes, diagnosis};
    const std::string text =
        a.json ? fit_json(report, a.per_cycle) : fit_table(report, a.per_cycle);
    std::fwrite(text.data(), 1, text.size(), stdout);
    return exit_for(diagnosis.verdict);
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    return kInputError;
  }
}

}  // namespace

void add_fit_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<FitArgs>();
  CLI::App* cmd = app.add_subcommand(
      "fit",
      "fit a board's part values to its captures and the design: which part is out of spec, "
      "how sure that is, what to measure next, and a preferred value that restores the timing");
  cmd->add_option("captures", args->paths,
                  "capture files of one board (CSV or similar text; - reads standard input)")
      ->required();
  cmd->add_option("--design", args->design, "design file (TOML; see README.md)")->required();
  cmd->add_option("--change", args->changes,
                  "a known change for one capture, counted from 1 in the order given: "
                  "N:supply=VOLTS (taken at another supply) or N:PART||OHMS (a known resistor "
                  "added across a part; quote it from the shell), e.g. 2:supply=12, '2:R2||100k'")
      ->expected(1)  // one text per --change: the captures that follow are not swallowed
      ->multi_option_policy(CLI::MultiOptionPolicy::TakeAll)
      ->allow_extra_args(false);
  cmd->add_option("--out", args->nodes.out,
                  "output-pin channel, by header name or 1-based file column (default: the "
                  "design's [capture] section, else guessed)");
  cmd->add_option("--cap", args->nodes.cap, "capacitor-node channel (threshold and trigger)");
  cmd->add_option("--ctl", args->nodes.ctl, "control-pin channel");
  cmd->add_option("--rate", args->rate,
                  "samples per second when a file has no time column, e.g. 1M, 250k, 2.5 MS/s");
  cmd->add_option("--time", args->time_column,
                  "the time column by name or 1-based index, or \"none\" (default: guessed)");
  cmd->add_flag("--json", args->json, "write JSON for scripts instead of the table");
  cmd->add_flag("--cycles", args->per_cycle,
                "list every charge and discharge segment's fit, so that drift of tau shows");
  cmd->footer(
      "Exit status: 0 every part in tolerance; 1 a part (or a leakage or a load) out of spec, "
      "or no oscillation; 2 an input error; 3 inconclusive: the captures cannot settle it.");
  cmd->callback([args, &exit_code] { exit_code = run_fit(*args); });
}

}  // namespace benchtau::cli
