// benchtau: opening a port: checks on the path, then libserialport, then termios.
#include "drivers/serial_port.h"

#include <fmt/format.h>
#include <sys/stat.h>

#include <cerrno>
#include <cstring>

#include "drivers/port_backends.h"

namespace benchtau {

PortError port_open_error(const std::string& path, int error_number) {
  switch (error_number) {
    case ENOENT:
    case ENOTDIR:
    case ENODEV:
    case ENXIO:
      return {path, PortProblem::missing,
              "no such port (is the board plugged in? \"benchtau ports\" lists the serial ports "
              "found)"};
    case EBUSY:
    case EWOULDBLOCK:
      return {path, PortProblem::busy, "the port is in use by another program; close it there"};
    case EACCES:
    case EPERM:
      return {path, PortProblem::permission,
              "permission denied; add your user to the dialout group (sudo usermod -aG dialout "
              "$USER), then log out and in again"};
    case ENOTTY:
      return {path, PortProblem::not_a_port, "not a serial port: it is not a terminal device"};
    case EISDIR:
      return {path, PortProblem::not_a_port, "not a serial port: it is a directory"};
    default:
      return {path, PortProblem::other,
              fmt::format("cannot open: {}", std::strerror(error_number))};
  }
}

namespace {

// What the path is, before any library is handed it.
void check_path(const std::string& path) {
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) throw port_open_error(path, errno);
  if (S_ISREG(st.st_mode)) {
    throw PortError(path, PortProblem::not_a_port, "not a serial port: it is a regular file");
  }
  if (S_ISDIR(st.st_mode)) throw port_open_error(path, EISDIR);
  if (!S_ISCHR(st.st_mode)) throw port_open_error(path, ENOTTY);
}

}  // namespace

std::unique_ptr<ByteSource> open_tty(const std::string& path, const PortSettings& settings) {
  check_path(path);
  return open_termios_port(path, settings);
}

std::unique_ptr<ByteSource> open_port(const std::string& path, const PortSettings& settings) {
  check_path(path);
  if (auto port = open_libserialport_port(path, settings)) return port;
  return open_termios_port(path, settings);
}

}  // namespace benchtau
