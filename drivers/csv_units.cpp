// benchtau: the unit table and the splitting of header cells into name and unit.
#include "drivers/csv_units.h"

#include <array>
#include <cctype>

namespace benchtau::csv {
namespace {

struct UnitEntry {
  std::string_view spelling;
  Quantity quantity;
  double to_si;
  bool strict;  // safe to recognise as a bare "_unit" or "/unit" suffix
};

// "µ" is written both as U+00B5 (micro sign) and U+03BC (Greek mu).
constexpr std::array<UnitEntry, 61> units{{
    {"s", Quantity::time, 1.0, true},
    {"sec", Quantity::time, 1.0, false},
    {"secs", Quantity::time, 1.0, false},
    {"second", Quantity::time, 1.0, false},
    {"seconds", Quantity::time, 1.0, false},
    {"ms", Quantity::time, 1e-3, true},
    {"msec", Quantity::time, 1e-3, false},
    {"us", Quantity::time, 1e-6, true},
    {"\xC2\xB5s", Quantity::time, 1e-6, true},
    {"\xCE\xBCs", Quantity::time, 1e-6, true},
    {"usec", Quantity::time, 1e-6, false},
    {"ns", Quantity::time, 1e-9, true},
    {"nsec", Quantity::time, 1e-9, false},
    {"ps", Quantity::time, 1e-12, true},
    {"V", Quantity::voltage, 1.0, true},
    {"v", Quantity::voltage, 1.0, false},
    {"volt", Quantity::voltage, 1.0, false},
    {"volts", Quantity::voltage, 1.0, false},
    {"kV", Quantity::voltage, 1e3, true},
    {"mV", Quantity::voltage, 1e-3, true},
    {"mv", Quantity::voltage, 1e-3, false},
    {"uV", Quantity::voltage, 1e-6, true},
    {"\xC2\xB5V", Quantity::voltage, 1e-6, true},
    {"\xCE\xBCV", Quantity::voltage, 1e-6, true},
    {"A", Quantity::current, 1.0, true},
    {"amp", Quantity::current, 1.0, false},
    {"amps", Quantity::current, 1.0, false},
    {"mA", Quantity::current, 1e-3, true},
    {"uA", Quantity::current, 1e-6, true},
    {"\xC2\xB5"
     "A",
     Quantity::current, 1e-6, true},
    {"\xCE\xBC"
     "A",
     Quantity::current, 1e-6, true},
    {"nA", Quantity::current, 1e-9, true},
    {"Hz", Quantity::rate, 1.0, false},
    {"hz", Quantity::rate, 1.0, false},
    {"kHz", Quantity::rate, 1e3, false},
    {"KHz", Quantity::rate, 1e3, false},
    {"khz", Quantity::rate, 1e3, false},
    {"MHz", Quantity::rate, 1e6, false},
    {"Mhz", Quantity::rate, 1e6, false},
    {"GHz", Quantity::rate, 1e9, false},
    {"S/s", Quantity::rate, 1.0, false},
    {"kS/s", Quantity::rate, 1e3, false},
    {"KS/s", Quantity::rate, 1e3, false},
    {"MS/s", Quantity::rate, 1e6, false},
    {"GS/s", Quantity::rate, 1e9, false},
    {"Sa/s", Quantity::rate, 1.0, false},
    {"kSa/s", Quantity::rate, 1e3, false},
    {"KSa/s", Quantity::rate, 1e3, false},
    {"MSa/s", Quantity::rate, 1e6, false},
    {"GSa/s", Quantity::rate, 1e9, false},
    {"sps", Quantity::rate, 1.0, false},
    {"SPS", Quantity::rate, 1.0, false},
    {"ksps", Quantity::rate, 1e3, false},
    {"kSPS", Quantity::rate, 1e3, false},
    {"Msps", Quantity::rate, 1e6, false},
    {"MSPS", Quantity::rate, 1e6, false},
    {"samples/s", Quantity::rate, 1.0, false},
    {"samples/sec", Quantity::rate, 1.0, false},
    {"kSamples/s", Quantity::rate, 1e3, false},
    {"MSamples/s", Quantity::rate, 1e6, false},
    {"1/s", Quantity::rate, 1.0, false},
}};

std::string_view si_of(Quantity q) {
  switch (q) {
    case Quantity::time:
      return "s";
    case Quantity::voltage:
      return "V";
    case Quantity::current:
      return "A";
    case Quantity::rate:
      return "Hz";
    default:
      return "";
  }
}

std::string unquote(std::string_view text) {
  text = trim_blanks(text);
  if (text.size() >= 2 && text.front() == '"' && text.back() == '"') {
    std::string out;
    for (std::size_t i = 1; i + 1 < text.size(); ++i) {
      out += text[i];
      if (text[i] == '"' && i + 2 < text.size() && text[i + 1] == '"') ++i;  // "" is one quote
    }
    return std::string(trim_blanks(out));
  }
  return std::string(text);
}

}  // namespace

std::string_view trim_blanks(std::string_view text) {
  while (!text.empty() && (text.front() == ' ' || text.front() == '\t')) text.remove_prefix(1);
  while (!text.empty() && (text.back() == ' ' || text.back() == '\t')) text.remove_suffix(1);
  return text;
}

std::string lower_ascii(std::string_view text) {
  std::string out(text);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

std::optional<KnownUnit> lookup_unit(std::string_view unit, bool strict) {
  unit = trim_blanks(unit);
  for (const auto& e : units) {
    if (e.spelling == unit && (e.strict || !strict))
      return KnownUnit{e.quantity, e.to_si, si_of(e.quantity)};
  }
  return std::nullopt;
}

ColumnName parse_column_name(std::string_view cell) {
  ColumnName c;
  c.name = unquote(cell);
  const std::string_view name = c.name;
  c.base = c.name;

  // A circuit simulator's probe name, "v(out)" or "i(r1)", is a node
  // voltage or a branch current in SI units, not a name with a unit.
  if (name.size() > 3 && name[1] == '(' && name.back() == ')' &&
      (name[0] == 'v' || name[0] == 'V' || name[0] == 'i' || name[0] == 'I')) {
    const bool volts = name[0] == 'v' || name[0] == 'V';
    c.quantity = volts ? Quantity::voltage : Quantity::current;
    c.si_unit.assign(1, volts ? 'V' : 'A');
    return c;
  }

  std::string_view base = name;
  std::string_view unit;
  bool bracketed = false;
  if (!name.empty() && (name.back() == ')' || name.back() == ']')) {
    const char open = name.back() == ')' ? '(' : '[';
    const auto at = name.rfind(open);
    if (at != std::string_view::npos && at > 0) {
      base = trim_blanks(name.substr(0, at));
      unit = trim_blanks(name.substr(at + 1, name.size() - at - 2));
      bracketed = true;
    }
  }
  if (!bracketed) {
    // A bare suffix counts only when it is a unit we know.
    const auto at = name.find_last_of("/_");
    if (at != std::string_view::npos && at > 0 && lookup_unit(name.substr(at + 1), true)) {
      base = trim_blanks(name.substr(0, at));
      unit = name.substr(at + 1);
    }
  }
  if (unit.empty()) return c;

  c.base = std::string(base);
  c.unit = std::string(unit);
  if (const auto known = lookup_unit(unit)) {
    c.quantity = known->quantity;
    c.to_si = known->to_si;
    c.si_unit = std::string(known->si);
  } else {
    c.quantity = Quantity::other;
    c.si_unit = c.unit;
  }
  return c;
}

bool is_time_name(std::string_view base) {
  const std::string b = lower_ascii(trim_blanks(base));
  return b == "t" || b.starts_with("time") || b == "sec" || b == "seconds";
}

}  // namespace benchtau::csv
