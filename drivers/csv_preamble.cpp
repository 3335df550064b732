// benchtau: recognising sample interval and sample rate in metadata lines.
#include "drivers/csv_preamble.h"

#include <fmt/format.h>

#include <array>
#include <charconv>
#include <cmath>

#include "drivers/csv_cell.h"
#include "drivers/csv_units.h"

namespace benchtau::csv {
namespace {

struct KeyValue {
  std::string_view key;
  std::string_view value;  // may end in a unit: "2 us"
  std::string_view unit;   // a separate unit field, when there is one
  char delimiter = ' ';
};

bool is_field_separator(char c) { return c == ',' || c == ';' || c == '\t'; }

std::optional<KeyValue> split_key_value(std::string_view text) {
  // The key ends at the first delimiter of any kind: "rate;2,5;kHz", "dt = 2 us".
  const auto at = text.find_first_of(",;\t:=");
  if (at != std::string_view::npos && at > 0) {
    const char delim = text[at];
    KeyValue kv;
    kv.key = trim_blanks(text.substr(0, at));
    kv.delimiter = delim;
    std::string_view rest = text.substr(at + 1);
    if (is_field_separator(delim)) {
      const auto next = rest.find(delim);
      kv.value = trim_blanks(rest.substr(0, next));
      if (next != std::string_view::npos) {
        const auto unit = rest.substr(next + 1);
        kv.unit = trim_blanks(unit.substr(0, unit.find(delim)));
      }
    } else {
      kv.value = trim_blanks(rest);
    }
    if (!kv.key.empty()) return kv;
  }
  // "Sample interval 2 us": the key is the words before the first number.
  std::vector<std::string_view> words;
  split_fields(text, ' ', words);
  for (std::size_t i = 1; i < words.size(); ++i) {
    if (parse_cell(words[i], false).kind != CellKind::number) continue;
    const char* begin = words.front().data();
    KeyValue kv;
    kv.key = std::string_view(
        begin, static_cast<std::size_t>(words[i - 1].data() + words[i - 1].size() - begin));
    kv.value = std::string_view(
        words[i].data(), static_cast<std::size_t>(text.data() + text.size() - words[i].data()));
    return kv;
  }
  return std::nullopt;
}

struct Value {
  double value = 0.0;
  std::string unit;
};

// "2 us", "2us", "500kHz", "2,5 µs" (with a decimal comma).
std::optional<Value> parse_quantity(std::string_view value, std::string_view unit_field,
                                    bool decimal_comma) {
  std::string text(trim_blanks(value));
  if (decimal_comma) {
    for (char& c : text) c = c == ',' ? '.' : c;
  }
  std::size_t skip = text.size() >= 2 && text[0] == '+' ? 1 : 0;
  double v = 0.0;
  const auto [ptr, ec] = std::from_chars(text.data() + skip, text.data() + text.size(), v);
  if (ec != std::errc() || !std::isfinite(v)) return std::nullopt;
  std::string_view rest =
      trim_blanks(std::string_view(ptr, static_cast<std::size_t>(text.data() + text.size() - ptr)));
  if (rest.empty()) rest = unit_field;
  return Value{v, std::string(rest)};
}

std::vector<std::string> words_of(std::string_view key) {
  std::vector<std::string> words;
  std::string word;
  for (const char ch : key) {
    const auto c = static_cast<unsigned char>(ch);
    if ((c >= 'a' && c <= 'z') || (c >= '0' && c <= '9')) {
      word += ch;
    } else if (c >= 'A' && c <= 'Z') {
      word += static_cast<char>(c - 'A' + 'a');
    } else if (!word.empty()) {
      words.push_back(std::move(word));
      word.clear();
    }
  }
  if (!word.empty()) words.push_back(std::move(word));
  return words;
}

bool has_word(const std::vector<std::string>& words, std::string_view w) {
  for (const auto& x : words) {
    if (x == w) return true;
  }
  return false;
}

}  // namespace

KeyKind classify_key(std::string_view key) {
  const auto words = words_of(key);
  bool sampl = false;
  for (const auto& w : words) {
    if (w.find("interval") != std::string::npos || w.find("increment") != std::string::npos) {
      return KeyKind::interval;
    }
    sampl = sampl || w.starts_with("sampl");
  }
  if (has_word(words, "dt")) return KeyKind::interval;
  if (sampl && (has_word(words, "period") || has_word(words, "time"))) return KeyKind::interval;
  for (const auto& w : words) {
    if (w == "rate" || (w.starts_with("sampl") && w.ends_with("rate"))) return KeyKind::rate;
  }
  if (has_word(words, "fs") || has_word(words, "sps")) return KeyKind::rate;
  if (sampl && (has_word(words, "frequency") || has_word(words, "freq"))) return KeyKind::rate;
  if (has_word(words, "samples") && has_word(words, "per") &&
      (has_word(words, "second") || has_word(words, "sec") || has_word(words, "s"))) {
    return KeyKind::rate;
  }
  return KeyKind::none;
}

PreambleTiming read_preamble(std::span<const PreambleLine> lines, const CsvDialect& dialect) {
  PreambleTiming t;
  for (const auto& line : lines) {
    const auto kv = split_key_value(line.text);
    if (!kv) continue;
    const KeyKind kind = classify_key(kv->key);
    if (kind == KeyKind::none) continue;
    if ((kind == KeyKind::interval && t.interval_s) || (kind == KeyKind::rate && t.rate_Hz))
      continue;
    // "key;2,5;kHz" has a decimal comma whatever the data rows use.
    const bool comma_decimal =
        kv->delimiter != ',' &&
        (dialect.decimal_comma ||
         (kv->delimiter == ';' && kv->value.find('.') == std::string_view::npos));
    const auto q = parse_quantity(kv->value, kv->unit, comma_decimal);
    if (!q) continue;
    const auto unit = lookup_unit(q->unit);
    const Quantity want = kind == KeyKind::interval ? Quantity::time : Quantity::rate;
    if (!q->unit.empty() && !unit) continue;  // "2024-01-05", "1000 points": not a quantity
    if (unit && unit->quantity != want) {
      t.notes.push_back(fmt::format(
          "Line {} gives \"{}\" in \"{}\", which is not a {} unit; it was ignored.", line.number,
          std::string(kv->key), q->unit, kind == KeyKind::interval ? "time" : "rate"));
      continue;
    }
    const double si = q->value * (unit ? unit->to_si : 1.0);
    if (!(si > 0.0) || !std::isfinite(si)) {
      t.notes.push_back(
          fmt::format("Line {} gives \"{}\" as {}, which is not a positive number; it was ignored.",
                      line.number, std::string(kv->key), q->value));
      continue;
    }
    if (kind == KeyKind::interval) {
      t.interval_s = si;
      t.interval_line = line.number;
    } else {
      t.rate_Hz = si;
      t.rate_line = line.number;
    }
  }
  return t;
}

}  // namespace benchtau::csv
