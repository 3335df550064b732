// benchtau: writing a capture as CSV text.
#include "src/core/capture_csv.h"

#include <fmt/format.h>

#include <cmath>
#include <iterator>

namespace benchtau {
namespace {

std::string quoted_if_needed(const std::string& name) {
  if (name.find_first_of(",\"\r\n") == std::string::npos) return name;
  std::string out = "\"";
  for (char c : name) {
    out += c;
    if (c == '"') out += '"';
  }
  return out + "\"";
}

}  // namespace

std::string capture_csv(const Capture& capture, const std::vector<std::string>& names) {
  std::string out;
  out.reserve(40 * (capture.samples() + 1));
  out += "t_s";
  for (std::size_t k = 0; k < capture.channels.size(); ++k) {
    const std::string& name =
        k < names.size() && !names[k].empty() ? names[k] : capture.channels[k].name;
    out += ',';
    out += quoted_if_needed(name);
  }
  out += '\n';
  auto sink = std::back_inserter(out);
  for (std::size_t i = 0; i < capture.samples(); ++i) {
    fmt::format_to(sink, "{:.10g}", capture.time.at(i));
    for (const Channel& ch : capture.channels) {
      const double v = ch.values[i];
      if (std::isnan(v)) {
        out += ",NaN";
      } else {
        fmt::format_to(sink, ",{:.7g}", v);
      }
    }
    out += '\n';
  }
  return out;
}

}  // namespace benchtau
