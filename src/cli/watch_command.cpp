// benchtau: `benchtau watch`, the live bench view, recording every sample if asked.
#include <fmt/format.h>
#include <unistd.h>

#include <cstdio>
#include <memory>
#include <optional>

#include "drivers/live_session.h"
#include "drivers/live_window.h"
#include "drivers/record_writer.h"
#include "drivers/stop_signals.h"
#include "src/cli/commands.h"
#include "src/cli/serial_options.h"
#include "src/cli/serial_view.h"
#include "src/cli/watch_fit.h"
#include "src/core/design_file.h"
#include "src/core/input_error.h"

namespace benchtau::cli {
namespace {

struct WatchArgs {
  SerialArgs serial;
  std::string record;
  bool force = false;
  double window_s = 2.0;
  NodeRequest nodes;
  std::string design;
};

void put(const std::string& text) {
  std::fwrite(text.data(), 1, text.size(), stdout);
  std::fflush(stdout);
}

int run_watch(const WatchArgs& a) {
  const StopSignals signals;
  std::optional<RecordWriter> record;
  ViewContext view{a.record, {}, {}};
  const bool tty = ::isatty(STDOUT_FILENO) == 1;
  std::optional<LiveSession> session;
  std::optional<LiveFit> live_fit;
  try {
    if (!a.design.empty()) live_fit.emplace(read_design_file(a.design), a.nodes);
    const PortSettings settings = port_settings(a.serial);
    session.emplace(session_options(a.serial),
                    [settings](const std::string& p) { return open_port(p, settings); });
    session->open();
    if (!a.record.empty()) record.emplace(a.record, a.force);
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    return kInputError;
  }
  LiveWindow window(a.window_s, a.nodes);
  session->set_window(&window);
  if (record) session->set_record(&*record);
  // Both callbacks run one at a time (the session serialises them).
  session->on_status([&](const SessionStatus& s) {
    // The fit runs here, on the view's own thread, about once a second.
    if (live_fit) {
      live_fit->update(window.capture(), s.elapsed_s);
      view.fit_lines = live_fit->lines();
    }
    put(tty ? redraw(watch_screen(s, view)) : watch_line(s, view));
  });
  session->on_event([&](const std::string& m) {
    view.last_event = m;
    if (!tty) fmt::print(stderr, "benchtau: {}\n", m);
  });
  if (tty) put("\x1b[2J");

  int code = kMeasured;
  try {
    session->run(signals.flag());
  } catch (const InputError& e) {
    fmt::print(stderr, "benchtau: {}\n", e.what());
    code = kInputError;
  }
  bool closed = false;
  if (record) {
    try {
      record->close();
      closed = true;
    } catch (const InputError& e) {
      fmt::print(stderr, "benchtau: {}\n", e.what());
      code = kInputError;
    }
  }
  put(session_summary(session->status(), view, signals.signal(), closed));
  return code;
}

}  // namespace

void add_watch_command(CLI::App& app, int& exit_code) {
  auto args = std::make_shared<WatchArgs>();
  CLI::App* cmd = app.add_subcommand(
      "watch",
      "live view of a board on a serial port: frequency, duty and capacitor swing over the last "
      "seconds, with lost-frame and error counts; --record keeps every sample");
  add_serial_options(*cmd, args->serial);
  cmd->add_option("--record", args->record,
                  "write every sample to this CSV capture as it arrives (never replaces a file "
                  "unless --force)");
  cmd->add_flag("--force", args->force, "replace the --record file if it exists");
  cmd->add_option("--window", args->window_s,
                  "seconds of samples the view measures (at most the newest 131072 samples)")
      ->capture_default_str()
      ->check(CLI::Range(0.01, 3600.0));
  cmd->add_option("--out", args->nodes.out, "output-pin channel: ch1, ch2... (default: guessed)");
  cmd->add_option("--cap", args->nodes.cap, "capacitor-node channel");
  cmd->add_option("--ctl", args->nodes.ctl, "control-pin channel");
  cmd->add_option("--design", args->design,
                  "design file (TOML): fit the window to it about once a second and show each "
                  "part's value, sigma and out-of-spec mark");
  cmd->callback([args, &exit_code] { exit_code = run_watch(*args); });
}

}  // namespace benchtau::cli
