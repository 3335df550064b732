// benchtau: a tty opened with open() and set up with termios: ptys, bridges, virtual ports.
#include <fcntl.h>
#include <fmt/format.h>
#include <sys/file.h>
#include <sys/ioctl.h>
#include <termios.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include "drivers/fd_reader.h"
#include "drivers/port_backends.h"
#include "drivers/unique_fd.h"

namespace benchtau {
namespace {

speed_t speed_of(int baud) {
  switch (baud) {
    case 1200:
      return B1200;
    case 2400:
      return B2400;
    case 4800:
      return B4800;
    case 9600:
      return B9600;
    case 19200:
      return B19200;
    case 38400:
      return B38400;
    case 57600:
      return B57600;
    case 115200:
      return B115200;
    case 230400:
      return B230400;
    case 460800:
      return B460800;
    case 500000:
      return B500000;
    case 576000:
      return B576000;
    case 921600:
      return B921600;
    case 1000000:
      return B1000000;
    case 1152000:
      return B1152000;
    case 1500000:
      return B1500000;
    case 2000000:
      return B2000000;
    case 2500000:
      return B2500000;
    case 3000000:
      return B3000000;
    case 3500000:
      return B3500000;
    case 4000000:
      return B4000000;
    default:
      return B0;
  }
}

[[noreturn]] void settings_error(const std::string& path, const std::string& what) {
  throw PortError(path, PortProblem::settings, what);
}

class TermiosPort final : public ByteSource {
 public:
  TermiosPort(std::string path, UniqueFd fd, const termios& saved)
      : path_(std::move(path)), fd_(std::move(fd)), saved_(saved) {}
  TermiosPort(const TermiosPort&) = delete;
  TermiosPort& operator=(const TermiosPort&) = delete;
  ~TermiosPort() override {
    // Leave the tty as it was found; a vanished device simply refuses.
    ::tcsetattr(fd_.get(), TCSANOW, &saved_);
    ::ioctl(fd_.get(), TIOCNXCL);
  }

  ReadResult read(std::span<std::uint8_t> buffer, int timeout_ms) override {
    return read_fd(fd_.get(), buffer, timeout_ms);
  }
  std::string description() const override { return path_ + " (termios)"; }

 private:
  std::string path_;
  UniqueFd fd_;
  termios saved_;
};

void apply(int fd, const std::string& path, const PortSettings& s, termios& t) {
  ::cfmakeraw(&t);
  t.c_cflag |= CLOCAL | CREAD;
  t.c_cflag &= ~static_cast<tcflag_t>(CSIZE | PARENB | PARODD | CMSPAR | CSTOPB | CRTSCTS);
  t.c_iflag &= ~static_cast<tcflag_t>(IXON | IXOFF | IXANY | INPCK);
  switch (s.data_bits) {
    case 5:
      t.c_cflag |= CS5;
      break;
    case 6:
      t.c_cflag |= CS6;
      break;
    case 7:
      t.c_cflag |= CS7;
      break;
    case 8:
      t.c_cflag |= CS8;
      break;
    default:
      settings_error(path, fmt::format("{} data bits: use 5, 6, 7 or 8", s.data_bits));
  }
  switch (s.parity) {
    case Parity::none:
      break;
    case Parity::odd:
      t.c_cflag |= PARENB | PARODD;
      break;
    case Parity::even:
      t.c_cflag |= PARENB;
      break;
    case Parity::mark:
      t.c_cflag |= PARENB | CMSPAR | PARODD;
      break;
    case Parity::space:
      t.c_cflag |= PARENB | CMSPAR;
      break;
  }
  if (s.parity != Parity::none) t.c_iflag |= INPCK;
  if (s.stop_bits == 2) {
    t.c_cflag |= CSTOPB;
  } else if (s.stop_bits != 1) {
    settings_error(path, fmt::format("{} stop bits: use 1 or 2", s.stop_bits));
  }
  switch (s.flow) {
    case FlowControl::none:
      break;
    case FlowControl::rtscts:
      t.c_cflag |= CRTSCTS;
      break;
    case FlowControl::xonxoff:
      t.c_iflag |= IXON | IXOFF;
      break;
    case FlowControl::dtrdsr:
      settings_error(path, "DTR/DSR flow control is not available through termios on this port");
  }
  // Reads are driven by poll(); read() returns what is there.
  t.c_cc[VMIN] = 0;
  t.c_cc[VTIME] = 0;
  const speed_t speed = speed_of(s.baud);
  if (speed == B0) {
    settings_error(path, fmt::format("{} baud is not a rate termios offers; use a standard rate "
                                     "such as 115200 or 1000000",
                                     s.baud));
  }
  ::cfsetispeed(&t, speed);
  ::cfsetospeed(&t, speed);
  if (::tcsetattr(fd, TCSANOW, &t) != 0) {
    settings_error(path, fmt::format("the port refused its settings: {}", std::strerror(errno)));
  }
}

}  // namespace

void lock_port(int fd, const std::string& path) {
  if (::flock(fd, LOCK_EX | LOCK_NB) != 0) throw port_open_error(path, errno);
  // Also keep out programs that do not take the lock (root is not kept out).
  ::ioctl(fd, TIOCEXCL);
}

std::unique_ptr<ByteSource> open_termios_port(const std::string& path,
                                              const PortSettings& settings) {
  // O_NONBLOCK: do not wait for a carrier on open; reads go through poll().
  UniqueFd fd(::open(path.c_str(), O_RDWR | O_NOCTTY | O_NONBLOCK | O_CLOEXEC));
  if (!fd) throw port_open_error(path, errno);
  if (!::isatty(fd.get())) throw port_open_error(path, ENOTTY);
  lock_port(fd.get(), path);
  termios saved{};
  if (::tcgetattr(fd.get(), &saved) != 0) throw port_open_error(path, errno);
  termios t = saved;
  try {
    apply(fd.get(), path, settings, t);
  } catch (...) {
    ::ioctl(fd.get(), TIOCNXCL);
    throw;
  }
  return std::make_unique<TermiosPort>(path, std::move(fd), saved);
}

}  // namespace benchtau
