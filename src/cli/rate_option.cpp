// benchtau: the --rate option.
#include "src/cli/rate_option.h"

#include <fmt/format.h>

#include "src/core/engineering.h"
#include "src/core/input_error.h"

namespace benchtau::cli {

std::optional<double> rate_option(const std::string& text) {
  if (text.empty()) return std::nullopt;
  const auto rate = parse_eng(text, "Hz");
  if (!rate || !(*rate > 0.0)) {
    throw InputError(
        "--rate", 0, 0,
        fmt::format("expected a sample rate such as 1M, 250k or 2.5 MS/s, found \"{}\"", text));
  }
  return rate;
}

}  // namespace benchtau::cli
