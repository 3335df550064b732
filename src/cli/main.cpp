// benchtau: the command-line entry point.
#include <fmt/format.h>

#include <cstdio>

#include "src/cli/commands.h"

int main(int argc, char** argv) {
  CLI::App app{
      "benchtau: a bench companion for 555-type timer circuits. It reads a capture of the\n"
      "timer's output, capacitor and control nodes, measures every cycle and, given the board's\n"
      "design, says which part is out of spec."};
  app.set_version_flag("--version", std::string("benchtau ") + BENCHTAU_VERSION);
  app.require_subcommand(1);
  app.footer(
      "Run `benchtau COMMAND --help` for a command's options, and `benchtau safety` for the\n"
      "bench cautions: mains-powered boards, charged capacitors and scope ground clips can hurt.");
  int exit_code = benchtau::cli::kMeasured;
  benchtau::cli::add_measure_command(app, exit_code);
  benchtau::cli::add_safety_command(app, exit_code);
  benchtau::cli::add_predict_command(app, exit_code);
  benchtau::cli::add_simulate_command(app, exit_code);
  benchtau::cli::add_ports_command(app, exit_code);
  benchtau::cli::add_watch_command(app, exit_code);
  benchtau::cli::add_capture_command(app, exit_code);
  benchtau::cli::add_fit_command(app, exit_code);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : benchtau::cli::kInputError;
  }
  return exit_code;
}
