// benchtau: the row parser's hot loop: from_chars straight into the columns.
#include "drivers/csv_part.h"

#include <fmt/format.h>

#include <array>
#include <charconv>
#include <cmath>
#include <cstring>
#include <stdexcept>
#include <system_error>

#include "drivers/csv_cell.h"
#include "drivers/csv_dialect.h"
#include "drivers/csv_units.h"
#include "drivers/fast_decimal.h"

namespace benchtau::csv {
namespace {

constexpr double nan_value = std::numeric_limits<double>::quiet_NaN();

// How a cell looks in a message: at most 40 bytes, control bytes escaped.
std::string shown(std::string_view cell) {
  constexpr std::size_t limit = 40;
  bool cut = false;
  if (cell.size() > limit) {
    std::size_t n = limit;
    while (n > 0 && (static_cast<unsigned char>(cell[n]) & 0xC0) == 0x80) --n;  // whole UTF-8 chars
    cell = cell.substr(0, n);
    cut = true;
  }
  std::string out;
  for (const char ch : cell) {
    const auto c = static_cast<unsigned char>(ch);
    if (c < 0x20 || c == 0x7F) {
      out += fmt::format("\\x{:02X}", c);
    } else {
      out += ch;
    }
  }
  return cut ? out + "..." : out;
}

template <char Sep, bool DecimalComma>
class PartParser {
 public:
  PartParser(const RowLayout& layout, const PartTarget& target, const std::string& name,
             std::size_t first_line, std::atomic<std::size_t>& stop_line, PartOutput& out)
      : layout_(layout),
        target_(target),
        name_(name),
        line_(first_line),
        stop_line_(stop_line),
        out_(out),
        columns_(layout.columns),
        watch_column_(layout.watch.value_or(static_cast<std::size_t>(-1))) {
    out_.gaps.assign(columns_, {});
  }

  // Parses a span of whole lines, which must end in '\n': that final byte
  // stops every scan for blanks and digits, so they need no bounds checks.
  // Returns false when it gave up because an earlier error is known.
  bool block(std::span<const char> bytes) {
    const char* p = bytes.data();
    const char* const end = p + bytes.size();
    std::size_t until_check = check_every;
    while (p < end) {
      if (--until_check == 0) {
        until_check = check_every;
        if (stop_line_.load(std::memory_order_relaxed) < line_) return false;
      }
      if constexpr (kPlainRows) {
        if (const char* next = plain_row(p, end)) {
          p = next;
          ++line_;
          continue;
        }
      }
      const char* line_begin = p;
      const char* q = p;
      while (is_pad(*q)) ++q;
      if (q == end) return true;  // blanks and then the end of the file
      const char c = *q;
      if (c == '\n' || (c == '\r' && (q + 1 == end || q[1] == '\n'))) {
        p = skip_line_end(q, end);
        ++line_;
        continue;
      }
      if (c == '#' || c == '%' || (c == '/' && q + 1 < end && q[1] == '/')) {
        const void* nl = std::memchr(q, '\n', static_cast<std::size_t>(end - q));
        p = nl == nullptr ? end : static_cast<const char*>(nl) + 1;
        ++line_;
        continue;
      }
      p = row(line_begin, q, end);
      ++line_;
    }
    return true;
  }

  std::size_t line() const { return line_; }

  // Whether a line (without its end) holds only blanks or a comment.
  static bool blank_or_comment(std::span<const char> text) {
    const char* q = text.data();
    const char* end = q + text.size();
    while (q < end && (*q == ' ' || *q == '\t' || *q == '\r')) ++q;
    return q == end || *q == '#' || *q == '%' || (*q == '/' && q + 1 < end && q[1] == '/');
  }

 private:
  static constexpr std::size_t check_every = 1 << 16;

  // The commonest row of all: numbers the short-decimal path takes, one
  // separator and no blanks between them, and '\n' at the end. Such a row is
  // read by plain_row with one test per cell; any other line, or a row whose
  // watched column fails, goes the general way, which reads the same row the
  // same way (a test parses files both ways).
  static constexpr bool kPlainRows = !DecimalComma && Sep != ' ';
  static constexpr std::size_t kPlainMaxColumns = 8;

