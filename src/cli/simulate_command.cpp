// benchtau: `benchtau simulate --design FILE -o FILE`, a synthetic capture of the design.
#include <fmt/format.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <memory>
#include <optional>

#include "src/cli/commands.h"
#include "src/core/capture_csv.h"
#include "src/core/design_file.h"
#include "src/core/engineering.h"
#include "src/core/input_error.h"
#include "src/core/simulate.h"

namespace benchtau::cli {
namespace {

namespace fs = std::filesystem;

struct SimulateArgs {
  std::string design;
  std::string output;
  std::string rate, seconds, trigger_every, full_scale, noise;
  double cycles = 0.0;
  int bits = 0;
  std::uint64_t seed = 1;
  bool power_up = false;
  bool force = false;
};

std::optional<double> eng_option(const std::string& text, const char* option, const char* unit,
                                 const char* example) {
  if (text.empty()) return std::nullopt;
  const auto v = parse_eng(text, unit);
  if (!v) {
    throw InputError(option, 0, 0,
                     fmt::format("expected a number such as {}, found \"{}\"", example, text));
  }
  return v;
}

// A [capture] column given by name names the column written; one given by
// number (or not at all) keeps the usual name.
std::string column_name(const CaptureNode& node, const char* fallback) {
  if (node.column.empty() || node.column.find_first_not_of("0123456789") == std::string::npos)
    return fallback;
  return node.column;
}

// Writes next to the target and renames, so a failed write leaves nothing half done.
void write_file(const std::string& path, const std::string& text) {
  const std::string part = path + ".part";
  {
    std::ofstream f(part, std::ios::binary | std::ios::trunc);
    if (!f) {
      throw InputError(path, 0, 0, fmt::format("cannot write: {}", std::strerror(errno)));
    }
    f.write(text.data(), static_cast<std::streamsize>(text.size()));
    if (!f.flush()) {
      throw InputError(path, 0, 0, fmt::format("cannot write: {}", std::strerror(errno)));
    }
  }
  std::error_code ec;
  fs::rename(part, path, ec);
  if (ec) throw InputError(path, 0, 0, fmt::format("cannot write: {}", ec.message()));
}

int run_simulate(const SimulateArgs& a) {
  try {
    std::error_code ec;
    if (fs::exists(a.output, ec) && fs::equivalent(a.output, a.design, ec)) {
      throw InputError(a.output, 0, 0,
                       "is the design file; benchtau never writes to a file it reads");
    }
    if (fs::exists(a.output, ec) && !a.force) {
      throw InputError(a.output, 0, 0, "exists already; pass --force to overwrite it");
    }
    const Design design = read_design_file(a.design);
    const CyclePrediction p = predict_cycle(nominal_circuit(design));
    if (!p.oscillates) {
      fmt::print(stderr, "benchtau: {}: {}; nothing written\n", design.source, describe_stop(p));
      return kNothingFound;
    }
    SimulateRequest r;
    r.rate_Hz = eng_option(a.rate, "--rate", "Hz", "1M, 250k or 2.5 MS/s");
    r.seconds = eng_option(a.seconds, "--seconds", "s", "0.5, 20m or 250 ms");
    if (a.cycles > 0.0) r.cycles = a.cycles;
    r.trigger_every_s = eng_option(a.trigger_every, "--trigger-every", "s", "10m or 50 ms");
    r.full_scale_V = eng_option(a.full_scale, "--full-scale", "V", "10 or 5 V");
    r.noise_V = eng_option(a.noise, "--noise", "V", "5m or 0.01").value_or(0.0);
    r.bits = a.bits;
    r.seed = a.seed;
    r.power_up = a.power_up;
    const Simulation s = simulate_design(design, p, r);
    write_file(a.output, capture_csv(s.record.capture, {column_name(design.out, "out_V"),
                                                        column_name(design.cap, "cap_V"),
                                                        column_name(design.ctl, "ctl_V")}));
    fmt::print("{}: {} samples at {}, {} long", a.output, s.record.capture.samples(),
               format_eng(s.rate_Hz, "S/s"), format_eng(s.duration_s, "s"));
    if (s.trigger_every_s > 0.0) {
      fmt::print(", a trigger every {}", format_eng(s.trigger_every_s, "s"));
    }
    fmt::print("\n");
    return kMeasured;
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    return kInputError;
  }
}

}  // namespace

void add_simulate_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<SimulateArgs>();
  CLI::App* cmd = app.add_subcommand(
      "simulate",
      "write a synthetic capture of a design from its predicted cycle, for checking a bench "
      "setup or a script against known timing");
  cmd->add_option("--design", args->design, "design file (TOML; see README.md)")->required();
  cmd->add_option("-o,--output", args->output, "the CSV file to write")->required();
  cmd->add_option("--rate", args->rate,
                  "samples per second, e.g. 1M or 250k (default: 1000 a cycle, 200 a phase)");
  CLI::Option* seconds =
      cmd->add_option("--seconds", args->seconds, "record length, e.g. 0.5 or 20m");
  CLI::Option* cycles =
      cmd->add_option("--cycles", args->cycles, "record length in cycles (or triggers); default 10")
          ->check(CLI::PositiveNumber);
  seconds->excludes(cycles);
  cmd->add_option("--trigger-every", args->trigger_every,
                  "a monostable's trigger interval (default: twice its pulse and recovery)");
  cmd->add_option("--bits", args->bits, "ADC resolution over 0 to --full-scale (0: exact)")
      ->check(CLI::Range(0, 24));
  cmd->add_option("--full-scale", args->full_scale,
                  "ADC full scale in volts (default: the 1-2-5 step above the supply)");
  cmd->add_option("--noise", args->noise, "Gaussian noise in volts RMS, e.g. 5m");
  cmd->add_option("--seed", args->seed, "noise seed");
  cmd->add_flag("--power-up", args->power_up, "start from power-up, every node at 0 V");
  cmd->add_flag("--force", args->force, "overwrite the output file if it exists");
  cmd->callback([args, &exit_code] { exit_code = run_simulate(*args); });
}

}  // namespace benchtau::cli
