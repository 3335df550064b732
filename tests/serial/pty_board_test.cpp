// benchtau tests: a board simulator on a pty feeding both stream formats; what is recorded is
// what was sent, bit for bit; and a port that goes away and comes back on the same path.
#include <catch2/catch.hpp>

#include <thread>

#include "bt_sampler.h"
#include "drivers/csv_reader.h"
#include "drivers/live_session.h"
#include "drivers/serial_port.h"
#include "fake_hw.h"
#include "hw.h"
#include "serial_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

// The reference firmware's output for ticks ticks of the fake ADC.
std::vector<std::uint8_t> firmware_bytes(std::uint64_t ticks) {
  static bt_sampler s;
  hw_init(10000, 1000000);
  REQUIRE(bt_sampler_init(&s, 2, 16) == 1);
  for (std::uint64_t i = 0; i < ticks; ++i) bt_sampler_step(&s);
  return {fake_hw_uart_data(), fake_hw_uart_data() + fake_hw_uart_size()};
}

// Runs a session on port until samples have been recorded, the board
// simulator writing bytes on the master side from its own thread.
SessionStatus record_from_pty(PtyPair& pty, std::span<const std::uint8_t> bytes,
                              SessionOptions options, const fs::path& record_path,
                              std::uint64_t samples, std::size_t piece) {
  RecordWriter record(record_path.string(), false);
  LiveSession session(options, [](const std::string& p) { return open_port(p, {}); });
  session.set_record(&record);
  session.open();
  std::atomic<bool> stop{false};
  std::thread board([&] { pty.write(bytes, piece); });
  std::thread watcher([&] {
    wait_for([&] { return session.status().samples >= samples; }, std::chrono::seconds(20));
    stop = true;
  });
  session.run(stop);
  board.join();
  watcher.join();
  record.close();
  return session.status();
}

}  // namespace

TEST_CASE("frames from the reference firmware through a pty arrive bit for bit") {
  PtyPair pty;
  const std::uint64_t ticks = 16 * 3000;  // 3000 frames, 219 kB
  const auto bytes = firmware_bytes(ticks);
  SessionOptions o;
  o.port = pty.slave_path;
  o.stream.rate_Hz = 10000.0;  // the format is detected
  o.scale = {5.0, 12, 2.0};
  const fs::path p = scratch("pty-frames.csv");
  const SessionStatus st = record_from_pty(pty, bytes, o, p, ticks, 777);
  CHECK(st.format == StreamFormat::frames);
  CHECK(st.via == pty.slave_path + " (termios)");
  CHECK(st.counters.frames.frames == 3000);
  CHECK(st.counters.frames.lost_frames == 0);
  CHECK(st.counters.frames.crc_errors == 0);
  CHECK(st.counters.bytes == bytes.size());
  CHECK(st.over_range == 0);
  const CsvResult r = read_csv_file(p.string());
  REQUIRE(r.capture.samples() == ticks);
  const double k = o.scale.volts_per_count();
  for (std::uint64_t t = 0; t < ticks; ++t) {
    REQUIRE(r.capture.time.at(t) == static_cast<double>(t) / 10000.0);
    REQUIRE(r.capture.channels[0].values[t] == fake_hw_pattern(0, t) * k);
    REQUIRE(r.capture.channels[1].values[t] == fake_hw_pattern(1, t) * k);
  }
}

TEST_CASE("text lines with timestamps through a pty arrive bit for bit") {
  PtyPair pty;
  std::string text = "\r\nboard ready, 2 channels\r\n";
  const std::size_t n = 5000;
  for (std::size_t i = 0; i < n; ++i) {
    text += fmt::format("{},{},{}\r\n", 7000000 + i * 250, fake_hw_pattern(0, i) % 1024,
                        fake_hw_pattern(1, i) % 1024);
  }
  SessionOptions o;
  o.port = pty.slave_path;  // no --rate, no --timestamps: both detected
  const fs::path p = scratch("pty-text.csv");
  const SessionStatus st = record_from_pty(
      pty, {reinterpret_cast<const std::uint8_t*>(text.data()), text.size()}, o, p, n, 333);
  CHECK(st.format == StreamFormat::text);
  CHECK(st.counters.text.skipped_lines == 1);
  CHECK(st.counters.text.restarts == 0);
  const CsvResult r = read_csv_file(p.string());
  REQUIRE(r.capture.samples() == n);
  const double k = o.scale.volts_per_count();
  for (std::size_t i = 0; i < n; ++i) {
    REQUIRE(r.capture.time.at(i) == static_cast<double>(i * 250) / 1e6);
    REQUIRE(r.capture.channels[0].values[i] == (fake_hw_pattern(0, i) % 1024) * k);
    REQUIRE(r.capture.channels[1].values[i] == (fake_hw_pattern(1, i) % 1024) * k);
  }
}

TEST_CASE("a port that goes away and comes back on the same path is recorded across the gap") {
  // The path is a symlink, as udev makes for a board: it is pointed at a new
  // pty while the session waits.
  const fs::path link = scratch("board-link");
  auto first = std::make_unique<PtyPair>();
  fs::create_symlink(first->slave_path, link);
  SessionOptions o;
  o.port = link.string();
  o.stream.format = StreamFormat::text;
  o.stream.rate_Hz = 1000.0;
  o.retry_interval_s = 0.02;
  const fs::path p = scratch("pty-reconnect.csv");
  RecordWriter record(p.string(), false);
  LiveSession session(o, [](const std::string& path) { return open_port(path, {}); });
  session.set_record(&record);
  std::vector<std::string> events;
  std::mutex events_mutex;
  session.on_event([&](const std::string& m) {
    const std::lock_guard lock(events_mutex);
    events.push_back(m);
  });
  session.open();
  std::atomic<bool> stop{false};
  std::thread run([&] { session.run(stop); });

  first->write(std::string("1,1\n2,2\n3,3\n"));
  REQUIRE(wait_for([&] { return session.status().samples == 3; }));
  first->close_master();
  REQUIRE(wait_for([&] { return session.status().disconnects == 1; }));
  PtyPair second;
  const fs::path tmp = scratch("board-link.new");
  fs::create_symlink(second.slave_path, tmp);
  fs::rename(tmp, link);
  REQUIRE(wait_for([&] { return session.status().connected; }));
  second.write(std::string("4,4\n5,5\n"));
  REQUIRE(wait_for([&] { return session.status().samples == 5; }));
  stop = true;
  run.join();
  record.close();

  {
    const std::lock_guard lock(events_mutex);
    REQUIRE(events.size() == 2);
    CHECK(events[0] == link.string() +
                           ": disconnected (the port hung up); the record is kept, waiting for the "
                           "port to come back");
    CHECK(events[1] == link.string() + ": connected again");
  }
  const auto lines = lines_of(slurp(p));
  REQUIRE(lines.size() == 1 + 3 + 1 + 2);
  CHECK(lines[4] == "0.003,,");
  const CsvResult r = read_csv_file(p.string());
  CHECK(r.capture.channels[0].values[4] == 4 * 5.0 / 1024);
  CHECK(r.capture.time.at(4) > 0.003 + 0.02);  // at least one retry interval away
}