  // The next line's start, or nullptr (nothing written) for the general path.
  const char* plain_row(const char* p, const char* end) {
    const std::size_t r = out_.rows;
    if (columns_ > kPlainMaxColumns || r >= target_.capacity) return nullptr;
    std::array<double, kPlainMaxColumns> v;
    const char* watch_at = nullptr;
    const char* q = p;
    for (std::size_t c = 0; c < columns_; ++c) {
      if (c == watch_column_) watch_at = q;
      if (!parse_short_decimal<false>(q, end, v[c])) return nullptr;
      if (*q != (c + 1 < columns_ ? Sep : '\n')) return nullptr;
      ++q;
    }
    if (watch_at != nullptr) {
      const double t = v[watch_column_] * layout_.to_si[watch_column_];
      if (!(r == 0 ? !std::isnan(t) : t > out_.last_watch)) return nullptr;
      if (r == 0) {
        out_.first_watch = t;
        out_.first_row_column = static_cast<std::size_t>(watch_at - p) + 1;
      }
      out_.last_watch = t;
    }
    for (std::size_t c = 0; c < columns_; ++c) target_.columns[c][r] = v[c] * layout_.to_si[c];
    if (r == 0) out_.first_row_line = line_;
    out_.rows = r + 1;
    return q;
  }

  static bool is_pad(char c) {
    if constexpr (Sep == '\t') {
      return c == ' ';
    } else {
      return c == ' ' || c == '\t';
    }
  }
  static bool is_eol(const char* q, const char* end) {
    return q == end || *q == '\n' || (*q == '\r' && (q + 1 == end || q[1] == '\n'));
  }
  static const char* skip_line_end(const char* q, const char* end) {
    if (q < end && *q == '\r') ++q;
    if (q < end && *q == '\n') ++q;
    return q;
  }
  // Where the cell starting at q ends: at the next separator outside quotes,
  // or at the line end.
  static const char* cell_end(const char* q, const char* end) {
    bool quoted = false;
    while (q < end && !is_eol(q, end)) {
      if constexpr (Sep == ' ') {
        if (*q == ' ' || *q == '\t') break;
      } else {
        if (*q == '"') quoted = !quoted;
        if (*q == Sep && !quoted) break;
      }
      ++q;
    }
    return q;
  }

  const char* row(const char* line_begin, const char* q, const char* const end) {
    const std::size_t r = out_.rows;
    if (r >= target_.capacity) throw std::logic_error("csv: more rows than lines counted");
    const char* watch_at = nullptr;
    for (std::size_t c = 0; c < columns_; ++c) {
      while (is_pad(*q)) ++q;
      const char* const field = q;
      double v = nan_value;
      bool ok = false;
      if constexpr (!DecimalComma) {
        // The common case: a plain number, then a separator or the line end.
        // It is always finite, so no branch here waits for its division.
        const char* ptr = q;
        if (parse_short_decimal<false>(ptr, end, v)) ok = ends_cell(ptr, end, q);
      }
      if (!ok) v = other_cell(line_begin, field, q, end, c);
      target_.columns[c][r] = v * layout_.to_si[c];
      if (c == watch_column_) watch_at = field;

      // Now q is at this cell's separator or the line end.
      if (c + 1 < columns_) {
        if constexpr (Sep == ' ') {
          while (q < end && (*q == ' ' || *q == '\t')) ++q;
          if (is_eol(q, end)) wrong_count(line_begin, end);
        } else {
          if (q < end && *q == Sep) {
            ++q;
          } else {
            wrong_count(line_begin, end);
          }
        }
      }
    }
    // The end of the row: one trailing separator before the line end is dropped.
    if constexpr (Sep == ' ') {
      while (q < end && (*q == ' ' || *q == '\t')) ++q;
    } else {
      if (q < end && *q == Sep) {
        const char* t = q + 1;
        while (is_pad(*t)) ++t;
        if (is_eol(t, end)) q = t;
      }
    }
    if (!is_eol(q, end)) wrong_count(line_begin, end);
    if (watch_at != nullptr) watch(line_begin, watch_at, r);
    if (r == 0) out_.first_row_line = line_;
    out_.rows = r + 1;
    return skip_line_end(q, end);
  }

