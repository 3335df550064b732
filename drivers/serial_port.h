// benchtau: opening a serial port by name: real ports through libserialport, and ptys and other
// ttys it refuses through termios; with clear errors for the usual ways it goes wrong.
#pragma once

#include <memory>
#include <string>

#include "drivers/byte_source.h"
#include "src/core/input_error.h"

namespace benchtau {

enum class Parity { none, odd, even, mark, space };
enum class FlowControl { none, xonxoff, rtscts, dtrdsr };

struct PortSettings {
  int baud = 115200;
  int data_bits = 8;  // 5 to 8
  Parity parity = Parity::none;
  int stop_bits = 1;  // 1 or 2
  FlowControl flow = FlowControl::none;
};

// Why a port could not be opened; the reconnect loop waits on some of these.
enum class PortProblem {
  missing,     // no such device (not plugged in, or a wrong name)
  busy,        // another program has it open
  permission,  // the user may not open it
  not_a_port,  // a regular file, a directory, or a device that is not a terminal
  settings,    // the port refused the baud rate, framing or flow control
  other,
};

class PortError : public InputError {
 public:
  PortError(std::string port, PortProblem problem, std::string message)
      : InputError(std::move(port), 0, 0, std::move(message)), problem_(problem) {}
  PortProblem problem() const { return problem_; }

 private:
  PortProblem problem_;
};

// The error for an errno from opening path (ENOENT, EBUSY, EACCES...).
PortError port_open_error(const std::string& path, int error_number);

// Opens path for reading, exclusively (a second benchtau on the same port is
// told it is busy). Tries libserialport first; when it cannot open the path
// (libserialport 0.1.1 does not find ptys in sysfs), falls back to termios.
// Throws PortError.
std::unique_ptr<ByteSource> open_port(const std::string& path, const PortSettings& settings);

// The termios path alone, for ptys, bridges and ttys libserialport does not know.
std::unique_ptr<ByteSource> open_tty(const std::string& path, const PortSettings& settings);

}  // namespace benchtau
