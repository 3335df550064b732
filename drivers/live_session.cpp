// benchtau: the recording loop: one reading thread that never waits for the view, a view
// thread that measures the window, and the reconnect logic.
#include "drivers/live_session.h"

#include <fmt/format.h>
#include <pthread.h>
#include <signal.h>

#include <array>
#include <cmath>
#include <thread>

#include "drivers/serial_port.h"

namespace benchtau {
namespace {

using Clock = std::chrono::steady_clock;

double seconds(Clock::duration d) { return std::chrono::duration<double>(d).count(); }

// The view thread gets no stop signals: they interrupt the reading thread's poll().
void block_stop_signals() {
  sigset_t set;
  sigemptyset(&set);
  sigaddset(&set, SIGINT);
  sigaddset(&set, SIGTERM);
  sigaddset(&set, SIGHUP);
  pthread_sigmask(SIG_BLOCK, &set, nullptr);
}

// The view keeps no more than this many rows waiting; it shows only the last
// seconds anyway, and the record has them all.
constexpr std::size_t kMaxPendingRows = std::size_t{1} << 22;

}  // namespace

LiveSession::LiveSession(SessionOptions options, PortOpener opener)
    : options_(std::move(options)), opener_(std::move(opener)) {
  options_.stream.source = options_.port;
  status_.port = options_.port;
}

SessionStatus LiveSession::status() const {
  const std::lock_guard lock(mutex_);
  SessionStatus s = status_;
  s.counters = finished_;
  s.counters += current_;
  s.elapsed_s = seconds(Clock::now() - start_);
  return s;
}

void LiveSession::event(const std::string& message) {
  if (!on_event_) return;
  const std::lock_guard lock(print_mutex_);
  on_event_(message);
}

void LiveSession::connect(std::unique_ptr<ByteSource> source, double t0_s) {
  const std::lock_guard lock(mutex_);
  if (decoder_) {
    finished_ += current_;
    current_ = {};
    // Later connections read the format found the first time.
    options_.stream.format =
        decoder_->format() == StreamFormat::detect ? options_.stream.format : decoder_->format();
    options_.stream.timestamps = options_.stream.timestamps || decoder_->text_timestamps();
  }
  decoder_ = std::make_unique<StreamDecoder>(options_.stream, t0_s);
  status_.via = source->description();
  status_.connected = true;
  source_ = std::move(source);
}

void LiveSession::open() {
  start_ = Clock::now();
  connect(opener_(options_.port), 0.0);
}

SessionEnd LiveSession::run(const std::atomic<bool>& stop) {
  if (!source_ && !decoder_) open();

  std::atomic<bool> view_done{false};
  std::thread view;
  if (on_status_) view = std::thread([this, &view_done] { view_loop(view_done); });
  struct Joiner {
    std::atomic<bool>& done;
    std::thread& t;
    ~Joiner() {
      done.store(true);
      if (t.joinable()) t.join();
    }
  } joiner{view_done, view};

  std::array<std::uint8_t, 16384> buffer{};
  SessionEnd end = SessionEnd::stopped;
  while (!stop.load()) {
    if (source_) {
      const ReadResult r = source_->read(buffer, options_.read_timeout_ms);
      if (r.status == ReadStatus::data) {
        process({buffer.data(), r.bytes});
      } else if (r.status == ReadStatus::closed) {
        disconnect(r.detail);
        if (!options_.reconnect) {
          end = SessionEnd::disconnected;
          break;
        }
      }
    } else if (!try_reconnect()) {
      // Sleep a little, but wake for a stop: a signal ends the sleep early.
      std::this_thread::sleep_for(std::chrono::milliseconds(options_.read_timeout_ms));
    }
    if (record_) record_->flush_if_due();
    if (done_) {
      end = SessionEnd::duration;
      break;
    }
  }
  if (record_) record_->flush();
  return end;
}

void LiveSession::process(std::span<const std::uint8_t> bytes) {
  batch_.clear();
  decoder_->feed(bytes, batch_);
  deliver();
}

void LiveSession::deliver() {
  const std::lock_guard lock(mutex_);
  current_ = decoder_->counters();
  status_.format = decoder_->format();
  if (batch_.rows() == 0) return;
  // The end of a --seconds recording, to the sample.
  std::size_t rows = batch_.rows();
  if (options_.duration_s) {
    const double first = have_sample_ ? status_.first_t_s : batch_.t_s[0];
    for (std::size_t i = 0; i < rows; ++i) {
      if (batch_.t_s[i] - first >= *options_.duration_s) {
        rows = i;
        done_ = true;
        break;
      }
    }
    batch_.t_s.resize(rows);
    batch_.counts.resize(rows * batch_.channels);
    batch_.gap.resize(rows);
  }
  const std::uint32_t full_scale = options_.scale.full_scale();
  for (std::size_t i = 0; i < rows; ++i) {
    if (batch_.gap[i]) {
      ++status_.gaps;
      continue;
    }
    if (!have_sample_) {
      status_.first_t_s = batch_.t_s[i];
      have_sample_ = true;
    }
    status_.last_t_s = batch_.t_s[i];
    ++status_.samples;
    for (const std::uint16_t c : batch_.row(i)) status_.over_range += c > full_scale;
  }
  status_.channels = batch_.channels;
  if (record_) record_->append(batch_, options_.scale);
  if (window_ && on_status_) {
    if (pending_.rows() > kMaxPendingRows) pending_.clear();
    pending_.channels = batch_.channels;
    pending_.t_s.insert(pending_.t_s.end(), batch_.t_s.begin(), batch_.t_s.end());
    pending_.counts.insert(pending_.counts.end(), batch_.counts.begin(), batch_.counts.end());
    pending_.gap.insert(pending_.gap.end(), batch_.gap.begin(), batch_.gap.end());
  }
}

void LiveSession::disconnect(const std::string& why) {
  // A line held back for checking is all there will be of it.
  batch_.clear();
  decoder_->finish(batch_);
  deliver();
  {
    const std::lock_guard lock(mutex_);
    source_.reset();
    status_.connected = false;
    status_.via.clear();
    ++status_.disconnects;
    // Mark the break in the record at the time the next sample was due.
    disconnect_t_s_ = decoder_->next_t_s();
    if (have_sample_) {
      ++status_.gaps;
      if (pending_.channels != 0) pending_.add_gap(disconnect_t_s_);
    }
  }
  if (record_ && have_sample_) record_->add_gap(disconnect_t_s_);
  if (record_) record_->flush();
  away_since_ = Clock::now();
  next_retry_ = away_since_;
  away_reason_.clear();
  event(fmt::format("{}: disconnected ({}); the record is kept{}", options_.port, why,
                    options_.reconnect ? ", waiting for the port to come back" : ""));
}

bool LiveSession::try_reconnect() {
  const auto now = Clock::now();
  if (now < next_retry_) return false;
  next_retry_ = now + std::chrono::duration_cast<Clock::duration>(
                          std::chrono::duration<double>(options_.retry_interval_s));
  std::unique_ptr<ByteSource> source;
  try {
    source = opener_(options_.port);
  } catch (const PortError& e) {
    // Say so once per reason: a port coming back may be busy or locked for a moment.
    if (e.message() != away_reason_) {
      away_reason_ = e.message();
      if (e.problem() != PortProblem::missing)
        event(fmt::format("{}: {}", options_.port, e.message()));
    }
    return false;
  }
  // The board ran on while away: the wall time away keeps the timeline honest.
  const double t0 = disconnect_t_s_ + seconds(now - away_since_);
  connect(std::move(source), t0);
  event(fmt::format("{}: connected again", options_.port));
  return true;
}

void LiveSession::view_loop(const std::atomic<bool>& done) {
  block_stop_signals();
  const auto interval = std::chrono::duration_cast<Clock::duration>(
      std::chrono::duration<double>(options_.update_interval_s));
  auto next = Clock::now() + interval;
  SampleBatch rows;
  std::optional<WindowReading> reading;
  auto next_measure = Clock::now();
  while (!done.load()) {
    std::this_thread::sleep_until(std::min(next, Clock::now() + std::chrono::milliseconds(20)));
    if (Clock::now() < next) continue;
    next += interval;
    {
      const std::lock_guard lock(mutex_);
      std::swap(rows, pending_);
      pending_.clear();
      pending_.channels = rows.channels;
    }
    SessionStatus s = status();
    if (window_) {
      window_->append(rows, options_.scale);
      if (Clock::now() >= next_measure) {
        reading = window_->read();
        next_measure =
            Clock::now() + std::chrono::duration_cast<Clock::duration>(
                               std::chrono::duration<double>(options_.measure_interval_s));
      }
      s.reading = reading;
    }
    rows.clear();
    const std::lock_guard lock(print_mutex_);
    on_status_(s);
  }
}

}  // namespace benchtau
