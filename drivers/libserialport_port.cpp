// benchtau: a port opened and set up through libserialport, read through its descriptor.
#include <fcntl.h>
#include <fmt/format.h>
#include <libserialport.h>
#include <sys/ioctl.h>

#include <cerrno>
#include <memory>

#include "drivers/fd_reader.h"
#include "drivers/port_backends.h"

namespace benchtau {
namespace {

struct PortDeleter {
  void operator()(sp_port* p) const {
    sp_close(p);  // harmless on a port that is not open
    sp_free_port(p);
  }
};
using PortPtr = std::unique_ptr<sp_port, PortDeleter>;

std::string last_error() {
  char* m = sp_last_error_message();
  std::string s = m ? m : "unknown error";
  sp_free_error_message(m);
  return s;
}

class LibSerialPort final : public ByteSource {
 public:
  LibSerialPort(std::string path, PortPtr port, int fd)
      : path_(std::move(path)), port_(std::move(port)), fd_(fd) {}
  LibSerialPort(const LibSerialPort&) = delete;
  LibSerialPort& operator=(const LibSerialPort&) = delete;
  ~LibSerialPort() override { ::ioctl(fd_, TIOCNXCL); }

  ReadResult read(std::span<std::uint8_t> buffer, int timeout_ms) override {
    return read_fd(fd_, buffer, timeout_ms);
  }
  std::string description() const override { return path_ + " (libserialport)"; }

 private:
  std::string path_;
  PortPtr port_;  // owns the descriptor
  int fd_;
};

sp_parity parity_of(Parity p) {
  switch (p) {
    case Parity::odd:
      return SP_PARITY_ODD;
    case Parity::even:
      return SP_PARITY_EVEN;
    case Parity::mark:
      return SP_PARITY_MARK;
    case Parity::space:
      return SP_PARITY_SPACE;
    case Parity::none:
      break;
  }
  return SP_PARITY_NONE;
}

sp_flowcontrol flow_of(FlowControl f) {
  switch (f) {
    case FlowControl::xonxoff:
      return SP_FLOWCONTROL_XONXOFF;
    case FlowControl::rtscts:
      return SP_FLOWCONTROL_RTSCTS;
    case FlowControl::dtrdsr:
      return SP_FLOWCONTROL_DTRDSR;
    case FlowControl::none:
      break;
  }
  return SP_FLOWCONTROL_NONE;
}

void check(sp_return r, const std::string& path, const char* what) {
  if (r != SP_OK) {
    throw PortError(path, PortProblem::settings,
                    fmt::format("the port refused its {}: {}", what, last_error()));
  }
}

}  // namespace

std::unique_ptr<ByteSource> open_libserialport_port(const std::string& path,
                                                    const PortSettings& s) {
  sp_port* raw = nullptr;
  if (sp_get_port_by_name(path.c_str(), &raw) != SP_OK) return nullptr;
  PortPtr port(raw);
  if (sp_open(port.get(), SP_MODE_READ_WRITE) != SP_OK) {
    const int e = sp_last_error_code();
    if (e == ENOENT || e == ENODEV || e == ENXIO || e == EBUSY || e == EACCES || e == EPERM) {
      throw port_open_error(path, e);
    }
    return nullptr;  // termios may still manage (a pty, a bridge)
  }
  check(sp_set_baudrate(port.get(), s.baud), path, "baud rate");
  check(sp_set_bits(port.get(), s.data_bits), path, "data bits");
  check(sp_set_parity(port.get(), parity_of(s.parity)), path, "parity");
  check(sp_set_stopbits(port.get(), s.stop_bits), path, "stop bits");
  check(sp_set_flowcontrol(port.get(), flow_of(s.flow)), path, "flow control");
  int fd = -1;
  if (sp_get_port_handle(port.get(), &fd) != SP_OK || fd < 0) return nullptr;
  lock_port(fd, path);
  // Reads go through poll(); a read must never block.
  ::fcntl(fd, F_SETFL, ::fcntl(fd, F_GETFL) | O_NONBLOCK);
  return std::make_unique<LibSerialPort>(path, std::move(port), fd);
}

}  // namespace benchtau
