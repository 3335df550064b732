// benchtau: `benchtau ports`, the serial ports present.
#include <fmt/format.h>

#include <cstdio>

#include "drivers/port_list.h"
#include "src/cli/commands.h"
#include "src/cli/serial_view.h"
#include "src/core/input_error.h"

namespace benchtau::cli {

void add_ports_command(CLI::App& app, int& exit_code) {
  CLI::App* cmd = app.add_subcommand(
      "ports", "list the serial ports: name, USB description, VID:PID and serial number");
  cmd->callback([&exit_code] {
    try {
      const std::vector<PortInfo> ports = list_ports();
      const std::string text = port_table(ports);
      std::fwrite(text.data(), 1, text.size(), stdout);
      exit_code = kMeasured;
    } catch (const InputError& e) {
      fmt::print(stderr, "benchtau: {}\n", e.what());
      exit_code = kInputError;
    }
  });
}

}  // namespace benchtau::cli
