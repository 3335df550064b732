// benchtau tests: ptys, a scripted fake port, frames from the reference firmware's encoder, and
// scratch files, shared by the serial tests.
#pragma once

#include <fcntl.h>
#include <fmt/format.h>
#include <stdlib.h>
#include <termios.h>
#include <unistd.h>
#include <catch2/catch.hpp>

#include <cerrno>
#include <chrono>
#include <cstdint>
#include <deque>
#include <filesystem>
#include <fstream>
#include <span>
#include <string>
#include <thread>
#include <vector>

#include "bt_frame.h"
#include "drivers/byte_source.h"
#include "drivers/unique_fd.h"

namespace benchtau::test {

namespace fs = std::filesystem;

// A pty pair. The slave is opened here too and set raw before anything is
// written, so that no byte is echoed or taken for a control character, and so
// that closing the master is seen by the reader as the link going down.
struct PtyPair {
  UniqueFd master;
  UniqueFd slave;
  std::string slave_path;

  PtyPair() {
    master.reset(::posix_openpt(O_RDWR | O_NOCTTY | O_CLOEXEC));
    REQUIRE(master.valid());
    REQUIRE(::grantpt(master.get()) == 0);
    REQUIRE(::unlockpt(master.get()) == 0);
    const char* name = ::ptsname(master.get());
    REQUIRE(name != nullptr);
    slave_path = name;
    slave.reset(::open(slave_path.c_str(), O_RDWR | O_NOCTTY | O_CLOEXEC));
    REQUIRE(slave.valid());
    termios t{};
    REQUIRE(::tcgetattr(slave.get(), &t) == 0);
    ::cfmakeraw(&t);
    REQUIRE(::tcsetattr(slave.get(), TCSANOW, &t) == 0);
  }

  // Writes all of bytes to the master, in pieces of at most chunk bytes.
  void write(std::span<const std::uint8_t> bytes, std::size_t chunk = 4096) const {
    while (!bytes.empty()) {
      const std::size_t n = std::min(chunk, bytes.size());
      const ssize_t w = ::write(master.get(), bytes.data(), n);
      if (w < 0 && errno == EINTR) continue;
      REQUIRE(w > 0);
      bytes = bytes.subspan(static_cast<std::size_t>(w));
    }
  }
  void write(const std::string& text) const {
    write({reinterpret_cast<const std::uint8_t*>(text.data()), text.size()});
  }
  // Unplugs: the reader's next read after the buffered bytes fails with EIO.
  void close_master() { master.reset(); }
};

// One scripted step of a fake port.
struct FakeStep {
  ReadStatus status = ReadStatus::data;
  std::vector<std::uint8_t> bytes;  // with data: returned, perhaps over several reads
  std::string detail;               // with closed
};

// A port that plays a script: data (in reads no longer than max_read bytes),
// timeouts, EINTR and the end of the link. After the script it reports closed.
class FakeSource final : public ByteSource {
 public:
  FakeSource(std::deque<FakeStep> steps, std::size_t max_read)
      : steps_(std::move(steps)), max_read_(max_read) {}
  ReadResult read(std::span<std::uint8_t> buffer, int) override {
    ++reads_;
    if (steps_.empty()) return {ReadStatus::closed, 0, "end of script"};
    FakeStep& s = steps_.front();
    if (s.status != ReadStatus::data) {
      ReadResult r{s.status, 0, s.detail};
      steps_.pop_front();
      return r;
    }
    const std::size_t n = std::min({buffer.size(), max_read_, s.bytes.size() - offset_});
    std::copy_n(s.bytes.begin() + static_cast<std::ptrdiff_t>(offset_), n, buffer.begin());
    offset_ += n;
    if (offset_ == s.bytes.size()) {
      steps_.pop_front();
      offset_ = 0;
    }
    return {ReadStatus::data, n, {}};
  }
  std::string description() const override { return "fake port"; }
  std::size_t reads() const { return reads_; }

