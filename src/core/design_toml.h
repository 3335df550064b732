// benchtau: checked reading of a design file's TOML nodes; each problem is an InputError.
#pragma once

#include <toml++/toml.h>

#include <cstddef>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace benchtau::design_toml {

// A word of the file's vocabulary and what it stands for.
template <class E>
struct Word {
  std::string_view text;
  E value;
};

// A key and where it sits ("part R1", "[circuit]"; empty at the top level),
// as messages name it: "value in part R1", "supply_V".
struct Label {
  std::string_view key;
  std::string_view context;
  std::string text() const;
  std::string in() const;  // " in part R1", or empty
};

// Which values a number may take.
enum class Sign { any, non_negative, positive };

// The nearest of candidates within edit distance 2 (and closer than the
// word's own length, so that "x" suggests nothing), or empty.
std::string_view near_miss(std::string_view word, std::span<const std::string_view> candidates);

// "a string \"nine\"", "an integer 3", "a table"...: what a node is, for messages.
std::string describe(const toml::node& n);

std::string join(std::span<const std::string_view> words);

class Reader {
 public:
  explicit Reader(std::string source) : source_(std::move(source)) {}
  const std::string& source() const { return source_; }

  [[noreturn]] void fail_at_line(std::size_t line, std::string message) const;
  [[noreturn]] void fail(const toml::node& at, std::string message) const;
  [[noreturn]] void fail(const toml::key& at, std::string message) const;

  // Every key of t must be one of accepted. where reads "in part R1",
  // "in [circuit]" or "at the top level".
  void check_keys(const toml::table& t, std::span<const std::string_view> accepted,
                  std::string_view where) const;

  // n must be a table; shape says what one looks like ("such as { ... }").
  const toml::table& table(const toml::node& n, std::string_view name,
                           std::string_view shape) const;
  std::string string(const toml::node& n, Label label) const;
  // A plain TOML number (integer or float), finite.
  double number(const toml::node& n, Label label, Sign sign) const;
  // A number, or a string in engineering notation ("4k7", "100n") with unit
  // allowed after it.
  double eng(const toml::node& n, Label label, std::string_view unit, Sign sign) const;

  // One of words; every accepted word is listed when it is not.
  template <class E>
  E word(const toml::node& n, Label label, std::span<const Word<E>> words,
         bool ignore_case = false) const {
    const std::string text = string(n, label);
    std::vector<std::string_view> texts;
    for (const Word<E>& w : words) {
      if (same_word(text, w.text, ignore_case)) return w.value;
      texts.push_back(w.text);
    }
    fail(n, unknown_word_message(label, text, texts, ignore_case));
  }

  // "must be above zero" and its kin; shown is the value as the file gave it.
  void check_sign(const toml::node& n, Label label, double value, Sign sign,
                  std::string_view shown) const;

 private:
  static bool same_word(std::string_view a, std::string_view b, bool ignore_case);
  static std::string unknown_word_message(Label label, std::string_view text,
                                          std::span<const std::string_view> accepted,
                                          bool ignore_case);

  std::string source_;
};

}  // namespace benchtau::design_toml
