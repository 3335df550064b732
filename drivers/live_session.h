// benchtau: the recording loop behind `watch` and `capture`: read, decode, record, feed the live
// view, and ride out a pulled cable by reconnecting when the port comes back.
#pragma once

#include <atomic>
#include <cstdint>
#include <functional>
#include <memory>
#include <mutex>
#include <optional>
#include <string>

#include "drivers/adc_scale.h"
#include "drivers/byte_source.h"
#include "drivers/live_window.h"
#include "drivers/record_writer.h"
#include "drivers/stream_decoder.h"

namespace benchtau {

struct SessionOptions {
  std::string port;
  StreamOptions stream;
  AdcScale scale;
  std::optional<double> duration_s;  // stop after this much sample time (from the first sample)
  bool reconnect = true;             // otherwise a disconnect ends the session
  double retry_interval_s = 0.5;     // between attempts to reopen a vanished port
  double update_interval_s = 0.25;   // between status reports
  double measure_interval_s = 0.5;   // between measurements of the window (the costly part)
  int read_timeout_ms = 50;          // bounds how late a stop or a flush can be
};

// A snapshot of the session for the live view and the final summary.
struct SessionStatus {
  std::string port;
  std::string via;  // how the port was opened, "" while away
  bool connected = false;
  StreamFormat format = StreamFormat::detect;
  std::size_t channels = 0;
  StreamCounters counters;       // over every connection
  std::uint64_t samples = 0;     // sample rows decoded
  std::uint64_t gaps = 0;        // gap rows (lost frames, restarts, disconnects)
  std::uint64_t over_range = 0;  // counts above the ADC's full scale (--bits too small?)
  std::uint64_t disconnects = 0;
  double first_t_s = 0.0;                // of the first sample
  double last_t_s = 0.0;                 // of the last sample; equal to first_t_s before any
  double elapsed_s = 0.0;                // wall time since the session began
  std::optional<WindowReading> reading;  // with a live window
};

enum class SessionEnd { stopped, duration, disconnected };

using PortOpener = std::function<std::unique_ptr<ByteSource>(const std::string& port)>;

class LiveSession {
 public:
  LiveSession(SessionOptions options, PortOpener opener);
  LiveSession(const LiveSession&) = delete;
  LiveSession& operator=(const LiveSession&) = delete;

  // Each is optional. The record gets every sample; the window only feeds
  // the status reports, measured on a thread of its own so that the reading
  // never waits for it.
  void set_record(RecordWriter* record) { record_ = record; }
  void set_window(LiveWindow* window) { window_ = window; }
  // Called every update_interval_s with a fresh status (on the view thread).
  void on_status(std::function<void(const SessionStatus&)> f) { on_status_ = std::move(f); }
  // Called on a disconnect, a reconnect and the like, with a sentence.
  void on_event(std::function<void(const std::string&)> f) { on_event_ = std::move(f); }

  // Opens the port; throws PortError (the user named a port that is not
  // usable). run() calls it when it has not been called.
  void open();

  // Reads until stop is set, the duration is reached, or
  // (without reconnect) the port goes away. Throws InputError when the stream
  // cannot be decoded (its format, no rate) and when the record cannot be
  // written; the record keeps what was written before.
  SessionEnd run(const std::atomic<bool>& stop);

  SessionStatus status() const;

 private:
  void connect(std::unique_ptr<ByteSource> source, double t0_s);
  void process(std::span<const std::uint8_t> bytes);
  void deliver();  // batch_ to the record, the window and the status
  void disconnect(const std::string& why);
  bool try_reconnect();
  void view_loop(const std::atomic<bool>& done);
  void event(const std::string& message);

  SessionOptions options_;
  PortOpener opener_;
  RecordWriter* record_ = nullptr;
  LiveWindow* window_ = nullptr;
  std::function<void(const SessionStatus&)> on_status_;
  std::function<void(const std::string&)> on_event_;

  std::unique_ptr<ByteSource> source_;
  std::unique_ptr<StreamDecoder> decoder_;
  SampleBatch batch_;
  bool done_ = false;  // the duration was reached
  bool have_sample_ = false;
  double disconnect_t_s_ = 0.0;  // time of the gap row written at a disconnect
  std::chrono::steady_clock::time_point start_, away_since_, next_retry_;
  std::string away_reason_;

  mutable std::mutex mutex_;  // guards status_, finished_, current_, pending_, decoder_ swaps
  SessionStatus status_;
  StreamCounters finished_;  // counters of the decoders of earlier connections
  StreamCounters current_;   // the present decoder's, as of its last feed
  SampleBatch pending_;      // rows for the view thread
  std::mutex print_mutex_;   // one callback at a time
};

}  // namespace benchtau
