// benchtau: reading a design file (TOML); the format is documented in README.md.
#pragma once

#include <string>
#include <string_view>

#include "src/core/design.h"

namespace benchtau {

// Reads and checks a design. Throws InputError naming the file and line (and
// column where known) for a TOML syntax error, an unknown key, a bad value,
// or a part the circuit needs and does not have.
Design read_design_file(const std::string& path);
Design read_design_text(std::string_view text, const std::string& source);

}  // namespace benchtau
