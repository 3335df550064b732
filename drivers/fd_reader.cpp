// benchtau: one read with a timeout from a descriptor.
#include "drivers/fd_reader.h"

#include <poll.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

namespace benchtau {

ReadResult read_fd(int fd, std::span<std::uint8_t> buffer, int timeout_ms) {
  pollfd p{fd, POLLIN, 0};
  const int ready = ::poll(&p, 1, timeout_ms);
  if (ready < 0) {
    if (errno == EINTR) return {ReadStatus::interrupted, 0, {}};
    return {ReadStatus::closed, 0, std::strerror(errno)};
  }
  if (ready == 0) return {ReadStatus::timeout, 0, {}};
  if (p.revents & POLLNVAL) return {ReadStatus::closed, 0, "the port was closed"};
  // POLLHUP and POLLERR fall through: read() tells whether bytes remain.
  const ssize_t n = ::read(fd, buffer.data(), buffer.size());
  if (n > 0) return {ReadStatus::data, static_cast<std::size_t>(n), {}};
  if (n == 0) return {ReadStatus::closed, 0, "the port hung up"};
  if (errno == EINTR) return {ReadStatus::interrupted, 0, {}};
  if (errno == EAGAIN || errno == EWOULDBLOCK) return {ReadStatus::timeout, 0, {}};
  if (errno == EIO) return {ReadStatus::closed, 0, "the port hung up"};
  return {ReadStatus::closed, 0, std::strerror(errno)};
}

}  // namespace benchtau
