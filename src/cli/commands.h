// benchtau: the subcommands, each registered on the top-level app.
#pragma once

#include <CLI/CLI.hpp>

namespace benchtau::cli {

// Exit codes shared by every command.
enum Exit : int {
  kMeasured = 0,      // the job was done
  kNothingFound = 1,  // the input read fine but held nothing to measure (see the findings)
  kInputError = 2,    // a file or an option could not be used
  kInconclusive = 3,  // fit: the captures read fine but cannot settle the verdict
};

// Each adds its subcommand; when it runs, it stores its exit code in exit_code.
void add_measure_command(CLI::App& app, int& exit_code);
void add_safety_command(CLI::App& app, int& exit_code);
void add_predict_command(CLI::App& app, int& exit_code);
void add_simulate_command(CLI::App& app, int& exit_code);
void add_ports_command(CLI::App& app, int& exit_code);
void add_watch_command(CLI::App& app, int& exit_code);
void add_capture_command(CLI::App& app, int& exit_code);
void add_fit_command(CLI::App& app, int& exit_code);

// The bench cautions, shared by `benchtau safety` and the help text.
extern const char* const kSafetyText;

}  // namespace benchtau::cli
