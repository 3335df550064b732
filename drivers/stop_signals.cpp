// benchtau: stop requests from signals.
#include "drivers/stop_signals.h"

namespace benchtau {
namespace {

std::atomic<bool> g_stop{false};
std::atomic<int> g_signal{0};
static_assert(std::atomic<bool>::is_always_lock_free,
              "the handler may only touch lock-free atomics");

extern "C" void on_stop_signal(int sig) {
  g_signal.store(sig);
  g_stop.store(true);
}

}  // namespace

StopSignals::StopSignals() {
  g_stop.store(false);
  g_signal.store(0);
  struct sigaction sa {};
  sa.sa_handler = on_stop_signal;
  sigemptyset(&sa.sa_mask);
  sa.sa_flags = 0;  // no SA_RESTART: poll() returns EINTR at once
  sigaction(SIGINT, &sa, &old_int_);
  sigaction(SIGTERM, &sa, &old_term_);
  sigaction(SIGHUP, &sa, &old_hup_);
  struct sigaction ignore {};
  ignore.sa_handler = SIG_IGN;
  sigemptyset(&ignore.sa_mask);
  sigaction(SIGPIPE, &ignore, &old_pipe_);
}

StopSignals::~StopSignals() {
  sigaction(SIGINT, &old_int_, nullptr);
  sigaction(SIGTERM, &old_term_, nullptr);
  sigaction(SIGHUP, &old_hup_, nullptr);
  sigaction(SIGPIPE, &old_pipe_, nullptr);
}

const std::atomic<bool>& StopSignals::flag() const { return g_stop; }
int StopSignals::signal() const { return g_signal.load(); }

}  // namespace benchtau
