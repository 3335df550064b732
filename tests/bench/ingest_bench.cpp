// benchtau: times one read of a capture file and edge extraction on it.
#include <sys/resource.h>

#include <fmt/format.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>
#include <string_view>

#include "drivers/csv_reader.h"
#include "src/core/edges.h"
#include "src/core/input_error.h"

namespace {

double seconds_since(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
}

double cpu_seconds() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  const auto s = [](const timeval& t) {
    return static_cast<double>(t.tv_sec) + 1e-6 * static_cast<double>(t.tv_usec);
  };
  return s(usage.ru_utime) + s(usage.ru_stime);
}

// VmHWM is this program's own high-water mark; ru_maxrss would also carry the
// peak of the process that spawned it (Linux folds that in at exec), which is
// what a benchmark script holding a freshly generated capture inflates.
long peak_rss_bytes() {
  if (std::FILE* status = std::fopen("/proc/self/status", "r")) {
    char line[256];
    long kib = -1;
    while (std::fgets(line, sizeof line, status) != nullptr) {
      if (std::sscanf(line, "VmHWM: %ld kB", &kib) == 1) break;
    }
    std::fclose(status);
    if (kib >= 0) return kib * 1024L;
  }
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  return usage.ru_maxrss * 1024L;  // Linux reports KiB
}

}  // namespace

int main(int argc, char** argv) {
  std::string path;
  benchtau::CsvOptions options;
  for (int i = 1; i < argc; ++i) {
    const std::string_view arg = argv[i];
    if (arg == "--threads" && i + 1 < argc) {
      options.threads = static_cast<unsigned>(std::strtoul(argv[++i], nullptr, 10));
    } else if (path.empty()) {
      path = arg;
    } else {
      std::fprintf(stderr, "usage: benchtau_ingest_bench FILE [--threads N]\n");
      return 2;
    }
  }
  if (path.empty()) {
    std::fprintf(stderr, "usage: benchtau_ingest_bench FILE [--threads N]\n");
    return 2;
  }
  try {
    const double cpu_before = cpu_seconds();
    const auto start = std::chrono::steady_clock::now();
    const benchtau::CsvResult result = benchtau::read_csv_file(path, options);
    const double read_s = seconds_since(start);
    const double read_cpu_s = cpu_seconds() - cpu_before;
    const long rss = peak_rss_bytes();

    const auto& capture = result.capture;
    const std::size_t rows = capture.samples();
    const std::size_t columns = capture.channels.size() + (capture.time.uniform() ? 0 : 1);
    std::size_t bytes = 0;
    if (std::FILE* f = std::fopen(path.c_str(), "rb")) {
      std::fseek(f, 0, SEEK_END);
      bytes = static_cast<std::size_t>(std::ftell(f));
      std::fclose(f);
    }
    fmt::print(
        "bytes={}\nrows={}\ncolumns={}\nseconds={:.6f}\nmb_per_s={:.1f}\nrows_per_s={:.0f}\n",
        bytes, rows, columns, read_s, static_cast<double>(bytes) / 1e6 / read_s,
        static_cast<double>(rows) / read_s);
    fmt::print("cpu_seconds={:.6f}\npeak_rss_bytes={}\ndecoded_bytes={}\n", read_cpu_s, rss,
               rows * columns * sizeof(double));

    // Edges on the first channel in volts (the output pin, in a timer capture).
    const benchtau::Channel* out = nullptr;
    for (const auto& ch : capture.channels) {
      if (out == nullptr && ch.unit == "V") out = &ch;
    }
    if (out == nullptr && !capture.channels.empty()) out = &capture.channels.front();
    if (out != nullptr) {
      const auto edge_start = std::chrono::steady_clock::now();
      const auto scan = benchtau::output_edges(capture.time, out->values);
      const double edge_s = seconds_since(edge_start);
      fmt::print("edge_channel={}\nedges={}\nedge_seconds={:.6f}\nedge_samples_per_s={:.0f}\n",
                 out->name, scan.edges.size(), edge_s,
                 static_cast<double>(out->values.size()) / edge_s);
    }
    return 0;
  } catch (const benchtau::InputError& e) {
    std::fprintf(stderr, "%s\n", e.what());
    return 1;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "benchtau_ingest_bench: %s\n", e.what());
    return 3;
  }
}
