// benchtau tests: the recording loop over a fake port: short reads, EINTR, timeouts, the link
// going away and coming back, the --seconds cut, and stop requests.
#include <catch2/catch.hpp>

#include <cmath>

#include "drivers/csv_reader.h"
#include "drivers/live_session.h"
#include "drivers/serial_port.h"
#include "serial_test_support.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

FakeStep chunk(std::vector<std::uint8_t> bytes) { return {ReadStatus::data, std::move(bytes), {}}; }
FakeStep chunk(std::string_view text) {
  return chunk(std::vector<std::uint8_t>(text.begin(), text.end()));
}
FakeStep status(ReadStatus s, std::string detail = {}) { return {s, {}, std::move(detail)}; }

SessionOptions text_options(double rate_Hz) {
  SessionOptions o;
  o.port = "/dev/ttyFAKE";
  o.stream.format = StreamFormat::text;
  o.stream.rate_Hz = rate_Hz;
  o.reconnect = false;
  o.retry_interval_s = 0.01;
  o.read_timeout_ms = 5;
  return o;
}

// An opener that hands out the given sources in turn, then reports the port missing.
struct Opener {
  std::vector<std::unique_ptr<ByteSource>> sources;
  std::size_t next = 0;
  std::size_t missing_before_each = 0;  // failed attempts before each source after the first
  std::size_t failures = 0;
  std::unique_ptr<ByteSource> operator()(const std::string& port) {
    if (next > 0 && failures < missing_before_each * next) {
      ++failures;
      throw port_open_error(port, ENOENT);
    }
    if (next >= sources.size()) throw port_open_error(port, ENOENT);
    return std::move(sources[next++]);
  }
};

std::vector<std::string> record_lines(const fs::path& p) { return lines_of(slurp(p)); }

}  // namespace

TEST_CASE("short reads, EINTR and timeouts lose nothing, the end of the link ends the session") {
  std::deque<FakeStep> steps;
  steps.push_back(chunk("banner v1\n10,20\n11,21\n"));
  steps.push_back(status(ReadStatus::interrupted));
  steps.push_back(status(ReadStatus::timeout));
  steps.push_back(chunk("12,22\n13,"));
  steps.push_back(status(ReadStatus::interrupted));
  steps.push_back(chunk("23\n14,24\n"));
  steps.push_back(status(ReadStatus::closed, "Input/output error"));
  auto source = std::make_unique<FakeSource>(std::move(steps), 3);  // 3 bytes a read at most
  Opener opener;
  opener.sources.push_back(std::move(source));
  const fs::path p = scratch("session-short.csv");
  RecordWriter record(p.string(), false);
  LiveSession s(text_options(100.0), std::ref(opener));
  s.set_record(&record);
  std::vector<std::string> events;
  s.on_event([&](const std::string& m) { events.push_back(m); });
  const std::atomic<bool> stop{false};
  CHECK(s.run(stop) == SessionEnd::disconnected);
  record.close();
  CHECK(record_lines(p) == std::vector<std::string>{"t_s,ch1_V,ch2_V", "0,0.048828125,0.09765625",
                                                    "0.01,0.0537109375,0.1025390625",
                                                    "0.02,0.05859375,0.107421875",
                                                    "0.03,0.0634765625,0.1123046875",
                                                    "0.04,0.068359375,0.1171875", "0.05,,"});
  const SessionStatus st = s.status();
  CHECK(st.samples == 5);
  CHECK(st.gaps == 1);
  CHECK(st.disconnects == 1);
  CHECK(st.counters.text.skipped_lines == 1);
  CHECK(events == std::vector<std::string>{
                      "/dev/ttyFAKE: disconnected (Input/output error); the record is kept"});
}

TEST_CASE("a stop request ends the session at the next read, with every sample recorded") {
  std::atomic<bool> stop{false};
  struct StopAfter final : ByteSource {
    std::atomic<bool>& stop;
    int calls = 0;
    explicit StopAfter(std::atomic<bool>& s) : stop(s) {}
    ReadResult read(std::span<std::uint8_t> buf, int) override {
      if (++calls == 1) {
        const std::string_view t = "1,2\n3,4\n";
        std::copy(t.begin(), t.end(), buf.begin());
        return {ReadStatus::data, t.size(), {}};
      }
      stop = true;  // as the SIGINT handler does, then poll() returns EINTR
      return {ReadStatus::interrupted, 0, {}};
    }
    std::string description() const override { return "fake"; }
  };
  const fs::path p = scratch("session-stop.csv");
  RecordWriter record(p.string(), false);
  LiveSession s(text_options(10.0),
                [&](const std::string&) { return std::make_unique<StopAfter>(stop); });
  s.set_record(&record);
  CHECK(s.run(stop) == SessionEnd::stopped);
  record.close();
  CHECK(slurp(p) == "t_s,ch1_V,ch2_V\n0,0.0048828125,0.009765625\n0.1,0.0146484375,0.01953125\n");
}

