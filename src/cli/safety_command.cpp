// benchtau: `benchtau safety`, the bench cautions in full.
#include <fmt/format.h>

#include "src/cli/commands.h"

namespace benchtau::cli {

const char* const kSafetyText =
    "Bench cautions (common practice; local codes and licensed practice come first)\n"
    "\n"
    "- Mains-powered boards: work on them only through an isolating transformer, or with\n"
    "  the supply disconnected, and only if you are qualified to. Anything connected to the\n"
    "  mains is for licensed practice under your local codes.\n"
    "- Scope ground clips: on a mains-powered scope the clip is tied to earth. Clipped to a\n"
    "  node that is not at earth, it makes a short circuit through the probe. Use a\n"
    "  differential probe or an isolated instrument for floating measurements.\n"
    "- Charged capacitors: large electrolytics keep their charge after power-off. Discharge\n"
    "  them through a suitable resistor and check with a meter before touching.\n"
    "- Electrolytics fitted backwards, or run above their rated voltage, can vent or burst:\n"
    "  keep your face away from a board you power up for the first time.\n"
    "- ADC boards: keep every input within the board's rated range; divide down higher\n"
    "  voltages and share a ground with the board under test only where that is safe.\n";

void add_safety_command(CLI::App& app, int& exit_code) {
  CLI::App* cmd = app.add_subcommand("safety", "print the bench cautions");
  cmd->callback([&exit_code] {
    fmt::print("{}", kSafetyText);
    exit_code = kMeasured;
  });
}

}  // namespace benchtau::cli
