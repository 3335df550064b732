// benchtau: reading a capture from delimited text: sniff, parse rows, build the Capture.
#include "drivers/csv_reader.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <fmt/format.h>

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstring>

#include "drivers/csv_dialect.h"
#include "drivers/csv_preamble.h"
#include "drivers/csv_rows.h"
#include "drivers/csv_units.h"
#include "drivers/file_chunks.h"
#include "drivers/median_step.h"
#include "src/core/input_error.h"

namespace benchtau {
namespace {

using csv::ColumnName;
using csv::Quantity;

class FileDescriptor {
 public:
  explicit FileDescriptor(int fd) : fd_(fd) {}
  FileDescriptor(const FileDescriptor&) = delete;
  FileDescriptor& operator=(const FileDescriptor&) = delete;
  ~FileDescriptor() {
    if (fd_ >= 0) ::close(fd_);
  }
  int get() const { return fd_; }

 private:
  int fd_;
};

std::string plural(std::size_t n, std::string_view one, std::string_view many) {
  return fmt::format("{} {}", n, n == 1 ? one : many);
}

// Which column holds time, and how sure we are of it.
struct TimeChoice {
  std::optional<std::size_t> column;
  bool inferred = false;  // a headerless first column that may turn out not to increase
  std::string note;       // why there is none, when the user said so
};

TimeChoice choose_time(const std::vector<ColumnName>& names, bool has_header,
                       const CsvOptions& options, const std::string& source) {
  TimeChoice choice;
  const std::string forced = csv::lower_ascii(csv::trim_blanks(options.time_column));
  const std::size_t columns = names.size();
  if (forced == "none") {
    choice.note = "The time column was set to none, so the samples are taken as evenly spaced.";
    return choice;
  }
  if (!forced.empty()) {
    const bool digits =
        std::all_of(forced.begin(), forced.end(), [](char c) { return c >= '0' && c <= '9'; });
    if (digits) {
      std::size_t index = 0;  // stays 0 when the number overflows
      std::from_chars(forced.data(), forced.data() + forced.size(), index);
      if (index < 1 || index > columns) {
        throw InputError(source, 0, 0,
                         fmt::format("time column {} does not exist: the file has {}", forced,
                                     plural(columns, "column", "columns")));
      }
      choice.column = index - 1;
    } else {
      if (!has_header) {
        throw InputError(source, 0, 0,
                         fmt::format("time column \"{}\" cannot be found by name: the file has no "
                                     "header; give its number instead",
                                     options.time_column));
      }
      for (std::size_t c = 0; c < columns && !choice.column; ++c) {
        if (csv::lower_ascii(names[c].name) == forced ||
            csv::lower_ascii(names[c].base) == forced) {
          choice.column = c;
        }
      }
      if (!choice.column) {
        std::string list;
        for (const auto& n : names)
          list += fmt::format("{}\"{}\"", list.empty() ? "" : ", ", n.name);
        throw InputError(source, 0, 0,
                         fmt::format("time column \"{}\" is not in the header; its columns are {}",
                                     options.time_column, list));
      }
    }
    const auto& n = names[*choice.column];
    if (n.quantity != Quantity::none && n.quantity != Quantity::time &&
        n.quantity != Quantity::other) {
      throw InputError(source, 0, 0,
                       fmt::format("time column \"{}\" is in {}, not in a unit of time",
                                   n.name.empty() ? options.time_column : n.name, n.unit));
    }
    return choice;
  }
  if (has_header) {
    for (std::size_t c = 0; c < columns && !choice.column; ++c) {
      if (names[c].quantity == Quantity::time) choice.column = c;
    }
    for (std::size_t c = 0; c < columns && !choice.column; ++c) {
      if (names[c].quantity == Quantity::none && csv::is_time_name(names[c].base))
        choice.column = c;
    }
    return choice;
  }
  if (columns >= 2) {
    choice.column = 0;
    choice.inferred = true;
  }
  return choice;
}

std::string column_title(const std::vector<ColumnName>& names, bool has_header, std::size_t c) {
  if (has_header && !names[c].name.empty()) return names[c].name;
  return fmt::format("column {}", c + 1);
}

void set_uniform_time(CsvResult& result, const CsvOptions& options, const csv::PreambleTiming& pre,
                      const std::string& no_time_why, const std::string& source) {
  TimeBase& time = result.capture.time;
  auto& notes = result.notes;
  if (options.rate_Hz) {
    time.dt_s = 1.0 / *options.rate_Hz;
    result.capture.time_origin = "--rate";
    notes.push_back(fmt::format("The samples are taken as {} s apart, from --rate {} Hz.",
                                time.dt_s, *options.rate_Hz));
    if (pre.interval_s || pre.rate_Hz) {
      notes.push_back(fmt::format("--rate overrides the sample {} on line {} of the preamble.",
                                  pre.interval_s ? "interval" : "rate",
                                  pre.interval_s ? pre.interval_line : pre.rate_line));
    }
  } else if (pre.interval_s) {
    time.dt_s = *pre.interval_s;
    result.capture.time_origin = "sample interval in the file's preamble";
    notes.push_back(
        fmt::format("The samples are taken as {} s apart, from the sample interval on line {}.",
                    time.dt_s, pre.interval_line));
    if (pre.rate_Hz && std::abs(*pre.rate_Hz * time.dt_s - 1.0) > 1e-6) {
      notes.push_back(
          fmt::format("The sample rate on line {} ({} Hz) disagrees with the sample "
                      "interval; the interval was used.",
                      pre.rate_line, *pre.rate_Hz));
    }
  } else if (pre.rate_Hz) {
    time.dt_s = 1.0 / *pre.rate_Hz;
    result.capture.time_origin = "sample rate in the file's preamble";
    notes.push_back(
        fmt::format("The samples are taken as {} s apart, from the sample rate of {} Hz on "
                    "line {}.",
                    time.dt_s, *pre.rate_Hz, pre.rate_line));
  } else {
    throw InputError(
        source, 0, 0,
        "no time column and no sample rate: give --rate (samples per second)" + no_time_why);
  }
}

CsvResult read_source(const csv::ByteSource& source, const std::string& name,
                      const CsvOptions& options) {
  if (options.rate_Hz && !(*options.rate_Hz > 0.0 && std::isfinite(*options.rate_Hz))) {
    throw InputError(name, 0, 0,
                     fmt::format("--rate must be a positive number of samples per second, not {}",
                                 *options.rate_Hz));
  }
  std::vector<char> scratch;
  const auto head = source.view(0, csv::sniff_bytes, scratch);
  csv::Sniffed sniffed = csv::sniff_dialect(head, head.size() == source.size(), name);
  const CsvDialect& dialect = sniffed.dialect;
  const std::size_t columns = sniffed.columns;

  std::vector<ColumnName> names(columns);
  for (std::size_t c = 0; c < columns && dialect.has_header; ++c) {
    names[c] = csv::parse_column_name(sniffed.header_cells[c]);
  }
  const TimeChoice time = choose_time(names, dialect.has_header, options, name);

  csv::RowLayout layout;
  layout.separator = dialect.separator;
  layout.decimal_comma = dialect.decimal_comma;
  layout.columns = columns;
  layout.fields_reference = dialect.has_header
                                ? fmt::format("the header on line {}", dialect.header_line)
                                : fmt::format("line {}", dialect.first_data_line);
  for (std::size_t c = 0; c < columns; ++c) {
    const bool titled = dialect.has_header && !names[c].name.empty();
    layout.labels.push_back(titled ? fmt::format("column \"{}\"", names[c].name)
                                   : fmt::format("column {}", c + 1));
    const bool is_time = time.column == c;
    const bool scaled = names[c].quantity != Quantity::other || is_time;
    layout.to_si.push_back(scaled ? names[c].to_si : 1.0);
  }
  if (time.column) {
    layout.watch = time.column;
    layout.watch_strict = !time.inferred;
    layout.watch_label = "time in " + layout.labels[*time.column];
  }

  const csv::PreambleTiming preamble = csv::read_preamble(sniffed.preamble, dialect);
  csv::ParsedRows rows = csv::parse_rows(source, sniffed.data_begin, dialect.first_data_line,
                                         layout, options.threads, name);
  std::string cut_short =
      rows.unterminated_line == 0
          ? std::string()
          : fmt::format(
                "line {} has no line end, as if the file were cut short, so it was not read",
                rows.unterminated_line);
  if (rows.rows == 0 && !cut_short.empty())
    throw InputError(name, 0, 0, "no data rows: " + cut_short);
  if (rows.rows == 0) {
    throw InputError(
        name, 0, 0,
        dialect.has_header
            ? fmt::format("no data rows: the header on line {} has no rows of numbers after it",
                          dialect.header_line)
            : std::string("no data rows"));
  }

  CsvResult result;
  result.dialect = dialect;
  result.notes = std::move(sniffed.notes);
  if (!cut_short.empty()) {
    cut_short[0] = 'L';
    result.notes.push_back(cut_short + " (a row cut short can read as a wrong number).");
  }
  Capture& capture = result.capture;
  capture.source = name;

  // An inferred time column must increase on every row of the file.
  constexpr std::size_t no_column = static_cast<std::size_t>(-1);
  std::size_t time_column = time.column.value_or(no_column);
  std::string no_time_why;
  if (time.inferred && (rows.watch_fail_line != 0 || rows.rows < 2)) {
    time_column = no_column;
    if (rows.watch_fail_line != 0) {
      no_time_why = fmt::format("; column 1 does not increase on line {}, so it is not time",
                                rows.watch_fail_line);
    }
  }
  if (!time.note.empty()) result.notes.push_back(time.note);

  if (time_column != no_column) {
    const std::size_t c = time_column;
    capture.time.t_s = std::move(rows.columns[c]);
    capture.time.t0_s = capture.time.t_s.front();
    capture.time.dt_s = csv::median_step(capture.time.t_s);
    const std::string title = column_title(names, dialect.has_header, c);
    if (time.inferred) {
      capture.time_origin = "column 1, taken as time in seconds";
      result.notes.push_back(
          "The file has no header and its first column increases on every row, so it was taken as "
          "time in seconds.");
    } else {
      capture.time_origin = fmt::format("time column \"{}\"", title);
      const auto& n = names[c];
      if (n.quantity == Quantity::time && n.to_si != 1.0) {
        result.notes.push_back(fmt::format(
            "Time is read from column \"{}\" in {} and converted to seconds.", title, n.unit));
      } else if (n.quantity != Quantity::time) {
        result.notes.push_back(fmt::format(
            "Time is read from column \"{}\", which gives no unit of time; it is taken as seconds.",
            title));
      }
    }
    if (options.rate_Hz) result.notes.push_back("--rate was ignored: the file has a time column.");
    const std::optional<double> pre_dt =
        preamble.interval_s
            ? preamble.interval_s
            : (preamble.rate_Hz ? std::optional<double>(1.0 / *preamble.rate_Hz) : std::nullopt);
    if (pre_dt && capture.time.dt_s > 0.0 && std::abs(*pre_dt / capture.time.dt_s - 1.0) > 1e-3) {
      result.notes.push_back(
          fmt::format("The preamble's sample {} (line {}) implies steps of {} s, but the time "
                      "column's median step "
                      "is {} s; the time column was used.",
                      preamble.interval_s ? "interval" : "rate",
                      preamble.interval_s ? preamble.interval_line : preamble.rate_line, *pre_dt,
                      capture.time.dt_s));
    }
  } else {
    set_uniform_time(result, options, preamble, no_time_why, name);
  }
  for (auto& n : preamble.notes) result.notes.push_back(n);

  for (std::size_t c = 0; c < columns; ++c) {
    if (time_column == c) continue;
    Channel ch;
    ch.name = column_title(names, dialect.has_header, c);
    ch.unit = names[c].si_unit;
    ch.column = c + 1;
    ch.values = std::move(rows.columns[c]);
    ch.missing = rows.gaps[c].missing;
    ch.first_missing_line = rows.gaps[c].first_line;
    if (names[c].quantity == Quantity::other) {
      result.notes.push_back(
          fmt::format("Column \"{}\" is in \"{}\", a unit benchtau does not know; its values are "
                      "kept as written.",
                      ch.name, names[c].unit));
    } else if (names[c].to_si != 1.0) {
      result.notes.push_back(fmt::format("Column \"{}\" is in {}; its values were converted to {}.",
                                         ch.name, names[c].unit, names[c].si_unit));
    }
    if (ch.missing > 0) {
      result.notes.push_back(fmt::format(
          "Column \"{}\" has {} (empty or NaN), the first on line {}; they are kept as gaps, not "
          "filled in.",
          ch.name, plural(ch.missing, "missing value", "missing values"), ch.first_missing_line));
    }
    capture.channels.push_back(std::move(ch));
  }
  if (capture.channels.empty()) {
    throw InputError(name, 0, 0,
                     fmt::format("no signal columns: the only column is the time column \"{}\"",
                                 column_title(names, dialect.has_header, time_column)));
  }
  return result;
}

}  // namespace

CsvResult read_csv_text(std::string_view text, const std::string& source,
                        const CsvOptions& options) {
  const auto bytes = csv::ByteSource::memory(std::span<const char>(text.data(), text.size()));
  return read_source(bytes, source, options);
}

CsvResult read_csv_file(const std::string& path, const CsvOptions& options) {
  if (path == "-") {
    const std::string text = csv::read_all(STDIN_FILENO, "<stdin>");
    return read_csv_text(text, "<stdin>", options);
  }
  const FileDescriptor fd(::open(path.c_str(), O_RDONLY | O_CLOEXEC));
  if (fd.get() < 0)
    throw InputError(path, 0, 0, std::string("cannot open: ") + std::strerror(errno));
  struct stat st {};
  if (::fstat(fd.get(), &st) != 0) {
    throw InputError(path, 0, 0, std::string("cannot open: ") + std::strerror(errno));
  }
  if (S_ISDIR(st.st_mode))
    throw InputError(path, 0, 0, std::string("cannot open: ") + std::strerror(EISDIR));
  if (!S_ISREG(st.st_mode)) {
    const std::string text = csv::read_all(fd.get(), path);
    return read_csv_text(text, path, options);
  }
  ::posix_fadvise(fd.get(), 0, 0, POSIX_FADV_SEQUENTIAL);
  const auto bytes = csv::ByteSource::file(fd.get(), static_cast<std::size_t>(st.st_size), path);
  return read_source(bytes, path, options);
}

}  // namespace benchtau
