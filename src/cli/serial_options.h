// benchtau: the port and stream options `watch` and `capture` share, and their checks.
#pragma once

#include <CLI/CLI.hpp>

#include <string>

#include "drivers/live_session.h"
#include "drivers/serial_port.h"

namespace benchtau::cli {

struct SerialArgs {
  std::string port;
  int baud = 115200;
  int data_bits = 8;
  std::string parity = "none";
  int stop_bits = 1;
  std::string flow = "none";
  std::string format = "auto";
  std::string rate;
  bool timestamps = false;
  double vref_V = 5.0;
  int bits = 10;
  double divider = 1.0;
};

void add_serial_options(CLI::App& cmd, SerialArgs& args);

// Throws InputError naming the option for values CLI11 cannot check alone.
SessionOptions session_options(const SerialArgs& args);
PortSettings port_settings(const SerialArgs& args);

}  // namespace benchtau::cli
