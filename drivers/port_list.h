// benchtau: the serial ports the system has, as libserialport reports them.
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace benchtau {

struct PortInfo {
  std::string name;         // "/dev/ttyUSB0"
  std::string description;  // the USB product string or the driver's description
  std::string transport;    // "usb", "bluetooth", "native"
  std::optional<int> usb_vid;
  std::optional<int> usb_pid;
  std::string serial;  // the USB serial number, "" when there is none
};

// Throws PortError (port "serial ports") when the system cannot be asked.
std::vector<PortInfo> list_ports();

}  // namespace benchtau
