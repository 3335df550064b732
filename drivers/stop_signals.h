// benchtau: Ctrl-C, SIGTERM and a closed terminal become a stop request that a read loop sees.
#pragma once

#include <atomic>
#include <csignal>

namespace benchtau {

// While one lives, SIGINT, SIGTERM and SIGHUP set the flag instead of killing
// the process, and interrupt a blocking poll() (no SA_RESTART), so the record
// is flushed and closed. SIGPIPE is ignored: a closed pipe on stdout must not
// cost the record. The old handlers come back on destruction. One at a time.
class StopSignals {
 public:
  StopSignals();
  StopSignals(const StopSignals&) = delete;
  StopSignals& operator=(const StopSignals&) = delete;
  ~StopSignals();

  const std::atomic<bool>& flag() const;
  // The signal that asked to stop, 0 if none.
  int signal() const;

 private:
  struct sigaction old_int_ {};
  struct sigaction old_term_ {};
  struct sigaction old_hup_ {};
  struct sigaction old_pipe_ {};
};

}  // namespace benchtau
