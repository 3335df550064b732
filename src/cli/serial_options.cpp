// benchtau: the shared serial options.
#include "src/cli/serial_options.h"

#include "src/cli/rate_option.h"

#include <fmt/format.h>

#include "src/core/engineering.h"
#include "src/core/input_error.h"

namespace benchtau::cli {

void add_serial_options(CLI::App& cmd, SerialArgs& a) {
  cmd.add_option("--port", a.port, "serial port, e.g. /dev/ttyACM0 (see `benchtau ports`)")
      ->required();
  cmd.add_option("--baud", a.baud, "baud rate")->capture_default_str()->check(CLI::PositiveNumber);
  cmd.add_option("--data-bits", a.data_bits, "data bits")
      ->capture_default_str()
      ->check(CLI::IsMember({5, 6, 7, 8}));
  cmd.add_option("--parity", a.parity, "parity")
      ->capture_default_str()
      ->check(CLI::IsMember({"none", "odd", "even", "mark", "space"}));
  cmd.add_option("--stop-bits", a.stop_bits, "stop bits")
      ->capture_default_str()
      ->check(CLI::IsMember({1, 2}));
  cmd.add_option("--flow", a.flow, "flow control")
      ->capture_default_str()
      ->check(CLI::IsMember({"none", "xonxoff", "rtscts", "dtrdsr"}));
  cmd.add_option("--format", a.format,
                 "stream format: text lines, binary frames (drivers/FRAMES.md), or auto to tell "
                 "from the first bytes")
      ->capture_default_str()
      ->check(CLI::IsMember({"auto", "text", "frames"}));
  cmd.add_option("--rate", a.rate,
                 "samples per second per channel, e.g. 10k; frames need it, and text lines "
                 "without timestamps");
  cmd.add_flag("--timestamps", a.timestamps,
               "text lines begin with a timestamp in microseconds (detected when --rate is not "
               "given)");
  cmd.add_option("--vref", a.vref_V, "the ADC's reference voltage, in volts")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd.add_option("--bits", a.bits, "the ADC's resolution in bits")
      ->capture_default_str()
      ->check(CLI::Range(1, 16));
  cmd.add_option("--divider", a.divider,
                 "input divider ratio: the node's voltage over the ADC pin's (2 for a 2:1 divider)")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
}

PortSettings port_settings(const SerialArgs& a) {
  PortSettings s;
  s.baud = a.baud;
  s.data_bits = a.data_bits;
  s.stop_bits = a.stop_bits;
  s.parity = a.parity == "odd"     ? Parity::odd
             : a.parity == "even"  ? Parity::even
             : a.parity == "mark"  ? Parity::mark
             : a.parity == "space" ? Parity::space
                                   : Parity::none;
  s.flow = a.flow == "xonxoff"  ? FlowControl::xonxoff
           : a.flow == "rtscts" ? FlowControl::rtscts
           : a.flow == "dtrdsr" ? FlowControl::dtrdsr
                                : FlowControl::none;
  return s;
}

SessionOptions session_options(const SerialArgs& a) {
  SessionOptions o;
  o.port = a.port;
  o.stream.rate_Hz = rate_option(a.rate);
  o.stream.format = a.format == "text"     ? StreamFormat::text
                    : a.format == "frames" ? StreamFormat::frames
                                           : StreamFormat::detect;
  if (o.stream.format == StreamFormat::frames && !o.stream.rate_Hz) {
    throw InputError("--format frames", 0, 0, "frames carry no sample times: give --rate too");
  }
  o.stream.timestamps = a.timestamps;
  o.scale.vref_V = a.vref_V;
  o.scale.bits = a.bits;
  o.scale.divider = a.divider;
  o.stream.full_scale = o.scale.full_scale();
  return o;
}

}  // namespace benchtau::cli
