// benchtau: writes every sample to a CSV capture as it arrives, flushed often enough that a
// crash or a pulled cable loses at most the last fraction of a second.
#pragma once

#include <array>
#include <chrono>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "drivers/adc_scale.h"
#include "drivers/sample_batch.h"
#include "drivers/unique_fd.h"

namespace benchtau {

// The file reads back with `benchtau measure`: a header "t_s,ch1_V,ch2_V",
// then one row per sample in the shortest text that reads back to the same
// double, and a gap row ("0.0125,,") with empty cells where samples are
// missing, so that no edge is ever timed across the gap.
class RecordWriter {
 public:
  using Clock = std::chrono::steady_clock;
  static constexpr double kFlushInterval_s = 0.2;

  // Creates path at once (so that a name already taken is an error before any
  // waiting), and writes the header with the first samples, when the channel
  // count is known. Never replaces a file that exists unless force is set.
  // Throws InputError naming path.
  RecordWriter(std::string path, bool force);
  RecordWriter(const RecordWriter&) = delete;
  RecordWriter& operator=(const RecordWriter&) = delete;
  ~RecordWriter();  // closes (flushes) if close() was not called; errors are lost there

  // Appends batch's rows, counts scaled to volts. A gap row flushes at once.
  void append(const SampleBatch& batch, const AdcScale& scale);
  void add_gap(double t_s);
  // Writes what is buffered if kFlushInterval_s has passed since the last
  // write, or the buffer is large. Call it at least every 0.1 s.
  void flush_if_due(Clock::time_point now = Clock::now());
  void flush();
  // Flushes, syncs to the disk and closes. Throws InputError on failure.
  void close();

  const std::string& path() const { return path_; }
  std::size_t channels() const { return channels_; }  // 0 before the first samples
  std::uint64_t rows() const { return rows_; }        // sample rows, gap rows not included
  std::uint64_t gaps() const { return gaps_; }
  double last_t_s() const { return last_t_s_; }  // NaN before the first row

 private:
  void write_all(const char* data, std::size_t size);
  // ",<volts>" for a count: a count has 65536 values, so each is formatted once.
  std::string_view volts_text(std::uint16_t count, double volts_per_count);

  std::string path_;
  std::size_t channels_ = 0;
  UniqueFd fd_;
  std::string buffer_;
  Clock::time_point last_flush_;
  std::uint64_t rows_ = 0;
  std::uint64_t gaps_ = 0;
  double last_t_s_;
  double cached_scale_ = 0.0;
  std::vector<std::uint8_t> cached_length_;  // 0: not formatted yet
  std::vector<std::array<char, 32>> cached_text_;
};

}  // namespace benchtau
