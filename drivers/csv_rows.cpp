// benchtau: splitting the data rows into parts, parsing them side by side, joining them.
#include "drivers/csv_rows.h"

#include <sys/mman.h>

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdint>
#include <exception>
#include <functional>
#include <limits>
#include <optional>
#include <thread>

#include "drivers/csv_part.h"

namespace benchtau::csv {
namespace {

// Runs job(0) ... job(jobs - 1) on workers threads, each taking the next job
// not yet taken, so that a thread that gets less of a busy machine simply does
// fewer. An exception from any job is rethrown here, the lowest-numbered first.
void run_parts(unsigned jobs, unsigned workers, const std::function<void(unsigned)>& job) {
  if (workers <= 1 || jobs <= 1) {
    for (unsigned k = 0; k < jobs; ++k) job(k);
    return;
  }
  std::vector<std::exception_ptr> failures(jobs);
  std::atomic<unsigned> next{0};
  {
    std::vector<std::jthread> threads;
    threads.reserve(workers);
    for (unsigned w = 0; w < std::min(workers, jobs); ++w) {
      threads.emplace_back([&] {
        for (unsigned k = next++; k < jobs; k = next++) {
          try {
            job(k);
          } catch (...) {
            failures[k] = std::current_exception();
          }
        }
      });
    }
  }
  for (const auto& f : failures) {
    if (f) std::rethrow_exception(f);
  }
}

// Sizes a column, asking for huge pages first: faulting in a few hundred
// megabytes 4 KiB at a time costs more than the zero-filling itself.
void allocate_column(std::vector<double>& column, std::size_t n) {
  column.reserve(n);
#if defined(MADV_HUGEPAGE)
  constexpr std::uintptr_t huge = std::uintptr_t{2} << 20;
  const auto begin = reinterpret_cast<std::uintptr_t>(column.data());
  const std::uintptr_t first = (begin + huge - 1) & ~(huge - 1);
  const std::uintptr_t last = (begin + n * sizeof(double)) & ~(huge - 1);
  if (last > first) ::madvise(reinterpret_cast<void*>(first), last - first, MADV_HUGEPAGE);
#endif
  column.resize(n);
}

std::size_t count_part(const ByteSource& source, std::size_t begin, std::size_t end) {
  std::size_t n = 0;
  LineBlocks blocks(source, begin, end);
  for (auto bytes = blocks.next(); !bytes.empty(); bytes = blocks.next())
    n += count_newlines(bytes);
  return n;
}

}  // namespace

ParsedRows parse_rows(const ByteSource& source, std::size_t data_begin, std::size_t first_line,
                      const RowLayout& layout, unsigned threads, const std::string& name) {
  const std::size_t size = source.size();
  const std::size_t region = size > data_begin ? size - data_begin : 0;
  const auto most_parts =
      static_cast<unsigned>(std::clamp<std::size_t>(region / min_part_bytes, 1, max_parts));
  unsigned workers = threads == 0 ? std::max(1u, std::thread::hardware_concurrency()) : threads;
  workers = std::min({workers, 64u, most_parts});
  // A few parts a thread, handed out as threads come free.
  const unsigned parts = workers == 1 ? 1u : std::min(workers * parts_per_worker, most_parts);

  // Parts start at line starts: each is what lies after the first line end
  // at or past an even share of the region.
  std::vector<std::size_t> bounds(parts + 1, size);
  bounds[0] = data_begin;
  for (unsigned k = 1; k < parts; ++k) {
    const std::size_t target = data_begin + region / parts * k;
    bounds[k] = std::max(bounds[k - 1], source.next_line_start(target - 1));
  }

  // A newline count per part gives its first line number and a bound on its rows.
  std::vector<std::size_t> newlines(parts, 0);
  run_parts(parts, workers,
            [&](unsigned k) { newlines[k] = count_part(source, bounds[k], bounds[k + 1]); });
  std::vector<std::size_t> first_lines(parts), base(parts);
  std::size_t capacity = 0;
  std::size_t line = first_line;
  // Every part but the last ends just after a line end, so it holds at most
  // one row a newline; the last may end in a line without one. With no room
  // to spare between parts, rows that fill their lines need no moving after.
  for (unsigned k = 0; k < parts; ++k) {
    first_lines[k] = line;
    base[k] = capacity;
    line += newlines[k];
    capacity += newlines[k] + (k + 1 == parts ? 1 : 0);
  }

  ParsedRows out;
  out.parts = parts;
  out.workers = workers;
  out.columns.resize(layout.columns);
  // Zero-filling hundreds of megabytes is worth spreading over the threads,
  // one a column so that three columns on two cores still share out evenly.
  const auto columns = static_cast<unsigned>(layout.columns);
  run_parts(columns, workers == 1 ? 1u : columns,
            [&](unsigned c) { allocate_column(out.columns[c], capacity); });

  std::vector<PartOutput> results(parts);
  std::vector<std::vector<double*>> pointers(parts);
  std::vector<PartTarget> targets(parts);
  for (unsigned k = 0; k < parts; ++k) {
    for (auto& col : out.columns) pointers[k].push_back(col.data() + base[k]);
    targets[k] = {pointers[k], newlines[k] + (k + 1 == parts ? 1 : 0)};
  }
  std::atomic<std::size_t> stop_line{std::numeric_limits<std::size_t>::max()};
  run_parts(parts, workers, [&](unsigned k) {
    parse_part(source, bounds[k], bounds[k + 1], first_lines[k], layout, targets[k], name,
               stop_line, results[k]);
  });

  // The earliest problem wins: an error inside a part, or a watched column
  // that fails to increase from one part's last row to the next part's first.
  const InputError* first_error = nullptr;
  std::optional<InputError> boundary_error;
  std::size_t watch_fail = 0;
  const auto earlier = [](std::size_t a, std::size_t b) { return a != 0 && (b == 0 || a < b); };
  const PartOutput* previous = nullptr;
  for (unsigned k = 0; k < parts; ++k) {
    const PartOutput& r = results[k];
    if (r.error && (first_error == nullptr || r.error->line() < first_error->line())) {
      first_error = &*r.error;
    }
    if (earlier(r.watch_fail_line, watch_fail)) watch_fail = r.watch_fail_line;
    if (r.rows == 0) continue;
    if (layout.watch && previous != nullptr && !(r.first_watch > previous->last_watch)) {
      if (layout.watch_strict && !boundary_error && !std::isnan(r.first_watch)) {
        boundary_error.emplace(
            name, r.first_row_line, r.first_row_column,
            fmt::format("{} does not increase: {} s after {} s", layout.watch_label, r.first_watch,
                        previous->last_watch));
      }
      if (earlier(r.first_row_line, watch_fail)) watch_fail = r.first_row_line;
    }
    previous = &r;
  }
  if (boundary_error && (first_error == nullptr || boundary_error->line() < first_error->line())) {
    first_error = &*boundary_error;
  }
  if (first_error != nullptr) throw *first_error;
  out.watch_fail_line = watch_fail;
  // The file's last line lies in the last part with any bytes: a long one
  // can leave the parts after it empty.
  for (unsigned k = parts; k-- > 0;) {
    if (bounds[k] < bounds[k + 1]) {
      out.unterminated_line = results[k].unterminated_line;
      break;
    }
  }

  // Close the gaps that blank and comment lines left at each part's end.
  std::size_t rows = 0;
  for (unsigned k = 0; k < parts; ++k) {
    if (base[k] != rows) {
      for (auto& col : out.columns) {
        std::copy(col.begin() + static_cast<std::ptrdiff_t>(base[k]),
                  col.begin() + static_cast<std::ptrdiff_t>(base[k] + results[k].rows),
                  col.begin() + static_cast<std::ptrdiff_t>(rows));
      }
    }
    rows += results[k].rows;
  }
  for (auto& col : out.columns) col.resize(rows);
  out.rows = rows;

  out.gaps.assign(layout.columns, {});
  for (const auto& r : results) {
    for (std::size_t c = 0; c < layout.columns; ++c) {
      if (r.gaps[c].missing == 0) continue;
      if (out.gaps[c].missing == 0) out.gaps[c].first_line = r.gaps[c].first_line;
      out.gaps[c].missing += r.gaps[c].missing;
    }
  }
  return out;
}

}  // namespace benchtau::csv
