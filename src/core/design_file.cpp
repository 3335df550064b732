// benchtau: reading a design file: its top level, [circuit] and [capture].
#include "src/core/design_file.h"

#include <fmt/format.h>
#include <toml++/toml.h>

#include <algorithm>
#include <array>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

#include "src/core/design_sections.h"
#include "src/core/input_error.h"

namespace benchtau {
namespace {

using design_toml::Reader;
using design_toml::Sign;
using design_toml::Word;

constexpr std::array kFamilies{Family::bipolar, Family::cmos};
constexpr std::array kCircuits{CircuitKind::astable_two_resistor,
                               CircuitKind::astable_output_resistor,
                               CircuitKind::astable_diode_steered, CircuitKind::monostable};
constexpr std::array kControls{ControlWiring::decoupled, ControlWiring::load_to_ground,
                               ControlWiring::feedback_from_output,
                               ControlWiring::feedback_from_discharge, ControlWiring::driven};
constexpr std::array kResets{ResetWiring::supply, ResetWiring::control, ResetWiring::cap_node,
                             ResetWiring::open};

// The file's words are the names the core prints (circuit_kind_name...).
template <class E, std::size_t N, class Name>
std::vector<Word<E>> words(const std::array<E, N>& values, Name name) {
  std::vector<Word<E>> out;
  for (E v : values) out.push_back({name(v), v});
  return out;
}

template <class E>
std::vector<std::string_view> texts(const std::vector<Word<E>>& ws) {
  std::vector<std::string_view> out;
  for (const Word<E>& w : ws) out.push_back(w.text);
  return out;
}

constexpr std::array<std::string_view, 3> kTopKeys{"name", "supply_V", "family"};
constexpr std::array<std::string_view, 4> kTables{"circuit", "timer", "parts", "capture"};
constexpr std::array<std::string_view, 4> kCircuitKeys{"kind", "control", "reset", "control_V"};
constexpr std::array<std::string_view, 6> kCaptureKeys{
    "out", "cap", "ctl", "out_input_ohm", "cap_input_ohm", "ctl_input_ohm"};

bool among(std::string_view key, std::span<const std::string_view> names) {
  return std::find(names.begin(), names.end(), key) != names.end();
}

// Keys at the top level: plain values, or the four tables. A value named like
// a table is left for its type check.
void check_top_keys(const Reader& r, const toml::table& root) {
  const toml::key* first = nullptr;
  for (const auto& [key, value] : root) {
    const bool known =
        among(key.str(), kTables) || (!value.is_table() && among(key.str(), kTopKeys));
    if (!known && (first == nullptr || key.source().begin < first->source().begin)) first = &key;
  }
  if (first == nullptr) return;
  std::string message;
  if (root[first->str()].is_table()) {
    message = fmt::format("unknown table [{}]", first->str());
    if (std::string_view guess = design_toml::near_miss(first->str(), kTables); !guess.empty()) {
      message += fmt::format("; did you mean [{}]?", guess);
    } else {
      message += "; accepted tables: [circuit], [timer], [parts], [capture]";
    }
  } else {
    message = fmt::format("unknown key \"{}\" at the top level", first->str());
    if (std::string_view guess = design_toml::near_miss(first->str(), kTopKeys); !guess.empty()) {
      message += fmt::format("; did you mean \"{}\"?", guess);
    } else {
      message += fmt::format("; accepted: {}", design_toml::join(kTopKeys));
    }
  }
  r.fail(*first, std::move(message));
}

void read_circuit(const Reader& r, const toml::table& t, Design& d) {
  r.check_keys(t, kCircuitKeys, "in [circuit]");
  const auto circuits = words(kCircuits, circuit_kind_name);
  const toml::node* kind = t.get("kind");
  if (kind == nullptr) {
    r.fail(t,
           fmt::format("[circuit] has no kind; accepted: {}", design_toml::join(texts(circuits))));
  }
  d.kind = r.word<CircuitKind>(*kind, {"kind", "[circuit]"}, circuits);
  const toml::node* control = t.get("control");
  if (control != nullptr) {
    d.control = r.word<ControlWiring>(*control, {"control", "[circuit]"},
                                      words(kControls, control_wiring_name));
  }
  if (const toml::node* reset = t.get("reset")) {
    d.reset =
        r.word<ResetWiring>(*reset, {"reset", "[circuit]"}, words(kResets, reset_wiring_name));
  }
  // Feedback from the discharge pin needs a discharge pin that the timing
  // network does not already use.
  if (d.control == ControlWiring::feedback_from_discharge &&
      d.kind != CircuitKind::astable_output_resistor) {
    const std::string_view word = circuit_kind_name(d.kind);
    r.fail(*control, fmt::format("control \"feedback-from-discharge\" in [circuit] needs the "
                                 "discharge pin free of the timing path, which only an "
                                 "astable-output-resistor circuit has; this is {} {} circuit",
                                 word.front() == 'a' ? "an" : "a", word));
  }
  const toml::node* control_V = t.get("control_V");
  const bool takes_voltage =
      d.control == ControlWiring::load_to_ground || d.control == ControlWiring::driven;
  if (control_V != nullptr) {
    if (!takes_voltage) {
      r.fail(*control_V, fmt::format("control_V in [circuit] applies only to control "
                                     "\"load-to-ground\" or \"driven\", and control is \"{}\"",
                                     control_wiring_name(d.control)));
    }
    d.control_to_V = r.number(*control_V, {"control_V", "[circuit]"}, Sign::any);
  } else if (d.control == ControlWiring::driven) {
    r.fail(*control, "control \"driven\" in [circuit] needs control_V, the voltage on the pin");
  }
}

void read_node(const Reader& r, const toml::table& t, std::string_view key,
               std::string_view input_key, CaptureNode& node) {
  if (const toml::node* column = t.get(key)) {
    if (auto index = column->value_exact<std::int64_t>()) {
      if (*index < 1) {
        r.fail(*column, fmt::format("{} in [capture] must be a column name or a column number "
                                    "from 1, found {}",
                                    key, *index));
      }
      node.column = std::to_string(*index);
    } else if (auto name = column->value_exact<std::string>()) {
      if (name->find_first_not_of(" \t") == std::string::npos) {
        r.fail(*column, fmt::format("{} in [capture] is empty; give a column name or a column "
                                    "number from 1",
                                    key));
      }
      node.column = *name;
    } else {
      r.fail(*column, fmt::format("{} in [capture] must be a column name or a column number "
                                  "from 1, found {}",
                                  key, design_toml::describe(*column)));
    }
  }
  if (const toml::node* input = t.get(input_key)) {
    if (node.column.empty()) {
      r.fail(*input, fmt::format("{} in [capture] is for the {} column, which is not given",
                                 input_key, key));
    }
    node.input_ohm = r.eng(*input, {input_key, "[capture]"}, "ohm", Sign::positive);
  }
}

void read_capture(const Reader& r, const toml::table& t, Design& d) {
  r.check_keys(t, kCaptureKeys, "in [capture]");
  read_node(r, t, "out", "out_input_ohm", d.out);
  read_node(r, t, "cap", "cap_input_ohm", d.cap);
  read_node(r, t, "ctl", "ctl_input_ohm", d.ctl);
}

// toml++ writes "Error while parsing ..."; our messages start in lower case.
std::string syntax_message(std::string_view description) {
  std::string s = fmt::format("bad TOML: {}", description);
  const std::size_t first = std::string_view("bad TOML: ").size();
  if (s.size() > first && s[first] >= 'A' && s[first] <= 'Z') {
    s[first] = static_cast<char>(s[first] - 'A' + 'a');
  }
  return s;
}

// toml++ counts columns in code points; InputError counts bytes.
std::size_t byte_column(std::string_view text, std::size_t line, std::size_t column) {
  std::size_t start = 0;
  for (std::size_t l = 1; l < line && start != std::string_view::npos; ++l) {
    start = text.find('\n', start);
    if (start != std::string_view::npos) ++start;
  }
  if (start == std::string_view::npos || column == 0) return column;
  std::size_t points = 0;
  std::size_t k = start;
  for (; k < text.size() && text[k] != '\n'; ++k) {
    const bool continuation = (static_cast<unsigned char>(text[k]) & 0xC0) == 0x80;
    if (continuation) continue;
    if (++points == column) return k - start + 1;
  }
  return k - start + (column - points);
}

}  // namespace

Design read_design_text(std::string_view text, const std::string& source) {
  toml::table root;
  try {
    root = toml::parse(text, std::string_view(source));
  } catch (const toml::parse_error& e) {
    const std::size_t line = e.source().begin.line;
    throw InputError(source, line, byte_column(text, line, e.source().begin.column),
                     syntax_message(e.description()));
  }
  const Reader r(source);
  check_top_keys(r, root);

  Design d;
  d.source = source;
  if (const toml::node* name = root.get("name")) d.name = r.string(*name, {"name", ""});
  const toml::node* supply = root.get("supply_V");
  if (supply == nullptr) {
    r.fail_at_line(1, "missing supply_V, the supply voltage (such as supply_V = 9.0)");
  }
  d.supply_V = r.number(*supply, {"supply_V", ""}, Sign::positive);
  const auto families = words(kFamilies, family_name);
  const toml::node* family = root.get("family");
  if (family == nullptr) {
    r.fail_at_line(1,
                   fmt::format("missing family; accepted: {}", design_toml::join(texts(families))));
  }
  d.family = r.word<Family>(*family, {"family", ""}, families);
  d.figures = typical_figures(d.family);
  if (const toml::node* timer = root.get("timer")) {
    design_detail::read_timer(r, r.table(*timer, "timer", "([timer] on a line of its own)"),
                              d.figures, d.figures_given);
  }

  const toml::node* circuit = root.get("circuit");
  if (circuit == nullptr) {
    r.fail_at_line(1, fmt::format("missing [circuit], with its kind: {}",
                                  design_toml::join(texts(words(kCircuits, circuit_kind_name)))));
  }
  read_circuit(r, r.table(*circuit, "circuit", "([circuit] on a line of its own)"), d);

  const toml::table* parts = nullptr;
  if (const toml::node* node = root.get("parts")) {
    parts = &r.table(*node, "parts", "([parts] on a line of its own)");
    // toml++ keeps keys sorted by name; parts are kept in file order.
    std::vector<std::pair<const toml::key*, const toml::node*>> entries;
    for (const auto& [key, value] : *parts) entries.emplace_back(&key, &value);
    std::sort(entries.begin(), entries.end(), [](const auto& a, const auto& b) {
      return a.first->source().begin < b.first->source().begin;
    });
    for (const auto& [key, value] : entries) {
      d.parts.push_back(design_detail::read_part(r, *key, *value));
    }
  }
  design_detail::check_roles(r, d, parts);

  if (const toml::node* capture = root.get("capture")) {
    read_capture(r, r.table(*capture, "capture", "([capture] on a line of its own)"), d);
  }
  return d;
}

Design read_design_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    throw InputError(path, 0, 0,
                     fmt::format("cannot read the design file: {}", std::strerror(errno)));
  }
  std::ostringstream text;
  text << in.rdbuf();
  return read_design_text(text.str(), path);
}

}  // namespace benchtau
