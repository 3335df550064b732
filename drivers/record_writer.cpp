// benchtau: the CSV record writer: exclusive create, shortest round-trip numbers, timed flushes.
#include "drivers/record_writer.h"

#include <fcntl.h>
#include <fmt/format.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <iterator>
#include <limits>

#include "src/core/input_error.h"

namespace benchtau {
namespace {

// Bigger than this, the buffer goes out at once: a fast stream should not
// hold much more than a fraction of a second either.
constexpr std::size_t kFlushBytes = 256 * 1024;

}  // namespace

RecordWriter::RecordWriter(std::string path, bool force)
    : path_(std::move(path)),
      last_flush_(Clock::now()),
      last_t_s_(std::numeric_limits<double>::quiet_NaN()) {
  // O_EXCL: the user's data must not be lost to a typo in the file name.
  const int flags = O_WRONLY | O_CREAT | O_CLOEXEC | (force ? O_TRUNC : O_EXCL);
  fd_.reset(::open(path_.c_str(), flags, 0644));
  if (!fd_) {
    if (errno == EEXIST) {
      throw InputError(path_, 0, 0,
                       "already exists; give --force to replace it, or choose another name");
    }
    throw InputError(path_, 0, 0, fmt::format("cannot create: {}", std::strerror(errno)));
  }
}

RecordWriter::~RecordWriter() {
  if (!fd_) return;
  try {
    close();
  } catch (...) {
    // Nothing more can be done for the data here; close() is the checked path.
  }
}

void RecordWriter::append(const SampleBatch& batch, const AdcScale& scale) {
  if (batch.rows() == 0) return;
  if (channels_ == 0) {
    channels_ = batch.channels;
    buffer_ += "t_s";
    for (std::size_t c = 1; c <= channels_; ++c) {
      fmt::format_to(std::back_inserter(buffer_), ",ch{}_V", c);
    }
    buffer_ += '\n';
  }
  if (batch.channels != channels_) {
    throw InputError(path_, 0, 0,
                     fmt::format("the stream changed from {} to {} channels; a record keeps its "
                                 "columns",
                                 channels_, batch.channels));
  }
  const double k = scale.volts_per_count();
  auto out = std::back_inserter(buffer_);
  bool gap = false;
  for (std::size_t i = 0; i < batch.rows(); ++i) {
    if (batch.gap[i]) {
      fmt::format_to(out, "{}", batch.t_s[i]);
      buffer_.append(channels_, ',');
      buffer_ += '\n';
      ++gaps_;
      gap = true;
    } else {
      fmt::format_to(out, "{}", batch.t_s[i]);
      for (const std::uint16_t c : batch.row(i)) buffer_ += volts_text(c, k);
      buffer_ += '\n';
      ++rows_;
    }
    last_t_s_ = batch.t_s[i];
  }
  // A gap is where a crash is most likely (a cable pulled): write at once.
  if (gap || buffer_.size() >= kFlushBytes) flush();
}

std::string_view RecordWriter::volts_text(std::uint16_t count, double volts_per_count) {
  if (volts_per_count != cached_scale_) {
    cached_scale_ = volts_per_count;
    cached_length_.assign(65536, 0);
    cached_text_.resize(65536);
  }
  auto& text = cached_text_[count];
  if (cached_length_[count] == 0) {
    // The shortest text that reads back to the same double: at most 24 characters.
    const auto r = fmt::format_to_n(text.data(), text.size(), ",{}", count * volts_per_count);
    cached_length_[count] = static_cast<std::uint8_t>(r.size);
  }
  return {text.data(), cached_length_[count]};
}

void RecordWriter::add_gap(double t_s) {
  if (channels_ == 0) return;  // nothing recorded yet, so nothing is missing from it
  fmt::format_to(std::back_inserter(buffer_), "{}", t_s);
  buffer_.append(channels_, ',');
  buffer_ += '\n';
  ++gaps_;
  last_t_s_ = t_s;
  flush();
}

void RecordWriter::flush_if_due(Clock::time_point now) {
  if (buffer_.empty()) {
    last_flush_ = now;
    return;
  }
  const std::chrono::duration<double> since = now - last_flush_;
  if (since.count() >= kFlushInterval_s || buffer_.size() >= kFlushBytes) flush();
}

void RecordWriter::flush() {
  if (!buffer_.empty()) write_all(buffer_.data(), buffer_.size());
  buffer_.clear();
  last_flush_ = Clock::now();
}

void RecordWriter::write_all(const char* data, std::size_t size) {
  // write() hands the bytes to the kernel: they survive the process being
  // killed. Whole rows go in one call where the kernel allows.
  while (size > 0) {
    const ssize_t n = ::write(fd_.get(), data, size);
    if (n < 0) {
      if (errno == EINTR) continue;
      throw InputError(path_, 0, 0, fmt::format("cannot write: {}", std::strerror(errno)));
    }
    data += n;
    size -= static_cast<std::size_t>(n);
  }
}

void RecordWriter::close() {
  if (!fd_) return;
  flush();
  // fsync: the record should also outlive a power cut after a clean stop.
  if (::fsync(fd_.get()) != 0 && errno != EINVAL) {
    const int e = errno;
    fd_.reset();
    throw InputError(path_, 0, 0, fmt::format("cannot save: {}", std::strerror(e)));
  }
  if (::close(fd_.release()) != 0) {
    throw InputError(path_, 0, 0, fmt::format("cannot close: {}", std::strerror(errno)));
  }
}

}  // namespace benchtau
