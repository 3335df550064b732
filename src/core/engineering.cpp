// benchtau: engineering notation, printing and parsing.
#include "src/core/engineering.h"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <string>

namespace benchtau {
namespace {

struct Prefix {
  std::string_view symbol;
  int exponent;
};

// ASCII "u" prints for micro so that tables survive any terminal; both micro
// signs people type (U+00B5 and U+03BC) are accepted when parsing.
constexpr std::array<Prefix, 13> kPrefixes{{{"f", -15},
                                            {"p", -12},
                                            {"n", -9},
                                            {"u", -6},
                                            {"\xC2\xB5", -6},
                                            {"\xCE\xBC", -6},
                                            {"m", -3},
                                            {"k", 3},
                                            {"K", 3},
                                            {"M", 6},
                                            {"G", 9},
                                            {"T", 12},
                                            {"R", 0}}};  // "4R7" is 4.7 (ohms)

const Prefix* prefix_at_start(std::string_view s) {
  for (const Prefix& p : kPrefixes) {
    if (s.substr(0, p.symbol.size()) == p.symbol) return &p;
  }
  return nullptr;
}

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

bool iequal(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i) {
    auto lower = [](char c) {
      return (c >= 'A' && c <= 'Z') ? static_cast<char>(c - 'A' + 'a') : c;
    };
    if (lower(a[i]) != lower(b[i])) return false;
  }
  return true;
}

// Spellings of a unit that people write; the first is the canonical one.
bool is_unit(std::string_view text, std::string_view unit) {
  if (iequal(text, unit)) return true;
  if (iequal(unit, "Hz")) {
    for (std::string_view alias : {"S/s", "Sa/s", "sps", "samples/s"})
      if (iequal(text, alias)) return true;
  }
  if (iequal(unit, "s")) return iequal(text, "sec");
  if (iequal(unit, "ohm")) return text == "\xCE\xA9" || iequal(text, "ohms");
  return false;
}

}  // namespace

std::string format_eng(double value, std::string_view unit, int significant) {
  if (std::isnan(value)) return "-";
  if (std::isinf(value)) return fmt::format("{}inf {}", value < 0 ? "-" : "", unit);
  const std::string space_unit = unit.empty() ? std::string() : fmt::format(" {}", unit);
  if (value == 0.0) return fmt::format("0{}", space_unit);
  significant = std::max(significant, 1);
  // Round once, in decimal, to the significant figures ("9.9996" -> "1.000e+01"),
  // and place the point from the rounded exponent: the rounding then carries
  // into the next decade and prefix (99.96 m -> 100 m, 999.96 u -> 1.00 m),
  // and the figures are never more than asked for (0.1 V is "100 mV").
  const std::string sci = fmt::format("{:.{}e}", std::fabs(value), significant - 1);
  const std::size_t e = sci.find('e');
  std::string digits = sci.substr(0, e);
  digits.erase(std::remove(digits.begin(), digits.end(), '.'), digits.end());
  int exp10 = 0;
  std::from_chars(sci.data() + e + 1 + (sci[e + 1] == '+' ? 1 : 0), sci.data() + sci.size(), exp10);
  const int exp3 = std::clamp(static_cast<int>(std::floor(exp10 / 3.0)) * 3, -15, 12);
  // The digits before the point: 1 to 3, more or fewer at the ends of the prefixes.
  const int whole = exp10 - exp3 + 1;
  std::string number;
  if (whole <= 0) {
    number = "0." + std::string(static_cast<std::size_t>(-whole), '0') + digits;
  } else if (static_cast<std::size_t>(whole) >= digits.size()) {
    number = digits + std::string(static_cast<std::size_t>(whole) - digits.size(), '0');
  } else {
    const auto w = static_cast<std::size_t>(whole);
    number = digits.substr(0, w) + "." + digits.substr(w);
  }
  if (value < 0.0) number.insert(0, "-");
  std::string_view symbol;
  if (exp3 != 0) {
    for (const Prefix& p : kPrefixes) {
      if (p.exponent == exp3) {
        symbol = p.symbol;
        break;
      }
    }
  }
  if (unit.empty() && symbol.empty()) return number;
  return fmt::format("{} {}{}", number, symbol, unit);
}

std::string format_percent(double fraction, int decimals) {
  if (std::isnan(fraction)) return "-";
  return fmt::format("{:.{}f} %", fraction * 100.0, decimals);
}

std::optional<double> parse_eng(std::string_view text, std::string_view unit) {
  std::string_view s = trim(text);
  if (s.empty()) return std::nullopt;
  double value = 0.0;
  const char* first = s.data();
  if (*first == '+') ++first;
  auto [end, ec] = std::from_chars(first, s.data() + s.size(), value);
  if (ec != std::errc() || !std::isfinite(value)) return std::nullopt;
  std::string_view rest(end, static_cast<std::size_t>(s.data() + s.size() - end));

  // "4k7": a prefix standing for the decimal point, followed by more digits.
  // Only when the number before it is a whole number ("4.7k7" is nonsense).
  const std::string_view whole(first, static_cast<std::size_t>(end - first));
  const Prefix* p = prefix_at_start(rest);
  if (p != nullptr && whole.find_first_of(".eE") == std::string_view::npos) {
    std::string_view after = rest.substr(p->symbol.size());
    std::size_t digits = 0;
    while (digits < after.size() && after[digits] >= '0' && after[digits] <= '9') ++digits;
    if (digits > 0) {
      double fraction = 0.0;
      std::from_chars(after.data(), after.data() + digits, fraction);
      const double frac_scale = std::pow(10.0, -static_cast<double>(digits));
      value = std::copysign(std::fabs(value) + fraction * frac_scale, value) *
              std::pow(10.0, p->exponent);
      rest = after.substr(digits);
      rest = trim(rest);
      if (rest.empty() || (!unit.empty() && is_unit(rest, unit))) return value;
      return std::nullopt;
    }
  }

  rest = trim(rest);
  if (rest.empty()) return value;
  if (!unit.empty() && is_unit(rest, unit)) return value;
  p = prefix_at_start(rest);
  if (p == nullptr || p->symbol == "R") return std::nullopt;
  std::string_view after = trim(rest.substr(p->symbol.size()));
  if (after.empty() || (!unit.empty() && is_unit(after, unit))) {
    return value * std::pow(10.0, p->exponent);
  }
  return std::nullopt;
}

}  // namespace benchtau
