// benchtau: writes the bundled demo captures from exact synthetic waveforms.
//
// Every board, workshop and unit number here is invented. Run it from the
// repository root to regenerate captures/*.csv and captures/*.txt:
//   build/captures/benchtau_demo_captures captures
#include <fmt/format.h>

#include <cstdio>
#include <functional>
#include <memory>
#include <string>

#include "src/core/simulate.h"
#include "src/core/synth.h"

using namespace benchtau;

namespace {

struct FileCloser {
  void operator()(std::FILE* f) const { std::fclose(f); }
};
using File = std::unique_ptr<std::FILE, FileCloser>;

File open_out(const std::string& path) {
  File f(std::fopen(path.c_str(), "wb"));
  if (!f) {
    fmt::print(stderr, "cannot write {}\n", path);
    std::exit(1);
  }
  return f;
}

// Greenhouse mister timer, rev B: R1 4k7, R2 22k, C 100n on 9 V. Unit 7 is good.
// Written as a bench scope's CSV: comment preamble, time in ms, units in the header.
void mister_good(const std::string& dir) {
  const AstableWave w = two_resistor_astable(9.0, 4.7e3, 22e3, 100e-9);
  SynthOptions o;
  o.rate_Hz = 100e3;
  o.duration_s = 30e-3;
  o.phase_s = 0.8e-3;
  o.bits = 8;
  o.full_scale_V = 10.0;
  o.noise_V = 0.015;
  o.seed = 7;
  const SynthRecord rec = synth_astable(w, o);
  File f = open_out(dir + "/mister-rev-b-unit-7.csv");
  fmt::print(f.get(), "# Tinmoor Workshop, bench 2: greenhouse mister timer, board rev B, unit 7\n");
  fmt::print(f.get(), "# probes x10: output pin 3, capacitor node pins 2/6, control pin 5\n");
  fmt::print(f.get(), "t [ms],out (V),cap (V),ctl (V)\n");
  const Capture& c = rec.capture;
  for (std::size_t i = 0; i < c.samples(); ++i) {
    fmt::print(f.get(), "{:.3f},{:.4g},{:.4g},{:.4g}\n", c.time.at(i) * 1e3, c.channels[0].values[i],
               c.channels[1].values[i], c.channels[2].values[i]);
  }
}

// Unit 12 of the same board came back with a slow, erratic mist cycle: its
// timing capacitor has dried out to about 62 nF. Written the way a desk
// logger set to a comma-decimal locale writes: semicolons, decimal commas,
// microseconds, millivolts on the capacitor channel.
void mister_dried(const std::string& dir) {
  const AstableWave w = two_resistor_astable(9.0, 4.7e3, 22e3, 62e-9);
  SynthOptions o;
  o.rate_Hz = 100e3;
  o.duration_s = 25e-3;
  o.phase_s = 0.3e-3;
  o.bits = 8;
  o.full_scale_V = 10.0;
  o.noise_V = 0.015;
  o.seed = 12;
  o.with_ctl = false;
  const SynthRecord rec = synth_astable(w, o);
  File f = open_out(dir + "/mister-rev-b-unit-12.csv");
  fmt::print(f.get(), "board;greenhouse mister rev B, unit 12\n");
  fmt::print(f.get(), "Time (us);out (V);cap (mV)\n");
  const Capture& c = rec.capture;
  auto comma = [](std::string s) {
    for (char& ch : s)
      if (ch == '.') ch = ',';
    return s;
  };
  for (std::size_t i = 0; i < c.samples(); ++i) {
    fmt::print(f.get(), "{};{};{}\n", comma(fmt::format("{:.1f}", c.time.at(i) * 1e6)),
               comma(fmt::format("{:.3f}", c.channels[0].values[i])),
               comma(fmt::format("{:.1f}", c.channels[1].values[i] * 1e3)));
  }
}

// Night-light blinker: R1 1k, R2 68k, C 10u on 6 V, logged by a small ADC
// board on the capacitor node only, from power-up, as whitespace-separated
// text with the rate given only in the preamble.
void blinker_log(const std::string& dir) {
  // From the circuit model, as night-light-blinker.toml describes the board: a CMOS timer,
  // and the ADC board's 1 M input on the capacitor node, which lowers the charging target.
  Circuit c;
  c.v.supply_V = 6.0;
  c.v.family = Family::cmos;
  c.v.chip = typical_figures(Family::cmos);
  c.v.upper_ohm = 1e3;
  c.v.lower_ohm = 68e3;
  c.v.cap_F = 10e-6;
  c.v.probe_cap_ohm = 1e6;
  const AstableWave w = astable_wave(predict_cycle(c));
  SynthOptions o;
  o.rate_Hz = 2e3;
  o.duration_s = 5.0;
  o.power_up = true;
  o.off_s = 0.05;
  o.bits = 10;
  o.full_scale_V = 6.6;
  o.noise_V = 0.004;
  o.seed = 3;
  o.with_ctl = false;
  const SynthRecord rec = synth_astable(w, o);
  File f = open_out(dir + "/night-light-blinker-log.txt");
  fmt::print(f.get(), "# night-light blinker, prototype 2, capacitor node via 10-bit ADC board\n");
  fmt::print(f.get(), "# sample rate: 2 kHz\n");
  fmt::print(f.get(), "cap_V\n");
  for (double v : rec.capture.channels[1].values) fmt::print(f.get(), "{:.4f}\n", v);
}

// Doorbell chime timer with its timing capacitor shorted by a solder bridge:
// the trigger is held low, so the output sits high and nothing oscillates.
void chime_stuck(const std::string& dir) {
  File f = open_out(dir + "/door-chime-bridged-cap.csv");
  fmt::print(f.get(), "time_s,out_V,cap_V\n");
  for (int i = 0; i < 2000; ++i) {
    const double jitter = ((i * 37) % 11 - 5) * 0.002;
    fmt::print(f.get(), "{:.6f},{:.3f},{:.3f}\n", i * 5e-6, 10.38 + jitter, 0.004 + 0.2 * jitter);
  }
}

}  // namespace

int main(int argc, char** argv) {
  const std::string dir = argc > 1 ? argv[1] : "captures";
  mister_good(dir);
  mister_dried(dir);
  blinker_log(dir);
  chime_stuck(dir);
  return 0;
}
