// benchtau: serial capture benchmark: decode throughput of both stream formats against the
// fastest common USB-serial link, and the live view's CPU use at 1 MB/s through a pty.
#include <fcntl.h>
#include <fmt/format.h>
#include <signal.h>
#include <stdlib.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <termios.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <span>
#include <string>
#include <thread>
#include <vector>

#include "bt_frame.h"
#include "drivers/frame_decoder.h"
#include "drivers/record_writer.h"
#include "drivers/text_decoder.h"
#include "drivers/unique_fd.h"
#include "src/core/synth.h"

namespace {

using Clock = std::chrono::steady_clock;
using benchtau::SampleBatch;

// The fastest common USB-serial link, from memory: a full-speed USB bridge
// (12 Mbit/s on the bus) carries about 1 MB/s of payload at best; a 3 Mbaud
// UART carries 300 kB/s (ten bits on the wire per byte).
constexpr double kLink_Bps = 1e6;
constexpr double kHeadroomTarget = 20.0;
constexpr double kCpuTarget = 0.10;

double as_double(std::size_t n) { return static_cast<double>(n); }

double seconds_since(Clock::time_point t0) {
  return std::chrono::duration<double>(Clock::now() - t0).count();
}

// Counts of an astable (R1 10k, R2 47k, C 100n on 9 V) as a 12-bit ADC behind
// a 3:1 divider sees them: out, cap, row after row.
std::vector<std::uint16_t> astable_counts(double rate_Hz, double seconds) {
  const benchtau::AstableWave w = benchtau::two_resistor_astable(9.0, 10e3, 47e3, 100e-9);
  benchtau::SynthOptions o;
  o.rate_Hz = rate_Hz;
  o.duration_s = seconds;
  o.with_ctl = false;
  const benchtau::SynthRecord rec = benchtau::synth_astable(w, o);
  std::vector<std::uint16_t> counts;
  counts.reserve(rec.capture.samples() * 2);
  for (std::size_t i = 0; i < rec.capture.samples(); ++i) {
    for (std::size_t c = 0; c < 2; ++c) {
      counts.push_back(static_cast<std::uint16_t>(
          std::lround(rec.capture.channels[c].values[i] / (5.0 / 4096 * 3.0))));
    }
  }
  counts.resize(counts.size() / 32 * 32);
  return counts;
}

std::vector<std::uint8_t> frames_of(std::span<const std::uint16_t> counts) {
  std::vector<std::uint8_t> out;
  std::uint8_t frame[BT_FRAME_MAX_BYTES];
  std::uint16_t seq = 0;
  for (std::size_t i = 0; i + 32 <= counts.size(); i += 32) {
    const std::size_t n = bt_frame_encode(frame, 0, seq++, 2, 16, counts.data() + i);
    out.insert(out.end(), frame, frame + n);
  }
  return out;
}

struct Rate {
  double MBps = 0.0;
  double samples_per_s = 0.0;  // sample sets (rows) a second
};

// Best of three runs, decoding in 16 KiB reads as the live loop does.
template <class MakeDecoder>
Rate decode_rate(std::span<const std::uint8_t> bytes, MakeDecoder make) {
  Rate best;
  for (int run = 0; run < 3; ++run) {
    auto d = make();
    SampleBatch out;
    std::size_t rows = 0;
    const auto t0 = Clock::now();
    for (std::size_t i = 0; i < bytes.size(); i += 16384) {
      out.clear();
      d.feed(bytes.subspan(i, std::min<std::size_t>(16384, bytes.size() - i)), out);
      rows += out.rows();
    }
    const double s = seconds_since(t0);
    if (as_double(bytes.size()) / s / 1e6 > best.MBps)
      best = {as_double(bytes.size()) / s / 1e6, as_double(rows) / s};
  }
  return best;
}

// Decoding and writing the record together, the whole path of `capture`.
Rate record_rate(std::span<const std::uint8_t> bytes, double rate_Hz, const std::string& path) {
  std::filesystem::remove(path);
  benchtau::RecordWriter w(path, true);
  benchtau::FrameDecoder d(rate_Hz);
  SampleBatch out;
  std::size_t rows = 0;
  const auto t0 = Clock::now();
  for (std::size_t i = 0; i < bytes.size(); i += 16384) {
    out.clear();
    d.feed(bytes.subspan(i, std::min<std::size_t>(16384, bytes.size() - i)), out);
    w.append(out, {5.0, 12, 3.0});
    w.flush_if_due();
    rows += out.rows();
  }
  w.close();
  const double s = seconds_since(t0);
  std::filesystem::remove(path);
  return {as_double(bytes.size()) / s / 1e6, as_double(rows) / s};
}

void print_rate(const char* what, const Rate& r) {
  fmt::print("  {:<34} {:8.1f} MB/s {:10.2f} M samples/s  {:6.0f}x the link\n", what, r.MBps,
             r.samples_per_s / 1e6, r.MBps * 1e6 / kLink_Bps);
}

// Runs `benchtau watch` on a pty fed at rate_Bps for seconds; returns its CPU
// time over the wall time (RUSAGE_CHILDREN: the feeder's own time is not in it).
double watch_cpu(std::span<const std::uint8_t> bytes, double rate_Bps, double seconds,
                 double sample_rate_Hz, const std::string& record) {
  benchtau::UniqueFd master(::posix_openpt(O_RDWR | O_NOCTTY | O_CLOEXEC));
  if (!master || ::grantpt(master.get()) != 0 || ::unlockpt(master.get()) != 0) {
    fmt::print(stderr, "no pty: {}\n", std::strerror(errno));
    std::exit(1);
  }
  const std::string slave_path = ::ptsname(master.get());
  benchtau::UniqueFd slave(::open(slave_path.c_str(), O_RDWR | O_NOCTTY | O_CLOEXEC));
  termios t{};
  ::tcgetattr(slave.get(), &t);
  ::cfmakeraw(&t);
  ::tcsetattr(slave.get(), TCSANOW, &t);
  if (!record.empty()) std::filesystem::remove(record);

  std::vector<std::string> args{
      BENCHTAU_EXE, "watch",  "--port",    slave_path,
      "--format",   "frames", "--rate",    fmt::format("{}", sample_rate_Hz),
      "--bits",     "12",     "--divider", "3"};
  if (!record.empty()) {
    args.push_back("--record");
    args.push_back(record);
  }
  std::vector<char*> argv;
  for (auto& a : args) argv.push_back(a.data());
  argv.push_back(nullptr);
  const pid_t child = ::fork();
  if (child == 0) {
    const int null = ::open("/dev/null", O_WRONLY);
    ::dup2(null, STDOUT_FILENO);
    ::dup2(null, STDERR_FILENO);
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  std::this_thread::sleep_for(std::chrono::milliseconds(300));  // let it open the port

  // Paced: a slice every 10 ms, so the reader sees a steady 1 MB/s.
  const auto t0 = Clock::now();
  const std::size_t slice = static_cast<std::size_t>(rate_Bps / 100);
  std::size_t sent = 0;
  for (int k = 0; seconds_since(t0) < seconds; ++k) {
    const std::size_t off = sent % (bytes.size() / 73 * 73 - slice);
    const ssize_t w = ::write(master.get(), bytes.data() + off, slice);
    if (w > 0) sent += static_cast<std::size_t>(w);
    std::this_thread::sleep_until(t0 + std::chrono::milliseconds(10 * (k + 1)));
  }
  const double wall = seconds_since(t0) + 0.3;
  std::this_thread::sleep_for(std::chrono::milliseconds(300));
  ::kill(child, SIGINT);
  int status = 0;
  ::waitpid(child, &status, 0);
  static double used_before = 0.0;
  rusage ru{};
  ::getrusage(RUSAGE_CHILDREN, &ru);
  const double used = static_cast<double>(ru.ru_utime.tv_sec + ru.ru_stime.tv_sec) +
                      static_cast<double>(ru.ru_utime.tv_usec + ru.ru_stime.tv_usec) / 1e6;
  const double cpu = used - used_before;
  used_before = used;
  if (!record.empty()) {
    fmt::print("  (record {}: {:.1f} MB of CSV for {:.1f} MB sent)\n", record,
               as_double(std::filesystem::file_size(record)) / 1e6, as_double(sent) / 1e6);
    std::filesystem::remove(record);
  }
  return cpu / (wall + 0.3);
}

}  // namespace

int main(int argc, char** argv) {
  const std::string scratch = argc > 1 ? argv[1] : "/tmp";
  fmt::print("benchtau serial benchmark ({} cores)\n", std::thread::hardware_concurrency());
  fmt::print(
      "link: about {:.0f} kB/s of payload on full-speed USB (12 Mbit/s) or {:.0f} kB/s on a "
      "3 Mbaud UART (from memory)\n\n",
      kLink_Bps / 1e3, 300.0);

  const double rate_Hz = 1e6 / 73 * 16;  // sample sets a second in 1 MB/s of 2-channel frames
  const auto counts = astable_counts(200e3, 150.0);  // 30 M sample sets, 2 channels
  const auto frames = frames_of(counts);
  std::string text, stamped;
  text.reserve(counts.size() * 5);
  for (std::size_t i = 0; i + 1 < counts.size(); i += 2) {
    fmt::format_to(std::back_inserter(text), "{},{}\r\n", counts[i], counts[i + 1]);
    if (i < counts.size() / 2) {
      fmt::format_to(std::back_inserter(stamped), "{},{},{}\r\n", 1000000 + i * 5, counts[i],
                     counts[i + 1]);
    }
  }
  const auto as_bytes = [](const std::string& s) {
    return std::span(reinterpret_cast<const std::uint8_t*>(s.data()), s.size());
  };

  fmt::print("decode throughput ({:.0f} MB of frames, {:.0f} MB of text lines):\n",
             as_double(frames.size()) / 1e6, as_double(text.size()) / 1e6);
  const Rate f = decode_rate(frames, [&] { return benchtau::FrameDecoder(rate_Hz); });
  print_rate("frames, 2 channels x 16 sets", f);
  benchtau::TextOptions to;
  to.rate_Hz = 10e3;
  const Rate t = decode_rate(as_bytes(text), [&] { return benchtau::TextDecoder(to); });
  print_rate("text lines, rate", t);
  benchtau::TextOptions ts;
  ts.timestamps = benchtau::TimestampMode::on;
  const Rate s = decode_rate(as_bytes(stamped), [&] { return benchtau::TextDecoder(ts); });
  print_rate("text lines, timestamps", s);
  const auto record_bytes = std::span(frames).first(frames.size() / 4);
  const Rate r = record_rate(record_bytes, rate_Hz, scratch + "/benchtau-serial-bench.csv");
  print_rate("frames decoded and recorded", r);
  const double worst = std::min({f.MBps, t.MBps, s.MBps});
  fmt::print("  headroom {:.0f}x over the link (target {:.0f}x): {}\n\n", worst * 1e6 / kLink_Bps,
             kHeadroomTarget, worst * 1e6 / kLink_Bps >= kHeadroomTarget ? "met" : "NOT met");

  fmt::print("live view (benchtau watch) at 1 MB/s of frames through a pty, 5 s:\n");
  const double cpu_view = watch_cpu(frames, 1e6, 5.0, rate_Hz, "");
  fmt::print("  {:<34} {:5.1f} % of a core (target under {:.0f} %)\n", "view only", 100 * cpu_view,
             100 * kCpuTarget);
  const double cpu_rec =
      watch_cpu(frames, 1e6, 5.0, rate_Hz, scratch + "/benchtau-watch-bench.csv");
  fmt::print("  {:<34} {:5.1f} % of a core\n", "view and --record", 100 * cpu_rec);
  return 0;
}
