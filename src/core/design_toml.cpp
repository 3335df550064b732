// benchtau: checked reading of the design file's TOML nodes.
#include "src/core/design_toml.h"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <cmath>

#include "src/core/engineering.h"
#include "src/core/input_error.h"

namespace benchtau::design_toml {
namespace {

std::string lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

// Levenshtein distance; words here are a few dozen bytes at most.
std::size_t edit_distance(std::string_view a, std::string_view b) {
  std::vector<std::size_t> row(b.size() + 1);
  for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::size_t diagonal = row[0];
    row[0] = i;
    for (std::size_t j = 1; j <= b.size(); ++j) {
      const std::size_t above = row[j];
      const std::size_t substitute = diagonal + (a[i - 1] == b[j - 1] ? 0 : 1);
      row[j] = std::min({above + 1, row[j - 1] + 1, substitute});
      diagonal = above;
    }
  }
  return row[b.size()];
}

std::string quoted(std::string_view s) { return fmt::format("\"{}\"", s); }

}  // namespace

std::string Label::text() const {
  return context.empty() ? std::string(key) : fmt::format("{} in {}", key, context);
}

std::string Label::in() const {
  return context.empty() ? std::string() : fmt::format(" in {}", context);
}

std::optional<std::size_t> nearest(std::string_view word,
                                   std::span<const std::string_view> candidates) {
  std::optional<std::size_t> best;
  std::size_t best_distance = 3;
  for (std::size_t k = 0; k < candidates.size(); ++k) {
    const std::size_t d = edit_distance(word, candidates[k]);
    if (d < best_distance && d < word.size()) {
      best = k;
      best_distance = d;
    }
  }
  return best;
}

std::string_view near_miss(std::string_view word, std::span<const std::string_view> candidates) {
  const std::optional<std::size_t> k = nearest(word, candidates);
  return k ? candidates[*k] : std::string_view();
}

std::string describe(const toml::node& n) {
  switch (n.type()) {
    case toml::node_type::string:
      return fmt::format("a string {}", quoted(*n.value<std::string_view>()));
    case toml::node_type::integer:
      return fmt::format("an integer {}", *n.value<std::int64_t>());
    case toml::node_type::floating_point:
      return fmt::format("a floating-point number {}", *n.value<double>());
    case toml::node_type::boolean:
      return fmt::format("a boolean {}", *n.value<bool>());
    case toml::node_type::array:
      return "an array";
    case toml::node_type::table:
      return "a table";
    case toml::node_type::date:
      return "a date";
    case toml::node_type::time:
      return "a time";
    case toml::node_type::date_time:
      return "a date-time";
    case toml::node_type::none:
      break;
  }
  return "nothing";
}

std::string join(std::span<const std::string_view> words) {
  std::string out;
  for (std::string_view w : words) {
    if (!out.empty()) out += ", ";
    out += w;
  }
  return out;
}

void Reader::fail_at_line(std::size_t line, std::string message) const {
  throw InputError(source_, line, 0, std::move(message));
}

void Reader::fail(const toml::node& at, std::string message) const {
  fail_at_line(at.source().begin.line, std::move(message));
}

void Reader::fail(const toml::key& at, std::string message) const {
  fail_at_line(at.source().begin.line, std::move(message));
}

void Reader::check_keys(const toml::table& t, std::span<const std::string_view> accepted,
                        std::string_view where) const {
  // toml++ keeps keys sorted by name; report the first unknown one in file order.
  const toml::key* first = nullptr;
  for (const auto& [key, value] : t) {
    if (std::find(accepted.begin(), accepted.end(), key.str()) != accepted.end()) continue;
    if (first == nullptr || key.source().begin < first->source().begin) first = &key;
  }
  if (first == nullptr) return;
  std::string message = fmt::format("unknown key {} {}", quoted(first->str()), where);
  if (std::string_view guess = near_miss(first->str(), accepted); !guess.empty()) {
    message += fmt::format("; did you mean {}?", quoted(guess));
  } else {
    message += fmt::format("; accepted: {}", join(accepted));
  }
  fail(*first, std::move(message));
}

const toml::table& Reader::table(const toml::node& n, std::string_view name,
                                 std::string_view shape) const {
  if (const toml::table* t = n.as_table()) return *t;
  fail(n, fmt::format("{} must be a table {}, found {}", name, shape, describe(n)));
}

std::string Reader::string(const toml::node& n, Label label) const {
  if (auto s = n.value_exact<std::string>()) return *s;
  fail(n, fmt::format("{} must be a string, found {}", label.text(), describe(n)));
}

double Reader::number(const toml::node& n, Label label, Sign sign) const {
  double value = 0.0;
  if (auto i = n.value_exact<std::int64_t>()) {
    value = static_cast<double>(*i);
  } else if (auto d = n.value_exact<double>()) {
    value = *d;
  } else {
    fail(n, fmt::format("{} must be a number, found {}", label.text(), describe(n)));
  }
  if (!std::isfinite(value)) {
    fail(n, fmt::format("{} must be a finite number, found {}", label.text(), value));
  }
  check_sign(n, label, value, sign, fmt::format("{}", value));
  return value;
}

double Reader::eng(const toml::node& n, Label label, std::string_view unit, Sign sign) const {
  if (!n.is_string()) {
    if (n.is_number()) return number(n, label, sign);
    fail(n, fmt::format("{} must be a number or a string such as \"4k7\", found {}", label.text(),
                        describe(n)));
  }
  const std::string text = *n.value_exact<std::string>();
  const std::optional<double> value = parse_eng(text, unit);
  if (!value) {
    fail(n, fmt::format("{} {}{} is not a number in engineering notation (such as 4k7, 4.7u or "
                        "100n)",
                        label.key, quoted(text), label.in()));
  }
  check_sign(n, label, *value, sign, quoted(text));
  return *value;
}

void Reader::check_sign(const toml::node& n, Label label, double value, Sign sign,
                        std::string_view shown) const {
  if (sign == Sign::positive && !(value > 0.0)) {
    fail(n, fmt::format("{} must be above zero, found {}", label.text(), shown));
  }
  if (sign == Sign::non_negative && value < 0.0) {
    fail(n, fmt::format("{} must not be negative, found {}", label.text(), shown));
  }
}

bool Reader::same_word(std::string_view a, std::string_view b, bool ignore_case) {
  return ignore_case ? lower(a) == lower(b) : a == b;
}

std::string Reader::unknown_word_message(Label label, std::string_view text,
                                         std::span<const std::string_view> accepted,
                                         bool ignore_case) {
  std::string message = fmt::format("unknown {} {}{}; accepted: {}", label.key, quoted(text),
                                    label.in(), join(accepted));
  std::optional<std::size_t> guess;
  if (ignore_case) {
    std::vector<std::string> lowered;
    for (std::string_view w : accepted) lowered.push_back(lower(w));
    const std::vector<std::string_view> views(lowered.begin(), lowered.end());
    guess = nearest(lower(text), views);
  } else {
    guess = nearest(text, accepted);
  }
  if (guess) message += fmt::format("; did you mean {}?", quoted(accepted[*guess]));
  return message;
}

}  // namespace benchtau::design_toml
