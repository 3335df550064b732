// benchtau: numbers in engineering notation, both ways ("4.87 ms", "4k7", "100n").
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace benchtau {

// Three significant figures (exactly: trailing zeros are kept only as
// figures) with an SI prefix: format_eng(0.00487, "s") is "4.87 ms",
// format_eng(6.01, "V") is "6.01 V", format_eng(0.1, "V") is "100 mV" and
// format_eng(1.2e-6, "s") is "1.20 us". NaN prints as "-".
std::string format_eng(double value, std::string_view unit, int significant = 3);

// A percentage of a fraction: format_percent(0.523) is "52.3 %".
std::string format_percent(double fraction, int decimals = 1);

// Parses "10k", "4k7", "4.7u", "2M2", "100n", "1e-6", "500 kHz", "2.5 MS/s".
// unit, when given, may follow the number and prefix ("Hz", "S/s" count as
// one). Returns nothing if the text is not such a number.
std::optional<double> parse_eng(std::string_view text, std::string_view unit = {});

}  // namespace benchtau
