// benchtau tests: opening ports: ptys through termios, and the errors people meet, as exact text.
#include <pthread.h>
#include <signal.h>
#include <catch2/catch.hpp>

#include <atomic>
#include <thread>

#include "drivers/fd_reader.h"
#include "drivers/serial_port.h"
#include "serial_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

std::string open_error(const std::string& path, const PortSettings& s = {},
                       PortProblem* problem = nullptr) {
  try {
    open_port(path, s);
  } catch (const PortError& e) {
    if (problem) *problem = e.problem();
    return e.what();
  }
  return "no error";
}

extern "C" void ignore_signal(int) {}

}  // namespace

TEST_CASE("a port that does not exist says so and points at `benchtau ports`") {
  PortProblem p{};
  CHECK(open_error("/dev/ttyBENCHTAU-NONE", {}, &p) ==
        "/dev/ttyBENCHTAU-NONE: no such port (is the board plugged in? \"benchtau ports\" lists "
        "the serial ports found)");
  CHECK(p == PortProblem::missing);
}

TEST_CASE("paths that are not terminals are refused by name") {
  PortProblem p{};
  CHECK(open_error("/dev/null", {}, &p) ==
        "/dev/null: not a serial port: it is not a terminal device");
  CHECK(p == PortProblem::not_a_port);
  const fs::path file = scratch("not-a-port.csv");
  std::ofstream(file) << "t_s,ch1_V\n";
  CHECK(open_error(file.string()) == file.string() + ": not a serial port: it is a regular file");
  CHECK(open_error("/tmp") == "/tmp: not a serial port: it is a directory");
}

TEST_CASE("permission problems carry the usual fix") {
  // Tests may run as root, where a permission problem cannot be made; the
  // message for EACCES is checked directly.
  const PortError e = port_open_error("/dev/ttyUSB0", EACCES);
  CHECK(e.problem() == PortProblem::permission);
  CHECK(std::string(e.what()) ==
        "/dev/ttyUSB0: permission denied; add your user to the dialout group (sudo usermod -aG "
        "dialout $USER), then log out and in again");
  CHECK(port_open_error("/dev/ttyUSB0", EBUSY).problem() == PortProblem::busy);
}

TEST_CASE("a pty opens through termios, since libserialport does not know it") {
  PtyPair pty;
  const auto port = open_port(pty.slave_path, {});
  CHECK(port->description() == pty.slave_path + " (termios)");
  pty.write(std::string("12,34\n"));
  std::array<std::uint8_t, 64> buf{};
  std::string got;
  REQUIRE(wait_for([&] {
    const ReadResult r = port->read(buf, 100);
    if (r.status == ReadStatus::data)
      got.append(buf.begin(), buf.begin() + static_cast<long>(r.bytes));
    return got.size() >= 6;
  }));
  CHECK(got == "12,34\n");
  // Nothing more: a timeout, not an error.
  CHECK(port->read(buf, 20).status == ReadStatus::timeout);
}

TEST_CASE("a port already open in benchtau is busy, and free again once closed") {
  PtyPair pty;
  {
    const auto first = open_port(pty.slave_path, {});
    PortProblem p{};
    CHECK(open_error(pty.slave_path, {}, &p) ==
          pty.slave_path + ": the port is in use by another program; close it there");
    CHECK(p == PortProblem::busy);
  }
  CHECK_NOTHROW(open_port(pty.slave_path, {}));
}

TEST_CASE("settings termios cannot give are refused with the reason") {
  PtyPair pty;
  PortSettings s;
  s.baud = 123456;
  CHECK(open_error(pty.slave_path, s) ==
        pty.slave_path +
            ": 123456 baud is not a rate termios offers; use a standard rate such as 115200 or "
            "1000000");
  s = {};
  s.flow = FlowControl::dtrdsr;
  CHECK(open_error(pty.slave_path, s) ==
        pty.slave_path + ": DTR/DSR flow control is not available through termios on this port");
  // A refused open leaves the port free.
  CHECK_NOTHROW(open_port(pty.slave_path, {}));
}

TEST_CASE("every framing termios offers is accepted on a pty") {
  PtyPair pty;
  for (const int bits : {5, 6, 7, 8}) {
    for (const Parity parity :
         {Parity::none, Parity::odd, Parity::even, Parity::mark, Parity::space}) {
      PortSettings s;
      s.baud = 1000000;
      s.data_bits = bits;
      s.parity = parity;
      s.stop_bits = bits == 8 ? 2 : 1;
      s.flow = parity == Parity::odd ? FlowControl::xonxoff : FlowControl::rtscts;
      CHECK_NOTHROW(open_tty(pty.slave_path, s));
    }
  }
}

TEST_CASE("unplugging: closing the far end reads as closed, after the bytes already sent") {
  PtyPair pty;
  const auto port = open_port(pty.slave_path, {});
  pty.write(std::string("1,2\n"));
  std::array<std::uint8_t, 64> buf{};
  REQUIRE(wait_for([&] { return port->read(buf, 100).status == ReadStatus::data; }));
  pty.close_master();
  ReadResult r;
  REQUIRE(wait_for([&] {
    r = port->read(buf, 100);
    return r.status == ReadStatus::closed;
  }));
  // Linux reads a hung-up pty as the end of file or as EIO, depending on
  // when the read lands after the close (a USB adapter pulled out gives EIO):
  // one wording for both.
  CHECK(r.detail == "the port hung up");
}

TEST_CASE("a signal during a read is reported as interrupted, at once") {
  struct sigaction sa {
  }, old{};
  sa.sa_handler = ignore_signal;
  sigemptyset(&sa.sa_mask);
  sa.sa_flags = 0;  // no SA_RESTART, as StopSignals installs them
  REQUIRE(sigaction(SIGUSR1, &sa, &old) == 0);
  PtyPair pty;
  std::atomic<bool> started{false};
  ReadResult r;
  std::thread reader([&] {
    std::array<std::uint8_t, 16> buf{};
    started = true;
    r = read_fd(pty.slave.get(), buf, 10000);
  });
  REQUIRE(wait_for([&] { return started.load(); }));
  // The thread may not be in poll() yet; keep knocking until it is out.
  const auto native = reader.native_handle();
  for (int i = 0; i < 500 && r.status == ReadStatus::timeout; ++i) {
    pthread_kill(native, SIGUSR1);
    std::this_thread::sleep_for(std::chrono::milliseconds(10));
    if (r.status != ReadStatus::timeout) break;
  }
  reader.join();
  sigaction(SIGUSR1, &old, nullptr);
  CHECK(r.status == ReadStatus::interrupted);
}
