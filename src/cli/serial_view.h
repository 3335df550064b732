// benchtau: the text of the live view, the one-line updates, the final summary and the port
// table; pure functions of the session's status, so tests can check them as exact text.
#pragma once

#include <span>
#include <string>
#include <vector>

#include "drivers/live_session.h"
#include "drivers/port_list.h"

namespace benchtau::cli {

struct ViewContext {
  std::string record;                       // the record's path, "" when not recording
  std::string last_event;                   // the latest disconnect or reconnect message
  std::vector<std::string> fit_lines = {};  // watch --design: the latest fit of the window
};

// The live view's lines, for a terminal.
std::vector<std::string> watch_screen(const SessionStatus& s, const ViewContext& c);
// Redraws lines in place: cursor home, each line cleared to its end, the rest
// of the screen cleared below.
std::string redraw(const std::vector<std::string>& lines);
// One line per update, for a pipe or a file (with the fit's verdict, under --design).
std::string watch_line(const SessionStatus& s, const ViewContext& c = {});
// The summary printed when a session ends. stop_signal: what stopped it, 0 if
// the duration ended it.
std::string session_summary(const SessionStatus& s, const ViewContext& c, int stop_signal,
                            bool record_closed);
// `benchtau ports`.
std::string port_table(std::span<const PortInfo> ports);

}  // namespace benchtau::cli
