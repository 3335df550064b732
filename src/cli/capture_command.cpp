// benchtau: `benchtau capture`, a plain recording from a serial port to a CSV capture.
#include <fmt/format.h>

#include <cstdio>
#include <memory>
#include <optional>

#include "drivers/live_session.h"
#include "drivers/record_writer.h"
#include "drivers/stop_signals.h"
#include "src/cli/commands.h"
#include "src/cli/serial_options.h"
#include "src/cli/serial_view.h"
#include "src/core/input_error.h"

namespace benchtau::cli {
namespace {

struct CaptureArgs {
  SerialArgs serial;
  std::string output;
  double seconds = 0.0;  // 0: until stopped
  bool force = false;
};

int run_capture(const CaptureArgs& a) {
  const StopSignals signals;
  std::optional<RecordWriter> record;
  std::optional<LiveSession> session;
  try {
    SessionOptions options = session_options(a.serial);
    if (a.seconds > 0.0) options.duration_s = a.seconds;
    const PortSettings settings = port_settings(a.serial);
    session.emplace(std::move(options),
                    [settings](const std::string& p) { return open_port(p, settings); });
    session->open();
    record.emplace(a.output, a.force);
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    return kInputError;
  }
  session->set_record(&*record);
  session->on_event([](const std::string& m) { fmt::print(stderr, "benchtau: {}\n", m); });
  fmt::print(stderr, "benchtau: recording {} to {}; Ctrl-C stops\n", a.serial.port, a.output);

  int code = kMeasured;
  try {
    session->run(signals.flag());
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    code = kInputError;
  }
  bool closed = false;
  try {
    record->close();
    closed = true;
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    code = kInputError;
  }
  const std::string text =
      session_summary(session->status(), ViewContext{a.output, {}, {}}, signals.signal(), closed);
  std::fwrite(text.data(), 1, text.size(), stdout);
  return code;
}

}  // namespace

void add_capture_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<CaptureArgs>();
  CLI::App* cmd = app.add_subcommand(
      "capture", "record a board on a serial port to a CSV capture, without the live view");
  add_serial_options(*cmd, args->serial);
  cmd->add_option("-o,--output", args->output,
                  "the CSV capture to write (never replaces a file unless --force)")
      ->required();
  cmd->add_option("--seconds", args->seconds,
                  "stop after this many seconds of signal (default: until Ctrl-C)")
      ->check(CLI::PositiveNumber);
  cmd->add_flag("--force", args->force, "replace the output file if it exists");
  cmd->callback([args, &exit_code] { exit_code = run_capture(*args); });
}

}  // namespace benchtau::cli
