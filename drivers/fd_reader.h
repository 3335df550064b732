// benchtau: one read with a timeout from a descriptor, for every kind of port.
#pragma once

#include <span>

#include "drivers/byte_source.h"

namespace benchtau {

// poll() then read(): data as soon as any arrives; EINTR is reported, not
// retried, so that a stop signal is seen at once; end of file, EIO and a
// hang-up are "closed". A tty whose far end went away reads as the end of
// file or as EIO depending on when the read lands, so both are worded the
// same: "the port hung up".
ReadResult read_fd(int fd, std::span<std::uint8_t> buffer, int timeout_ms);

}  // namespace benchtau
