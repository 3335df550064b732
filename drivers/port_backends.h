// benchtau: the two ways a port is opened; serial_port.h chooses between them.
#pragma once

#include <memory>
#include <string>

#include "drivers/byte_source.h"
#include "drivers/serial_port.h"

namespace benchtau {

// Through libserialport. Returns nullptr when libserialport cannot open the
// path for a reason termios may not share (a pty it does not find in sysfs);
// throws PortError for a missing port, a busy one or a permission problem.
std::unique_ptr<ByteSource> open_libserialport_port(const std::string& path,
                                                    const PortSettings& settings);

// Through open() and termios. Throws PortError.
std::unique_ptr<ByteSource> open_termios_port(const std::string& path,
                                              const PortSettings& settings);

// Takes the advisory lock every benchtau takes on a port, so that a second
// one is told the port is busy. Throws PortError.
void lock_port(int fd, const std::string& path);

}  // namespace benchtau
