// benchtau: sniffing separator, decimal mark, header and preamble from a file's head.
#include "drivers/csv_dialect.h"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cstring>
#include <optional>

#include "drivers/csv_cell.h"
#include "drivers/csv_units.h"
#include "src/core/input_error.h"

namespace benchtau::csv {
namespace {

enum class LineKind { blank, comment, content };

struct Line {
  std::size_t number = 0;
  std::size_t offset = 0;
  std::string_view text;  // without the line end
  LineKind kind = LineKind::blank;
};

struct Candidate {
  char separator;
  bool decimal_comma;
};

// In order of preference when two read a sample equally well.
constexpr std::array<Candidate, 7> candidates{{
    {',', false},
    {';', false},
    {';', true},
    {'\t', false},
    {'\t', true},
    {' ', false},
    {' ', true},
}};

bool is_blank(char c) { return c == ' ' || c == '\t'; }

std::string_view comment_body(std::string_view text) {
  text = trim_blanks(text);
  if (text.starts_with("//")) {
    text.remove_prefix(2);
  } else {
    while (!text.empty() && (text.front() == '#' || text.front() == '%')) text.remove_prefix(1);
  }
  return trim_blanks(text);
}

LineKind classify(std::string_view text) {
  const auto t = trim_blanks(text);
  if (t.empty()) return LineKind::blank;
  if (t.front() == '#' || t.front() == '%' || t.starts_with("//")) return LineKind::comment;
  return LineKind::content;
}

void check_text(std::span<const char> head, const std::string& source) {
  if (head.size() >= 2 && ((static_cast<unsigned char>(head[0]) == 0xFF &&
                            static_cast<unsigned char>(head[1]) == 0xFE) ||
                           (static_cast<unsigned char>(head[0]) == 0xFE &&
                            static_cast<unsigned char>(head[1]) == 0xFF))) {
    throw InputError(source, 0, 0,
                     "not a text file benchtau can read: it is UTF-16; save it as UTF-8");
  }
  if (std::memchr(head.data(), '\0', head.size()) != nullptr) {
    throw InputError(source, 0, 0, "not a text file: it holds NUL bytes");
  }
  std::size_t control = 0;
  for (const char ch : head) {
    const auto c = static_cast<unsigned char>(ch);
    if ((c < 0x20 && c != '\t' && c != '\n' && c != '\r' && c != '\f' && c != '\v') || c == 0x7F)
      ++control;
  }
  if (control > 8 && control * 200 > head.size()) {
    throw InputError(source, 0, 0, "not a text file: it holds control bytes");
  }
  const bool has_lf = std::memchr(head.data(), '\n', head.size()) != nullptr;
  const bool has_cr = std::memchr(head.data(), '\r', head.size()) != nullptr;
  if (has_cr && !has_lf) {
    throw InputError(
        source, 0, 0,
        "its lines end with a bare carriage return; save it with LF or CRLF line ends");
  }
}

std::vector<Line> split_lines(std::span<const char> head, std::size_t start, bool whole) {
  std::vector<Line> lines;
  std::size_t pos = start;
  std::size_t number = 1;
  while (pos < head.size()) {
    const void* nl = std::memchr(head.data() + pos, '\n', head.size() - pos);
    if (nl == nullptr && !whole) break;  // cut off by the sniff window
    const std::size_t end =
        nl == nullptr ? head.size()
                      : static_cast<std::size_t>(static_cast<const char*>(nl) - head.data());
    std::string_view text(head.data() + pos, end - pos);
    if (!text.empty() && text.back() == '\r') text.remove_suffix(1);
    lines.push_back({number, pos, text, classify(text)});
    pos = end + 1;
    ++number;
  }
  return lines;
}

struct Evaluation {
  bool found = false;
  std::size_t start = 0;       // index into lines of the first data line
  std::size_t modal_line = 0;  // index of the first line with the modal count
  std::size_t raw_fields = 0;  // the modal field count
  std::size_t score = 0;       // data lines with that count
  bool trailing_all = false;
};

struct LineRead {
  bool data = false;
  bool starts_with_number = false;  // a row with a bad cell, rather than metadata
  std::size_t fields = 0;
  bool trailing_empty = false;
};

LineRead read_line(std::string_view text, Candidate d, std::vector<std::string_view>& fields) {
  split_fields(text, d.separator, fields);
  LineRead r;
  r.fields = fields.size();
  bool any_number = false;
  bool all_numbers = true;
  for (std::size_t i = 0; i < fields.size(); ++i) {
    // Numbers out of range are still numbers here; the row parser reports them.
    const auto kind = parse_cell(fields[i], d.decimal_comma).kind;
    const bool number =
        kind == CellKind::number || kind == CellKind::out_of_range || kind == CellKind::infinite;
    if (i == 0) r.starts_with_number = number;
    any_number = any_number || number;
    all_numbers = all_numbers && (number || is_missing(kind));
  }
  r.data = any_number && all_numbers;
  r.trailing_empty = d.separator != ' ' && fields.size() >= 2 && trim_blanks(fields.back()).empty();
  return r;
}

Evaluation evaluate(const std::vector<Line>& lines, Candidate d) {
  std::vector<LineRead> reads(lines.size());
  std::vector<std::string_view> fields;
  std::vector<std::pair<std::size_t, std::size_t>> tally;  // field count, lines; in order seen
  std::size_t header_fields = 0;  // of the line above the first row, when it is not one
  std::size_t previous_content = lines.size();
  for (std::size_t i = 0; i < lines.size(); ++i) {
    if (lines[i].kind != LineKind::content) continue;
    reads[i] = read_line(lines[i].text, d, fields);
    if (!reads[i].data) {
      previous_content = i;
      continue;
    }
    if (tally.empty() && previous_content < lines.size()) {
      split_fields(lines[previous_content].text, d.separator, fields);
      header_fields = fields.size();
      if (fields.size() >= 2 && trim_blanks(fields.back()).empty()) --header_fields;
    }
    auto it = std::find_if(tally.begin(), tally.end(),
                           [&](const auto& t) { return t.first == reads[i].fields; });
    if (it == tally.end()) {
      tally.emplace_back(reads[i].fields, 1);
    } else {
      ++it->second;
    }
  }
  Evaluation e;
  if (tally.empty()) return e;
  // The most common field count; a tie goes to the header's count, else to
  // the count seen first, so that the odd row out is the one reported.
  auto modal = tally.front();
  for (const auto& t : tally) {
    const bool fits_header = t.first == header_fields || t.first == header_fields + 1;
    const bool modal_fits = modal.first == header_fields || modal.first == header_fields + 1;
    if (t.second > modal.second || (t.second == modal.second && fits_header && !modal_fits)) {
      modal = t;
    }
  }
  e.found = true;
  e.raw_fields = modal.first;
  e.score = modal.second;
  e.trailing_all = true;
  bool seen = false;
  for (std::size_t i = 0; i < lines.size(); ++i) {
    if (!reads[i].data || reads[i].fields != e.raw_fields) continue;
    if (!seen) e.modal_line = i;
    seen = true;
    e.trailing_all = e.trailing_all && reads[i].trailing_empty;
  }
  // Rows just above the first regular one belong to the data when they start
  // with a number: they are ragged or bad rows to report, not metadata to skip.
  e.start = e.modal_line;
  for (std::size_t i = e.modal_line; i-- > 0;) {
    if (lines[i].kind != LineKind::content) continue;
    if (!reads[i].data && !reads[i].starts_with_number) break;
    e.start = i;
  }
  return e;
}

bool better(const Evaluation& a, const Evaluation& b) {
  if (!b.found) return a.found;
  if (!a.found) return false;
  if (a.score != b.score) return a.score > b.score;
  return a.raw_fields > b.raw_fields;
}

// Header cells for a blank-separated file, where names may hold spaces ("t (ms)").
std::vector<std::string_view> split_blank_header(std::string_view text, std::size_t want) {
  std::vector<std::string_view> words;
  split_fields(text, ' ', words);
  std::vector<std::string_view> merged;
  for (const auto w : words) {
    if (!merged.empty() && (w.front() == '(' || w.front() == '[')) {
      const char* begin = merged.back().data();
      merged.back() =
          std::string_view(begin, static_cast<std::size_t>(w.data() + w.size() - begin));
    } else {
      merged.push_back(w);
    }
  }
  if (merged.size() == want) return merged;
  std::vector<std::string_view> by_tab;
  split_fields(text, '\t', by_tab);
  if (by_tab.size() == want) return by_tab;
  // Columns set apart by two or more blanks.
  std::vector<std::string_view> wide;
  const auto t = trim_blanks(text);
  std::size_t begin = 0;
  for (std::size_t i = 0; i + 1 < t.size(); ++i) {
    if (is_blank(t[i]) && is_blank(t[i + 1])) {
      wide.push_back(trim_blanks(t.substr(begin, i - begin)));
      while (i < t.size() && is_blank(t[i])) ++i;
      begin = i;
    }
  }
  wide.push_back(trim_blanks(t.substr(begin)));
  if (wide.size() == want) return wide;
  return merged;
}

// The cells of a line if it can be the header of rows of want fields.
std::optional<std::vector<std::string>> header_cells(std::string_view text, Candidate d,
                                                     std::size_t raw_fields, bool trailing_all) {
  std::vector<std::string_view> cells;
  if (d.separator == ' ') {
    cells = split_blank_header(text, raw_fields);
  } else {
    split_fields(text, d.separator, cells);
    if (cells.size() >= 2 && trim_blanks(cells.back()).empty()) cells.pop_back();
  }
  const bool fits = cells.size() == raw_fields || (trailing_all && cells.size() + 1 == raw_fields);
  if (!fits) return std::nullopt;
  bool letter = false;
  std::vector<std::string> out;
  for (const auto c : cells) {
    const auto kind = parse_cell(c, d.decimal_comma).kind;
    if (kind != CellKind::text && kind != CellKind::empty) return std::nullopt;
    letter = letter || std::any_of(c.begin(), c.end(), [](char ch) {
               return (ch >= 'A' && ch <= 'Z') || (ch >= 'a' && ch <= 'z') ||
                      static_cast<unsigned char>(ch) >= 0x80;
             });
    out.emplace_back(trim_blanks(c));
  }
  if (!letter) return std::nullopt;
  return out;
}

// Why a head holds no rows: nothing, only a header, or no numbers at all.
std::string why_no_rows(const std::vector<Line>& lines, bool whole) {
  const Line* last = nullptr;
  for (const auto& l : lines) {
    if (l.kind == LineKind::content) last = &l;
  }
  std::string why;
  if (last == nullptr) {
    why = "the file holds no lines of data";
  } else {
    // A last line of several names reads as a header with nothing under it.
    std::vector<std::string_view> cells;
    bool header = false;
    for (const char sep : {',', ';', '\t'}) {
      split_fields(last->text, sep, cells);
      header =
          header || (cells.size() >= 2 && std::all_of(cells.begin(), cells.end(), [](auto cell) {
                       return parse_cell(cell, false).kind == CellKind::text ||
                              trim_blanks(cell).empty();
                     }));
    }
    why = header ? fmt::format("line {} looks like a header, but no rows of numbers follow it",
                               last->number)
                 : "found no line of numbers";
  }
  if (!whole) why += fmt::format(" in the first {} KiB", sniff_bytes / 1024);
  return why;
}

std::string describe(const CsvDialect& d) {
  std::string kind;
  switch (d.separator) {
    case ',':
      kind = "comma-separated";
      break;
    case ';':
      kind = "semicolon-separated";
      break;
    case '\t':
      kind = "tab-separated";
      break;
    default:
      kind = "blank-separated";
  }
  kind += d.decimal_comma ? " values with decimal commas" : " values";
  if (d.has_header)
    return fmt::format("Read as {}, with the header on line {}.", kind, d.header_line);
  return fmt::format("Read as {}, with no header; the data starts on line {}.", kind,
                     d.first_data_line);
}

}  // namespace

void split_fields(std::string_view line, char separator, std::vector<std::string_view>& out) {
  out.clear();
  const std::size_t n = line.size();
  if (separator == ' ') {
    std::size_t i = 0;
    while (true) {
      while (i < n && is_blank(line[i])) ++i;
      if (i >= n) return;
      const std::size_t begin = i;
      while (i < n && !is_blank(line[i])) ++i;
      out.push_back(line.substr(begin, i - begin));
    }
  }
  std::size_t begin = 0;
  bool quoted = false;
  for (std::size_t i = 0; i < n; ++i) {
    const char c = line[i];
    if (c == '"') {
      quoted = !quoted;  // a doubled quote toggles twice
    } else if (c == separator && !quoted) {
      out.push_back(line.substr(begin, i - begin));
      begin = i + 1;
    }
  }
  out.push_back(line.substr(begin));
}

Sniffed sniff_dialect(std::span<const char> head, bool whole, const std::string& source) {
  Sniffed s;
  if (head.empty()) throw InputError(source, 0, 0, "no data rows: the file is empty");
  std::size_t start = 0;
  if (head.size() >= 3 && static_cast<unsigned char>(head[0]) == 0xEF &&
      static_cast<unsigned char>(head[1]) == 0xBB && static_cast<unsigned char>(head[2]) == 0xBF) {
    start = 3;
    s.bom = true;
  }
  check_text(head, source);
  const auto lines = split_lines(head, start, whole);
  if (lines.empty() && !whole) {
    throw InputError(
        source, 1, 0,
        fmt::format("longer than {} KiB without a line end; a capture's rows are short (at "
                    "most {} columns)",
                    sniff_bytes / 1024, max_columns));
  }

  Candidate best_d = candidates[0];
  Evaluation best;
  for (const auto d : candidates) {
    const auto e = evaluate(lines, d);
    if (better(e, best)) {
      best = e;
      best_d = d;
    }
  }
  if (!best.found) {
    throw InputError(source, 0, 0, "no data rows: " + why_no_rows(lines, whole));
  }
  if (best.raw_fields > max_columns) {
    throw InputError(source, lines[best.modal_line].number, 0,
                     fmt::format("found {} fields; benchtau reads at most {} columns",
                                 best.raw_fields, max_columns));
  }

  CsvDialect& dialect = s.dialect;
  dialect.separator = best_d.separator;
  dialect.decimal_comma = best_d.decimal_comma;
  dialect.first_data_line = lines[best.start].number;
  s.data_begin = lines[best.start].offset;
  s.columns = best.trailing_all ? best.raw_fields - 1 : best.raw_fields;
  s.trailing_separator = best.trailing_all;

  // The header is the content line just above the data, or failing that a
  // comment line there ("# t, out").
  std::size_t header_index = best.start;  // none
  for (std::size_t i = best.start; i-- > 0;) {
    if (lines[i].kind == LineKind::blank) continue;
    const bool comment = lines[i].kind == LineKind::comment;
    const std::string_view text = comment ? comment_body(lines[i].text) : lines[i].text;
    const bool key_value = comment && text.find_first_of(":=") != std::string_view::npos;
    auto cells =
        key_value ? std::nullopt : header_cells(text, best_d, best.raw_fields, best.trailing_all);
    // A lone word in a comment is a remark, not a one-column header.
    if (cells && comment && cells->size() < 2) cells.reset();
    if (cells) {
      header_index = i;
      s.header_cells = std::move(*cells);
      s.columns = s.header_cells.size();
      s.trailing_separator = s.columns + 1 == best.raw_fields;
      break;
    }
    if (!comment) {
      std::vector<std::string_view> f;
      split_fields(text, best_d.separator, f);
      if (f.size() >= 2) {
        s.notes.push_back(fmt::format(
            "Line {} was read as metadata, not as the header: it has {} fields and the data {}.",
            lines[i].number, f.size(), best.raw_fields));
      }
      break;
    }
  }
  dialect.has_header = header_index != best.start;
  dialect.header_line = dialect.has_header ? lines[header_index].number : 0;

  const std::size_t preamble_end = dialect.has_header ? header_index : best.start;
  for (std::size_t i = 0; i < best.start; ++i) {
    const auto& l = lines[i];
    if (l.kind == LineKind::blank || i == header_index) continue;
    if (i < preamble_end) ++dialect.preamble_lines;
    const bool comment = l.kind == LineKind::comment;
    s.preamble.push_back({l.number, std::string(comment ? comment_body(l.text) : l.text), comment});
  }

  s.notes.insert(s.notes.begin(), describe(dialect));
  if (s.bom) s.notes.push_back("The file starts with a UTF-8 byte-order mark; it was skipped.");
  if (s.trailing_separator) {
    s.notes.push_back("The rows end with a separator; the empty field after it was dropped.");
  }
  return s;
}

}  // namespace benchtau::csv
