// benchtau: the live view's text.
#include "src/cli/serial_view.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <csignal>
#include <cstring>

#include "src/core/engineering.h"

namespace benchtau::cli {
namespace {

std::string frequency_text(const WindowReading& r) {
  if (r.cycles == 0) return "-";
  return fmt::format("{} (period {})", format_eng(r.frequency_Hz, "Hz"),
                     format_eng(1.0 / r.frequency_Hz, "s"));
}

std::string swing_text(const WindowReading& r) {
  if (r.cycles == 0 || std::isnan(r.cap_min_V)) return "-";
  return fmt::format("{} to {} ({})", format_eng(r.cap_min_V, "V"), format_eng(r.cap_max_V, "V"),
                     format_eng(r.cap_max_V - r.cap_min_V, "V"));
}

std::string link_text(const SessionStatus& s) {
  if (s.connected) return fmt::format("{}", s.via);
  return "disconnected, waiting for the port to come back";
}

std::string counters_text(const SessionStatus& s) {
  const StreamCounters& c = s.counters;
  if (s.format == StreamFormat::frames) {
    return fmt::format(
        "lost frames {}, CRC errors {}, skipped bytes {}, restarts {}{}", c.frames.lost_frames,
        c.frames.crc_errors, c.frames.skipped_bytes, c.frames.restarts,
        c.frames.other_layout ? fmt::format(", frames of another layout {}", c.frames.other_layout)
                              : "");
  }
  return fmt::format("skipped lines {}, restarts {}, time gaps {}", c.text.skipped_lines,
                     c.text.restarts, c.text.time_gaps);
}

const char* signal_name(int sig) {
  switch (sig) {
    case SIGINT:
      return "SIGINT";
    case SIGTERM:
      return "SIGTERM";
    case SIGHUP:
      return "SIGHUP";
    default:
      return "a signal";
  }
}

}  // namespace

std::vector<std::string> watch_screen(const SessionStatus& s, const ViewContext& c) {
  std::vector<std::string> lines;
  lines.push_back(fmt::format("benchtau watch {}: {}, {} channel{}, {:.1f} s", s.port,
                              format_name(s.format), s.channels, s.channels == 1 ? "" : "s",
                              s.elapsed_s));
  const WindowReading r = s.reading.value_or(WindowReading{});
  lines.push_back(fmt::format("  frequency   {}", frequency_text(r)));
  lines.push_back(fmt::format("  duty        {}", r.cycles ? format_percent(r.duty) : "-"));
  lines.push_back(fmt::format("  cap swing   {}", swing_text(r)));
  lines.push_back(fmt::format("  window      {} cycles in {}{}", r.cycles,
                              format_eng(r.span_s, "s"), r.why.empty() ? "" : "; " + r.why));
  lines.push_back(fmt::format("  samples     {}, gaps {}{}", s.samples, s.gaps,
                              s.over_range ? fmt::format(", over range {}", s.over_range) : ""));
  lines.push_back(fmt::format("  errors      {}", counters_text(s)));
  lines.push_back(fmt::format("  link        {}, disconnects {}", link_text(s), s.disconnects));
  if (!c.record.empty()) lines.push_back(fmt::format("  recording   {}", c.record));
  if (!c.last_event.empty()) lines.push_back(fmt::format("  last event  {}", c.last_event));
  lines.insert(lines.end(), c.fit_lines.begin(), c.fit_lines.end());
  lines.push_back("  Ctrl-C stops and closes the record.");
  return lines;
}

std::string redraw(const std::vector<std::string>& lines) {
  std::string out = "\x1b[H";
  for (const std::string& l : lines) out += l + "\x1b[K\n";
  out += "\x1b[J";
  return out;
}

std::string watch_line(const SessionStatus& s, const ViewContext& view) {
  const WindowReading r = s.reading.value_or(WindowReading{});
  const StreamCounters& c = s.counters;
  std::string errors =
      s.format == StreamFormat::frames
          ? fmt::format("lost {} crc {} skipped {}", c.frames.lost_frames, c.frames.crc_errors,
                        c.frames.skipped_bytes)
          : fmt::format("skipped {} restarts {}", c.text.skipped_lines, c.text.restarts);
  // Under --design, the fit's verdict line closes each update.
  std::string fit;
  for (const std::string& l : view.fit_lines) {
    if (l.find("verdict") != std::string::npos) fit = "  " + l.substr(l.find_first_not_of(' '));
  }
  return fmt::format(
      "{:.1f} s  f {}  duty {}  cap {}  samples {}  gaps {}  {}  link {}{}\n", s.elapsed_s,
      r.cycles ? format_eng(r.frequency_Hz, "Hz") : "-", r.cycles ? format_percent(r.duty) : "-",
      r.cycles && !std::isnan(r.cap_min_V)
          ? fmt::format("{}..{}", format_eng(r.cap_min_V, "V"), format_eng(r.cap_max_V, "V"))
          : "-",
      s.samples, s.gaps, errors, s.connected ? "up" : "down", fit);
}

std::string session_summary(const SessionStatus& s, const ViewContext& c, int stop_signal,
                            bool record_closed) {
  std::string out;
  if (stop_signal) {
    out += fmt::format("stopped by {} after {:.1f} s\n", signal_name(stop_signal), s.elapsed_s);
  } else {
    out += fmt::format("done after {:.1f} s\n", s.elapsed_s);
  }
  const double signal_s = s.samples ? s.last_t_s - s.first_t_s : 0.0;
  out += fmt::format("  samples     {} on {} channel{}, {} of signal, {} format\n", s.samples,
                     s.channels, s.channels == 1 ? "" : "s", format_eng(signal_s, "s"),
                     format_name(s.format));
  out += fmt::format("  gaps        {} (disconnects {})\n", s.gaps, s.disconnects);
  out += fmt::format("  errors      {}\n", counters_text(s));
  if (s.over_range) {
    out += fmt::format("  over range  {} counts above the ADC's full scale: check --bits\n",
                       s.over_range);
  }
  if (!c.record.empty()) {
    out += fmt::format("  record      {}{}\n", c.record, record_closed ? ", closed" : "");
  }
  return out;
}

std::string port_table(std::span<const PortInfo> ports) {
  if (ports.empty()) return "no serial ports found\n";
  struct Row {
    std::string name, description, id, serial;
  };
  std::vector<Row> rows{{"port", "description", "VID:PID", "serial number"}};
  for (const PortInfo& p : ports) {
    Row r{p.name, p.description.empty() ? "-" : p.description, "-",
          p.serial.empty() ? "-" : p.serial};
    if (p.usb_vid && p.usb_pid) r.id = fmt::format("{:04x}:{:04x}", *p.usb_vid, *p.usb_pid);
    rows.push_back(std::move(r));
  }
  std::size_t w0 = 0, w1 = 0, w2 = 0;
  for (const Row& r : rows) {
    w0 = std::max(w0, r.name.size());
    w1 = std::max(w1, r.description.size());
    w2 = std::max(w2, r.id.size());
  }
  std::string out;
  for (const Row& r : rows) {
    out += fmt::format("{:<{}}  {:<{}}  {:<{}}  {}\n", r.name, w0, r.description, w1, r.id, w2,
                       r.serial);
  }
  return out;
}

}  // namespace benchtau::cli