  // Whether a number that ended at ptr ends its cell; if so, q moves to the
  // separator or line end after it.
  static bool ends_cell(const char* ptr, const char* end, const char*& q) {
    const char* after = ptr;
    if constexpr (Sep != ' ') {
      while (is_pad(*after)) ++after;
    }
    if (after == end || *after == Sep || is_eol(after, end) || (Sep == ' ' && *after == '\t')) {
      q = after;
      return true;
    }
    return false;
  }

  // Any other cell: a number only std::from_chars reads, a gap, or an error.
  // Moves q to the separator or line end after the cell.
  double other_cell(const char* line_begin, const char* field, const char*& q, const char* end,
                    std::size_t c) {
    double v = nan_value;
    if constexpr (!DecimalComma) {
      const auto lib = std::from_chars(q, end, v);
      if (lib.ec == std::errc() && lib.ptr != q && std::isfinite(v) && ends_cell(lib.ptr, end, q)) {
        return v;
      }
    }
    const char* stop = cell_end(q, end);
    const auto cell =
        parse_cell(std::string_view(q, static_cast<std::size_t>(stop - q)), DecimalComma);
    if (cell.kind == CellKind::number) {
      v = cell.value;
    } else if (is_missing(cell.kind)) {
      v = nan_value;
      auto& g = out_.gaps[c];
      if (g.missing++ == 0) g.first_line = line_;
    } else {
      bad_cell(line_begin, field, stop, c, cell.kind);
    }
    q = stop;
    if constexpr (Sep != ' ') {
      while (is_pad(*q)) ++q;
    }
    return v;
  }

  void watch(const char* line_begin, const char* field, std::size_t r) {
    const double v = target_.columns[*layout_.watch][r];
    const bool rises = r == 0 ? !std::isnan(v) : v > out_.last_watch;
    if (r == 0) {
      out_.first_watch = v;
      out_.first_row_column = static_cast<std::size_t>(field - line_begin) + 1;
    }
    if (!rises && out_.watch_fail_line == 0) {
      if (layout_.watch_strict) {
        const auto column = static_cast<std::size_t>(field - line_begin) + 1;
        if (std::isnan(v)) fail(column, fmt::format("{} is missing", layout_.watch_label));
        fail(column, fmt::format("{} does not increase: {} s after {} s", layout_.watch_label, v,
                                 out_.last_watch));
      }
      out_.watch_fail_line = line_;
    }
    out_.last_watch = v;
  }

  [[noreturn]] void fail(std::size_t column, std::string message) {
    throw InputError(name_, line_, column, std::move(message));
  }

  [[noreturn]] __attribute__((noinline)) void bad_cell(const char* line_begin, const char* field,
                                                       const char* stop, std::size_t c,
                                                       CellKind kind) {
    const auto column = static_cast<std::size_t>(field - line_begin) + 1;
    const std::string_view cell =
        trim_blanks(std::string_view(field, static_cast<std::size_t>(stop - field)));
    const std::string& label = layout_.labels[c];
    if (cell.find('\0') != std::string_view::npos) {
      fail(column, fmt::format("found a NUL byte in {}: this is not a text file", label));
    }
    if (kind == CellKind::out_of_range) {
      fail(column, fmt::format("the number in {} is out of range: \"{}\"", label, shown(cell)));
    }
    if (kind == CellKind::infinite) {
      fail(column, fmt::format("expected a finite number in {}, found \"{}\"", label, shown(cell)));
    }
    fail(column, fmt::format("expected a number in {}, found \"{}\"", label, shown(cell)));
  }