TEST_CASE("a pulled cable leaves a gap row, the session reconnects and records on") {
  Opener opener;
  opener.missing_before_each = 3;  // the port is away for three attempts
  opener.sources.push_back(std::make_unique<FakeSource>(
      std::deque<FakeStep>{chunk("1,1\n2,2\n"), status(ReadStatus::closed, "end of file")}, 64));
  opener.sources.push_back(std::make_unique<FakeSource>(
      std::deque<FakeStep>{chunk("3,3\n4,4\n"), status(ReadStatus::closed, "end of file")}, 64));
  SessionOptions o = text_options(1000.0);
  o.reconnect = true;
  std::atomic<bool> stop{false};
  std::vector<std::string> events;
  const fs::path p = scratch("session-reconnect.csv");
  RecordWriter record(p.string(), false);
  LiveSession s(o, std::ref(opener));
  s.set_record(&record);
  s.on_event([&](const std::string& m) {
    events.push_back(m);
    if (events.size() == 3) stop = true;  // after the second disconnect
  });
  CHECK(s.run(stop) == SessionEnd::stopped);
  record.close();
  CHECK(events == std::vector<std::string>{
                      "/dev/ttyFAKE: disconnected (end of file); the record is kept, waiting for "
                      "the port to come back",
                      "/dev/ttyFAKE: connected again",
                      "/dev/ttyFAKE: disconnected (end of file); the record is kept, waiting for "
                      "the port to come back"});
  CHECK(opener.failures == 3);
  const CsvResult r = read_csv_file(p.string());
  REQUIRE(r.capture.samples() == 6);
  const auto& ch1 = r.capture.channels[0].values;
  CHECK(ch1[0] == 1 * 5.0 / 1024);
  CHECK(ch1[1] == 2 * 5.0 / 1024);
  CHECK(std::isnan(ch1[2]));  // the gap row at the first disconnect
  CHECK(ch1[3] == 3 * 5.0 / 1024);
  CHECK(std::isnan(ch1[5]));
  // The time base goes on after the gap, by at least the time away (three
  // retries 10 ms apart).
  CHECK(r.capture.time.at(2) == 0.002);
  CHECK(r.capture.time.at(3) >= 0.002 + 0.02);
  CHECK(r.capture.time.at(4) == r.capture.time.at(3) + 0.001);
}

TEST_CASE("a --seconds limit ends the record at the sample, mid-read") {
  std::string text;
  for (int i = 0; i < 100; ++i) text += fmt::format("{}\n", i);
  Opener opener;
  opener.sources.push_back(std::make_unique<FakeSource>(std::deque<FakeStep>{chunk(text)}, 1000));
  SessionOptions o = text_options(10.0);
  o.duration_s = 2.5;
  const fs::path p = scratch("session-seconds.csv");
  RecordWriter record(p.string(), false);
  LiveSession s(o, std::ref(opener));
  s.set_record(&record);
  const std::atomic<bool> stop{false};
  CHECK(s.run(stop) == SessionEnd::duration);
  record.close();
  const auto lines = record_lines(p);
  REQUIRE(lines.size() == 1 + 25);  // 0 s to 2.4 s at 10 samples a second
  CHECK(lines.back() == "2.4,0.1171875");
}

TEST_CASE("the live view's status comes from its own thread and measures the window") {
  // 30 cycles of a square wave, 20 samples a cycle at 1 kS/s: 50 Hz, 40 % duty.
  std::string text;
  for (int i = 0; i < 600; ++i) text += (i % 20) < 8 ? "900\n" : "20\n";
  Opener opener;
  opener.sources.push_back(std::make_unique<FakeSource>(
      std::deque<FakeStep>{chunk(text), status(ReadStatus::timeout), status(ReadStatus::timeout)},
      4096));
  SessionOptions o = text_options(1000.0);
  o.update_interval_s = 0.01;
  o.reconnect = true;
  std::atomic<bool> stop{false};
  LiveWindow window(1.0);
  LiveSession s(o, std::ref(opener));
  s.set_window(&window);
  std::optional<WindowReading> seen;
  s.on_status([&](const SessionStatus& st) {
    if (st.reading && st.reading->cycles > 0 && st.samples == 600) {
      seen = st.reading;
      stop = true;
    }
  });
  s.on_event([&](const std::string&) {});
  s.run(stop);
  REQUIRE(seen.has_value());
  CHECK(seen->frequency_Hz == Approx(50.0).epsilon(1e-9));
  CHECK(seen->duty == Approx(0.4).epsilon(1e-9));
  CHECK(std::isnan(seen->cap_min_V));  // no capacitor channel
}