 private:
  std::deque<FakeStep> steps_;
  std::size_t max_read_;
  std::size_t offset_ = 0;
  std::size_t reads_ = 0;
};

// Frames of `channels` channels and `sets` sets each, from the reference
// firmware's encoder. counts is row after row; it is cut into frames in order.
struct EncodedFrames {
  std::vector<std::uint8_t> bytes;
  std::vector<std::size_t> offsets;  // where each frame begins
};

inline EncodedFrames encode_frames(std::span<const std::uint16_t> counts, std::uint8_t channels,
                                   std::uint8_t sets, std::uint16_t first_sequence = 0,
                                   std::uint8_t flags = 0) {
  EncodedFrames out;
  std::vector<std::uint8_t> frame(BT_FRAME_MAX_BYTES);
  const std::size_t per_frame = std::size_t{channels} * sets;
  REQUIRE(counts.size() % per_frame == 0);
  auto seq = first_sequence;
  for (std::size_t i = 0; i < counts.size(); i += per_frame) {
    const std::size_t n =
        bt_frame_encode(frame.data(), flags, seq++, channels, sets, counts.data() + i);
    REQUIRE(n == BT_FRAME_BYTES(channels, sets));
    out.offsets.push_back(out.bytes.size());
    out.bytes.insert(out.bytes.end(), frame.begin(), frame.begin() + static_cast<long>(n));
  }
  return out;
}

// Counts for rows rows of channels channels: a pattern that is easy to check
// and uses the whole 16 bits (row r, channel c).
inline std::uint16_t pattern_count(std::size_t r, std::size_t c) {
  return static_cast<std::uint16_t>((r * 2654435761u + c * 40503u) & 0xFFFFu);
}
inline std::vector<std::uint16_t> pattern_counts(std::size_t rows, std::size_t channels) {
  std::vector<std::uint16_t> v(rows * channels);
  for (std::size_t r = 0; r < rows; ++r)
    for (std::size_t c = 0; c < channels; ++c) v[r * channels + c] = pattern_count(r, c);
  return v;
}

// A fresh scratch path under the build tree (removed if it exists).
inline fs::path scratch(const std::string& name) {
  const fs::path dir = fs::path(BENCHTAU_BINARY_DIR) / "test-scratch" / "serial";
  fs::create_directories(dir);
  const fs::path p = dir / name;
  fs::remove(p);
  return p;
}

inline std::string slurp(const fs::path& p) {
  std::ifstream f(p, std::ios::binary);
  return {std::istreambuf_iterator<char>(f), std::istreambuf_iterator<char>()};
}

inline std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> out;
  std::size_t start = 0;
  while (start < text.size()) {
    const std::size_t nl = text.find('\n', start);
    if (nl == std::string::npos) {
      out.push_back(text.substr(start));
      break;
    }
    out.push_back(text.substr(start, nl - start));
    start = nl + 1;
  }
  return out;
}

// Waits up to timeout for cond, polling every 10 ms.
template <class F>
bool wait_for(F cond, std::chrono::milliseconds timeout = std::chrono::milliseconds(5000)) {
  const auto end = std::chrono::steady_clock::now() + timeout;
  while (std::chrono::steady_clock::now() < end) {
    if (cond()) return true;
    std::this_thread::sleep_for(std::chrono::milliseconds(10));
  }
  return cond();
}

}  // namespace benchtau::test

#include <signal.h>
#include <sys/wait.h>

namespace benchtau::test {

// Starts BENCHTAU_EXE with args, its standard output and error going to the
// given files (or /dev/null). Returns the child's pid.
inline pid_t spawn_benchtau(const std::vector<std::string>& args,
                            const std::string& out = "/dev/null",
                            const std::string& err = "/dev/null") {
  std::vector<std::string> all{BENCHTAU_EXE};
  all.insert(all.end(), args.begin(), args.end());
  std::vector<char*> argv;
  for (auto& a : all) argv.push_back(a.data());
  argv.push_back(nullptr);
  const pid_t pid = ::fork();
  REQUIRE(pid >= 0);
  if (pid == 0) {
    const int o = ::open(out.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    const int e = ::open(err.c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    if (o < 0 || e < 0) ::_exit(127);
    ::dup2(o, STDOUT_FILENO);
    ::dup2(e, STDERR_FILENO);
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  return pid;
}

// Waits for the child; returns its exit code, or 128 + the signal that ended it.
inline int wait_child(pid_t pid) {
  int status = 0;
  while (::waitpid(pid, &status, 0) < 0) {
    if (errno != EINTR) return -1;
  }
  if (WIFEXITED(status)) return WEXITSTATUS(status);
  if (WIFSIGNALED(status)) return 128 + WTERMSIG(status);
  return -1;
}

}  // namespace benchtau::test
