// benchtau: parsing --change CAPTURE:CHANGE into the board changes the diagnosis takes.
#include "src/cli/fit_changes.h"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <string_view>

#include "src/core/engineering.h"
#include "src/core/input_error.h"

namespace benchtau::cli {
namespace {

[[noreturn]] void fail(std::string_view text, const std::string& why) {
  throw InputError("--change", 0, 0, fmt::format("\"{}\": {}", text, why));
}

std::string part_list(const Design& design) {
  std::string out;
  for (const Part& p : design.parts) out += (out.empty() ? "" : ", ") + p.ref;
  return out;
}

void parse_one(std::string_view text, std::size_t captures, const Design& design,
               std::vector<BoardChange>& changes) {
  const std::size_t colon = text.find(':');
  if (colon == std::string_view::npos || colon == 0) {
    fail(text,
         "expected CAPTURE:CHANGE, such as 2:supply=12 (capture 2 taken at 12 V) or 2:R2||100k "
         "(capture 2 with 100k added across R2)");
  }
  const std::string_view number = text.substr(0, colon), what = text.substr(colon + 1);
  std::size_t index = 0;
  const auto [end, ec] = std::from_chars(number.data(), number.data() + number.size(), index);
  if (ec != std::errc() || end != number.data() + number.size()) {
    fail(text, fmt::format("\"{}\" is not a capture number: captures count from 1 in the order "
                           "given",
                           number));
  }
  if (index == 0 || index > captures) {
    fail(text, fmt::format("there is no capture {}: {} capture{} given", index, captures,
                           captures == 1 ? " was" : "s were"));
  }
  BoardChange& change = changes[index - 1];
  if (what.substr(0, 7) == "supply=") {
    const std::string_view volts = what.substr(7);
    const auto v = parse_eng(volts, "V");
    if (!v || !(*v > 0.0)) {
      fail(text, fmt::format("expected a supply voltage such as 12 or 4.5V, found \"{}\"", volts));
    }
    if (change.supply_V) fail(text, fmt::format("capture {} already has a supply", index));
    change.supply_V = *v;
    return;
  }
  const std::size_t bars = what.find("||");
  if (bars == std::string_view::npos) {
    fail(text, "expected supply=VOLTS or PART||OHMS after the colon");
  }
  const std::string_view ref = what.substr(0, bars), ohms = what.substr(bars + 2);
  const bool known = std::any_of(design.parts.begin(), design.parts.end(),
                                 [&](const Part& p) { return p.ref == ref; });
  if (!known) {
    fail(text,
         fmt::format("the design has no part \"{}\"; its parts are {}", ref, part_list(design)));
  }
  const auto r = parse_eng(ohms, "ohm");
  if (!r || !(*r > 0.0)) {
    fail(text, fmt::format("expected a resistance such as 100k or 4k7, found \"{}\"", ohms));
  }
  if (!change.across_ref.empty()) {
    fail(text, fmt::format("capture {} already has a resistor added across {}", index,
                           change.across_ref));
  }
  change.across_ref = std::string(ref);
  change.across_ohm = *r;
}

}  // namespace

std::vector<BoardChange> parse_changes(std::span<const std::string> texts, std::size_t captures,
                                       const Design& design) {
  std::vector<BoardChange> changes(captures);
  for (const std::string& t : texts) parse_one(t, captures, design, changes);
  return changes;
}

std::string change_text(const BoardChange& change) {
  std::string out;
  if (change.supply_V) out = fmt::format("taken at {}", format_eng(*change.supply_V, "V"));
  if (!change.across_ref.empty()) {
    out += fmt::format("{}{} added across {}", out.empty() ? "" : "; ",
                       format_eng(change.across_ohm, "ohm"), change.across_ref);
  }
  return out;
}

}  // namespace benchtau::cli
