// benchtau: one read with a timeout from a descriptor, for every kind of port.
#pragma once

#include <span>

#include "drivers/byte_source.h"

namespace benchtau {

// poll() then read(): data as soon as any arrives; EINTR is reported, not
// retried, so that a stop signal is seen at once; end of file, EIO and a
// hang-up are "closed".
ReadResult read_fd(int fd, std::span<std::uint8_t> buffer, int timeout_ms);

}  // namespace benchtau