  [[noreturn]] __attribute__((noinline)) void wrong_count(const char* line_begin, const char* end) {
    // Count the fields, but no further than one past the widest row we read.
    std::size_t fields = 1;
    const char* q = line_begin;
    if constexpr (Sep == ' ') {
      fields = 0;
      while (!is_eol(q, end) && fields <= max_columns) {
        while (q < end && (*q == ' ' || *q == '\t')) ++q;
        if (is_eol(q, end)) break;
        ++fields;
        q = cell_end(q, end);
      }
    } else {
      while (!is_eol(q, end) && fields <= max_columns) {
        q = cell_end(q, end);
        if (q < end && *q == Sep) {
          ++fields;
          ++q;
        } else {
          break;
        }
      }
    }
    const std::string found =
        fields > max_columns ? fmt::format("more than {}", max_columns) : fmt::format("{}", fields);
    fail(0, fmt::format("expected {} fields like {}, found {}", columns_, layout_.fields_reference,
                        found));
  }

  const RowLayout& layout_;
  const PartTarget& target_;
  const std::string& name_;
  std::size_t line_;
  std::atomic<std::size_t>& stop_line_;
  PartOutput& out_;
  std::size_t columns_;
  std::size_t watch_column_;  // -1 for none
};

template <char Sep, bool DecimalComma>
void run(const ByteSource& source, std::size_t begin, std::size_t end, std::size_t first_line,
         const RowLayout& layout, const PartTarget& target, const std::string& name,
         std::atomic<std::size_t>& stop_line, PartOutput& out) {
  PartParser<Sep, DecimalComma> parser(layout, target, name, first_line, stop_line, out);
  LineBlocks blocks(source, begin, end);
  while (true) {
    if (stop_line.load(std::memory_order_relaxed) < first_line) return;
    auto bytes = blocks.next();
    if (bytes.empty()) return;
    // The file's last line without a line end is held back: see unterminated_line.
    std::span<const char> tail;
    if (blocks.done() && end == source.size() && bytes.back() != '\n') {
      const void* nl = ::memrchr(bytes.data(), '\n', bytes.size());
      const std::size_t keep =
          nl == nullptr ? 0
                        : static_cast<std::size_t>(static_cast<const char*>(nl) - bytes.data()) + 1;
      tail = bytes.subspan(keep);
      bytes = bytes.first(keep);
    }
    // Every span parsed ends in '\n', which lets the digit loops run unchecked.
    if (!bytes.empty() && bytes.back() != '\n')
      throw std::logic_error("csv: a block without a line end");
    if (!parser.block(bytes)) return;
    if (!tail.empty() && !parser.blank_or_comment(tail)) out.unterminated_line = parser.line();
    if (blocks.done()) return;
  }
}

}  // namespace

void parse_part(const ByteSource& source, std::size_t begin, std::size_t end,
                std::size_t first_line, const RowLayout& layout, const PartTarget& target,
                const std::string& name, std::atomic<std::size_t>& stop_line, PartOutput& out) {
  try {
    const char sep = layout.separator;
    if (layout.decimal_comma) {
      if (sep == ';')
        run<';', true>(source, begin, end, first_line, layout, target, name, stop_line, out);
      if (sep == '\t')
        run<'\t', true>(source, begin, end, first_line, layout, target, name, stop_line, out);
      if (sep == ' ')
        run<' ', true>(source, begin, end, first_line, layout, target, name, stop_line, out);
      if (sep == ',') throw std::logic_error("csv: decimal commas with comma separators");
    } else {
      if (sep == ',')
        run<',', false>(source, begin, end, first_line, layout, target, name, stop_line, out);
      if (sep == ';')
        run<';', false>(source, begin, end, first_line, layout, target, name, stop_line, out);
      if (sep == '\t')
        run<'\t', false>(source, begin, end, first_line, layout, target, name, stop_line, out);
      if (sep == ' ')
        run<' ', false>(source, begin, end, first_line, layout, target, name, stop_line, out);
    }
  } catch (const InputError& e) {
    if (e.line() == 0) throw;  // not about a row: a read failure
    out.error = e;
    std::size_t seen = stop_line.load();
    while (e.line() < seen && !stop_line.compare_exchange_weak(seen, e.line())) {
    }
  }
}

}  // namespace benchtau::csv
