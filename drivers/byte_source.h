// benchtau: where serial bytes come from (a port, a pty, a test's fake), read with a timeout.
#pragma once

#include <cstddef>
#include <cstdint>
#include <span>
#include <string>

namespace benchtau {

enum class ReadStatus {
  data,         // bytes were read (perhaps fewer than asked: short reads are normal)
  timeout,      // nothing arrived in time
  interrupted,  // a signal arrived (EINTR); the caller checks whether to stop
  closed,       // the device went away: end of file, EIO, a hang-up, an unplugged adapter
};

struct ReadResult {
  ReadStatus status = ReadStatus::timeout;
  std::size_t bytes = 0;  // with data only
  std::string detail;  // with closed: why, for the user ("the port hung up", "Permission denied")
};

class ByteSource {
 public:
  virtual ~ByteSource() = default;
  // Waits up to timeout_ms for bytes and returns as soon as any arrive.
  virtual ReadResult read(std::span<std::uint8_t> buffer, int timeout_ms) = 0;
  // How the port was opened, for reports: "/dev/ttyUSB0 (libserialport)".
  virtual std::string description() const = 0;
};

}  // namespace benchtau
