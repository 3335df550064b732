// benchtau: design files shared by the design file tests: the example and small designs.
#pragma once

#include <catch2/catch.hpp>

#include <string>
#include <string_view>

#include "src/core/design_file.h"
#include "src/core/input_error.h"

namespace benchtau::test {

// The design file of the format's description, exactly as written there.
constexpr std::string_view kExample = R"(name = "kiln controller, timer board rev C"
supply_V = 9.0
family = "bipolar"                  # or "cmos"
[circuit]
kind = "astable-two-resistor"       # astable-output-resistor | astable-diode-steered | monostable
control = "decoupled"               # load-to-ground | feedback-from-output | feedback-from-discharge | driven
reset = "supply"                    # control | cap-node | open
[parts]
R1 = { value = "10k", tolerance = "1%", kind = "metal-film", role = "upper" }
R2 = { value = "47k", tolerance = "1%", kind = "metal-film", role = "lower" }
C1 = { value = "4.7u", tolerance = "20%", kind = "electrolytic", rated_V = 16, role = "timing-cap" }
[capture]
out = "out_V"                       # column names (or 1-based indices) of the nodes captured
cap = "cap_V"
ctl = "ctl_V"                       # optional: the control pin
)";

// The example with one piece of text changed; the piece must be there.
inline std::string with(std::string_view from, std::string_view to,
                        std::string_view text = kExample) {
  std::string s(text);
  const std::size_t at = s.find(from);
  REQUIRE(at != std::string::npos);
  s.replace(at, from.size(), to);
  return s;
}

inline std::string error_of(std::string_view text) {
  try {
    benchtau::read_design_text(text, "board.toml");
  } catch (const benchtau::InputError& e) {
    return e.what();
  }
  return "(read without error)";
}

inline benchtau::Design read(std::string_view text) {
  return benchtau::read_design_text(text, "board.toml");
}

// A small design of each circuit kind, with the control and reset wiring given.
inline std::string small_design(std::string_view kind, std::string_view control,
                                std::string_view reset, std::string_view extra_circuit,
                                std::string_view extra_parts) {
  std::string parts;
  if (kind == "astable-two-resistor" || kind == "astable-diode-steered") {
    parts =
        "R1 = { value = \"4k7\", role = \"upper\" }\n"
        "R2 = { value = \"22k\", role = \"lower\" }\n";
    if (kind == "astable-diode-steered") parts += "D1 = { vf_V = 0.65, role = \"diode\" }\n";
  } else {
    parts = "R1 = { value = \"33k\", role = \"timing-res\" }\n";
  }
  parts += "C1 = { value = \"100n\", role = \"timing-cap\" }\n";
  return "supply_V = 12\nfamily = \"cmos\"\n[circuit]\nkind = \"" + std::string(kind) +
         "\"\ncontrol = \"" + std::string(control) + "\"\nreset = \"" + std::string(reset) +
         "\"\n" + std::string(extra_circuit) + "[parts]\n" + parts + std::string(extra_parts);
}

}  // namespace benchtau::test
