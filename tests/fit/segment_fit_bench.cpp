// benchtau: times the segment fits end to end on a 1-million-sample synthetic capture.
//
// The capture: the 10 k / 47 k / 100 nF two-resistor astable on 9 V (5.7 ms and 4.7 ms),
// 300 samples per period, 8-bit over 10 V with 20 mV of noise, 1 000 000 samples (about 3300
// cycles, 6700 segments). Prints wall and CPU time of each stage, for 1 and 2 threads, and
// the joint results as a sanity check. Usage: benchtau_fit_bench [samples] [samples/period]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <string>

#include "fit/segment_fit.h"
#include "src/core/measure.h"
#include "src/core/synth.h"

using namespace benchtau;

namespace {

struct Clock {
  std::chrono::steady_clock::time_point wall = std::chrono::steady_clock::now();
  std::clock_t cpu = std::clock();
  void report(const char* what) const {
    const double wall_ms =
        std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - wall).count();
    const double cpu_ms = 1e3 * static_cast<double>(std::clock() - cpu) / CLOCKS_PER_SEC;
    std::printf("  %-34s wall %8.1f ms   cpu %8.1f ms\n", what, wall_ms, cpu_ms);
  }
};

void print_phase(const char* name, const PhaseFit& p) {
  std::printf("  %-12s %-16s tau %.6f +- %.6f ms  Vinf %.4f +- %.4f V  %zu segments\n", name,
              std::string(status_name(p.status)).c_str(), p.tau_s.value * 1e3, p.tau_s.sigma * 1e3,
              p.vinf_V.value, p.vinf_V.sigma, p.segments.size());
}

}  // namespace

int main(int argc, char** argv) {
  const double samples = argc > 1 ? std::atof(argv[1]) : 1e6;
  const double per_period = argc > 2 ? std::atof(argv[2]) : 300.0;
  const AstableWave w = two_resistor_astable(9.0, 10e3, 47e3, 100e-9);
  const double period_s = w.high_s() + w.low_s();
  SynthOptions o;
  o.rate_Hz = per_period / period_s;
  o.duration_s = (samples - 1.0) / o.rate_Hz;
  o.phase_s = 0.3 * period_s;
  o.bits = 8;
  o.noise_V = 0.02;
  o.with_ctl = false;

  Clock total;
  Clock c;
  const SynthRecord rec = synth_astable(w, o);
  c.report("synthesise");
  std::printf("benchtau_fit_bench: %zu samples, %.0f per period\n", rec.capture.samples(),
              per_period);
  c = Clock{};
  NodeMap map;
  map.out = 0;
  map.cap = 1;
  const Measurement m = measure(rec.capture, map);
  c.report("measure (edges)");
  const std::span<const double> cap = rec.capture.channels[1].values;
  for (int threads : {1, 2}) {
    SegmentFitOptions fo;
    fo.threads = threads;
    fo.joint = false;
    c = Clock{};
    const SegmentFitResult each = fit_segments(rec.capture.time, cap, m.edges, fo);
    c.report(threads == 1 ? "per-segment fits, 1 thread" : "per-segment fits, 2 threads");
    fo.joint = true;
    c = Clock{};
    const SegmentFitResult all = fit_segments(rec.capture.time, cap, m.edges, fo);
    c.report(threads == 1 ? "all fits (with joint), 1 thread" : "all fits (with joint), 2 threads");
    if (threads == 2) {
      std::printf("  %zu segments, sigma %.4f V, %zu samples used, %zu excluded\n",
                  all.segments.size(), all.noise_sigma_V, all.used, all.excluded);
      print_phase("charging", all.charging);
      print_phase("discharging", all.discharging);
    }
  }
  total.report("whole run");
  return 0;
}
