// benchtau: times the whole fit of a capture file: read, map nodes, measure, segment fits.
//
// Usage: benchtau_fit_pipeline_bench CAPTURE [--threads N]
// Prints key=value lines: each stage's wall time (read_s, map_s, measure_s, fit_s, total_s)
// and CPU time (read_cpu_s, ...), the segment count and both phases' joint tau and Vinf, for
// fit_bench.py to read.
#include <sys/resource.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>
#include <string_view>

#include "drivers/csv_reader.h"
#include "fit/segment_fit.h"
#include "src/core/input_error.h"
#include "src/core/measure.h"
#include "src/core/nodes.h"

namespace {

using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point start) {
  return std::chrono::duration<double>(Clock::now() - start).count();
}

double cpu_seconds() {
  rusage usage{};
  getrusage(RUSAGE_SELF, &usage);
  const auto s = [](const timeval& t) {
    return static_cast<double>(t.tv_sec) + 1e-6 * static_cast<double>(t.tv_usec);
  };
  return s(usage.ru_utime) + s(usage.ru_stime);
}

void print_phase(const char* name, const benchtau::PhaseFit& p) {
  std::printf("%s_status=%s\n%s_tau_s=%.9g\n%s_tau_sigma_s=%.3g\n%s_vinf_V=%.9g\n", name,
              std::string(benchtau::status_name(p.status)).c_str(), name, p.tau_s.value, name,
              p.tau_s.sigma, name, p.vinf_V.value);
}

}  // namespace

int main(int argc, char** argv) {
  std::string path;
  unsigned threads = 0;
  for (int i = 1; i < argc; ++i) {
    const std::string_view arg = argv[i];
    if (arg == "--threads" && i + 1 < argc) {
      threads = static_cast<unsigned>(std::strtoul(argv[++i], nullptr, 10));
    } else if (path.empty()) {
      path = arg;
    } else {
      std::fprintf(stderr, "usage: benchtau_fit_pipeline_bench CAPTURE [--threads N]\n");
      return 2;
    }
  }
  if (path.empty()) {
    std::fprintf(stderr, "usage: benchtau_fit_pipeline_bench CAPTURE [--threads N]\n");
    return 2;
  }
  try {
    const auto start = Clock::now();
    double cpu = cpu_seconds();
    double cpu_s[4] = {};
    const auto lap = [&cpu](double& out) {
      const double now = cpu_seconds();
      out = now - cpu;
      cpu = now;
    };
    benchtau::CsvOptions csv;
    csv.threads = threads;
    const benchtau::CsvResult read = benchtau::read_csv_file(path, csv);
    const double read_s = seconds_since(start);
    lap(cpu_s[0]);

    auto t = Clock::now();
    benchtau::NodeRequest request;
    request.out = "out";
    request.cap = "cap";
    const benchtau::NodeMap map = benchtau::map_nodes(read.capture, request);
    const double map_s = seconds_since(t);
    lap(cpu_s[1]);

    t = Clock::now();
    const benchtau::Measurement m = benchtau::measure(read.capture, map);
    const double measure_s = seconds_since(t);
    lap(cpu_s[2]);

    t = Clock::now();
    benchtau::SegmentFitOptions fo;
    fo.threads = threads == 0 ? 2 : static_cast<int>(threads);
    const benchtau::SegmentFitResult fit = benchtau::fit_segments(
        read.capture.time, read.capture.channels.at(*map.cap).values, m.edges, fo);
    const double fit_s = seconds_since(t);
    lap(cpu_s[3]);
    const double total_s = seconds_since(start);

    std::printf("rows=%zu\nedges=%zu\nsegments=%zu\nnoise_sigma_V=%.6g\n", read.capture.samples(),
                m.edges.size(), fit.segments.size(), fit.noise_sigma_V);
    std::printf("read_s=%.6f\nmap_s=%.6f\nmeasure_s=%.6f\nfit_s=%.6f\ntotal_s=%.6f\n", read_s,
                map_s, measure_s, fit_s, total_s);
    std::printf("read_cpu_s=%.6f\nmap_cpu_s=%.6f\nmeasure_cpu_s=%.6f\nfit_cpu_s=%.6f\n", cpu_s[0],
                cpu_s[1], cpu_s[2], cpu_s[3]);
    long iterations = 0;
    for (const benchtau::SegmentFit& f : fit.segments) iterations += f.iterations;
    std::printf("segment_iterations=%ld\njoint_iterations=%d,%d\n", iterations,
                fit.charging.iterations, fit.discharging.iterations);
    print_phase("charging", fit.charging);
    print_phase("discharging", fit.discharging);
    return 0;
  } catch (const benchtau::InputError& e) {
    std::fprintf(stderr, "%s\n", e.what());
    return 1;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "benchtau_fit_pipeline_bench: %s\n", e.what());
    return 3;
  }
}
