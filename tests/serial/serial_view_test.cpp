// benchtau tests: the live view, its one-line updates, the summary and the port table, as exact
// text.
#include <catch2/catch.hpp>

#include <cmath>
#include <csignal>

#include "src/cli/serial_view.h"

using namespace benchtau;
using namespace benchtau::cli;

namespace {

SessionStatus frames_status() {
  SessionStatus s;
  s.port = "/dev/ttyACM0";
  s.via = "/dev/ttyACM0 (libserialport)";
  s.connected = true;
  s.format = StreamFormat::frames;
  s.channels = 2;
  s.samples = 123456;
  s.gaps = 2;
  s.counters.frames.lost_frames = 3;
  s.counters.frames.crc_errors = 1;
  s.counters.frames.skipped_bytes = 40;
  s.first_t_s = 0.0;
  s.last_t_s = 12.3456;
  s.elapsed_s = 12.52;
  WindowReading r;
  r.samples = 20000;
  r.span_s = 2.0;
  r.cycles = 277;
  r.frequency_Hz = 138.75;
  r.duty = 0.54806;
  r.cap_min_V = 3.0012;
  r.cap_max_V = 5.9987;
  s.reading = r;
  return s;
}

}  // namespace

TEST_CASE("the live view's screen") {
  const auto lines = watch_screen(frames_status(), {"bench.csv", ""});
  CHECK(lines == std::vector<std::string>{
                     "benchtau watch /dev/ttyACM0: frames, 2 channels, 12.5 s",
                     "  frequency   139 Hz (period 7.21 ms)", "  duty        54.8 %",
                     "  cap swing   3.00 V to 6.00 V (3.00 V)",
                     "  window      277 cycles in 2.00 s", "  samples     123456, gaps 2",
                     "  errors      lost frames 3, CRC errors 1, skipped bytes 40, restarts 0",
                     "  link        /dev/ttyACM0 (libserialport), disconnects 0",
                     "  recording   bench.csv", "  Ctrl-C stops and closes the record."});
  CHECK(redraw({"a", "b"}) == "\x1b[Ha\x1b[K\nb\x1b[K\n\x1b[J");
}

TEST_CASE("the view while the board is away, and before a whole cycle") {
  SessionStatus s = frames_status();
  s.connected = false;
  s.disconnects = 1;
  s.reading->cycles = 0;
  s.reading->why = "the output never switches";
  const auto lines = watch_screen(s, {"", "/dev/ttyACM0: disconnected (end of file)"});
  CHECK(lines[1] == "  frequency   -");
  CHECK(lines[3] == "  cap swing   -");
  CHECK(lines[4] == "  window      0 cycles in 2.00 s; the output never switches");
  CHECK(lines[7] == "  link        disconnected, waiting for the port to come back, disconnects 1");
  CHECK(lines[8] == "  last event  /dev/ttyACM0: disconnected (end of file)");
}

TEST_CASE("one line per update when the output is not a terminal") {
  CHECK(watch_line(frames_status()) ==
        "12.5 s  f 139 Hz  duty 54.8 %  cap 3.00 V..6.00 V  samples 123456  gaps 2  lost 3 crc 1 "
        "skipped 40  link up\n");
  SessionStatus t;
  t.format = StreamFormat::text;
  t.counters.text.skipped_lines = 4;
  CHECK(watch_line(t) ==
        "0.0 s  f -  duty -  cap -  samples 0  gaps 0  skipped 4 restarts 0  link down\n");
}

TEST_CASE("the summary when a session ends") {
  CHECK(session_summary(frames_status(), {"bench.csv", ""}, SIGINT, true) ==
        "stopped by SIGINT after 12.5 s\n"
        "  samples     123456 on 2 channels, 12.3 s of signal, frames format\n"
        "  gaps        2 (disconnects 0)\n"
        "  errors      lost frames 3, CRC errors 1, skipped bytes 40, restarts 0\n"
        "  record      bench.csv, closed\n");
  SessionStatus s = frames_status();
  s.counters.frames.other_layout = 5;
  CHECK(
      session_summary(s, {}, 0, false)
          .find(
              "  errors      lost frames 3, CRC errors 1, skipped bytes 40, restarts 0, frames of "
              "another layout 5\n") != std::string::npos);
  s.over_range = 9;
  CHECK(session_summary(s, {}, 0, false)
            .find("  over range  9 counts above the ADC's full scale: check --bits\n") !=
        std::string::npos);
}

TEST_CASE("the port table") {
  CHECK(port_table({}) == "no serial ports found\n");
  std::vector<PortInfo> ports(2);
  ports[0].name = "/dev/ttyUSB0";
  ports[0].description = "Bench ADC board";
  ports[0].transport = "usb";
  ports[0].usb_vid = 0x1a2b;
  ports[0].usb_pid = 0x00c4;
  ports[0].serial = "BT0042";
  ports[1].name = "/dev/ttyS0";
  ports[1].transport = "native";
  CHECK(port_table(ports) ==
        "port          description      VID:PID    serial number\n"
        "/dev/ttyUSB0  Bench ADC board  1a2b:00c4  BT0042\n"
        "/dev/ttyS0    -                -          -\n");
}
