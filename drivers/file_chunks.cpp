// benchtau: reading a capture's bytes by offset and in blocks of whole lines.
#include "drivers/file_chunks.h"

#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <utility>

#include "src/core/input_error.h"

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

namespace benchtau::csv {

ByteSource ByteSource::memory(std::span<const char> bytes) {
  ByteSource s;
  s.bytes_ = bytes;
  s.size_ = bytes.size();
  return s;
}

ByteSource ByteSource::file(int fd, std::size_t size_bytes, std::string name) {
  ByteSource s;
  s.fd_ = fd;
  s.size_ = size_bytes;
  s.name_ = std::move(name);
  return s;
}

void ByteSource::read_into(std::size_t offset, std::span<char> out) const {
  if (in_memory()) {
    std::memcpy(out.data(), bytes_.data() + offset, out.size());
    return;
  }
  std::size_t done = 0;
  while (done < out.size()) {
    const ssize_t n =
        ::pread(fd_, out.data() + done, out.size() - done, static_cast<off_t>(offset + done));
    if (n < 0) {
      if (errno == EINTR) continue;
      throw InputError(name_, 0, 0, std::string("cannot read: ") + std::strerror(errno));
    }
    // The file shrank under us: say so rather than parse a torn buffer.
    if (n == 0) throw InputError(name_, 0, 0, "cannot read: the file got shorter while reading");
    done += static_cast<std::size_t>(n);
  }
}

std::span<const char> ByteSource::view(std::size_t offset, std::size_t length,
                                       std::vector<char>& scratch) const {
  if (offset >= size_) return {};
  length = std::min(length, size_ - offset);
  if (in_memory()) return bytes_.subspan(offset, length);
  scratch.resize(length);
  read_into(offset, scratch);
  return {scratch.data(), length};
}

std::size_t ByteSource::next_line_start(std::size_t offset) const {
  constexpr std::size_t window = 64 * 1024;
  std::vector<char> scratch;
  while (offset < size_) {
    const auto bytes = view(offset, window, scratch);
    const void* nl = std::memchr(bytes.data(), '\n', bytes.size());
    if (nl != nullptr)
      return offset + static_cast<std::size_t>(static_cast<const char*>(nl) - bytes.data()) + 1;
    offset += bytes.size();
  }
  return size_;
}

LineBlocks::LineBlocks(const ByteSource& source, std::size_t begin, std::size_t end,
                       std::size_t block_bytes)
    : source_(source), pos_(begin), end_(std::min(end, source.size())), block_bytes_(block_bytes) {}

std::span<const char> LineBlocks::next() {
  if (source_.in_memory()) {
    if (pos_ >= end_) return {};
    std::vector<char> unused;
    const auto all = source_.view(pos_, end_ - pos_, unused);
    pos_ = end_;
    return all;
  }
  if (carry_size_ > 0 && carry_begin_ > 0) {
    std::memmove(buffer_.data(), buffer_.data() + carry_begin_, carry_size_);
  }
  carry_begin_ = 0;
  std::size_t filled = carry_size_;
  carry_size_ = 0;
  std::size_t want = block_bytes_;
  while (true) {
    const std::size_t n = std::min(want, end_ - pos_);
    if (buffer_.size() < filled + n) buffer_.resize(filled + n);
    if (n > 0) source_.read_into(pos_, {buffer_.data() + filled, n});
    pos_ += n;
    filled += n;
    if (pos_ >= end_) return {buffer_.data(), filled};
    const char* base = buffer_.data();
    const void* last_nl = ::memrchr(base, '\n', filled);
    if (last_nl != nullptr) {
      const auto keep = static_cast<std::size_t>(static_cast<const char*>(last_nl) - base) + 1;
      carry_begin_ = keep;
      carry_size_ = filled - keep;
      return {base, keep};
    }
    // One line longer than a block: read on, doubling, so the cost stays linear.
    want = std::max(want, filled);
  }
}

std::size_t count_newlines(std::span<const char> bytes) {
  const char* p = bytes.data();
  std::size_t n = bytes.size();
  std::size_t count = 0;
#if defined(__SSE2__)
  // Byte counters of matches (0 - (-1) per hit), summed before they can wrap.
  const __m128i nl = _mm_set1_epi8('\n');
  const __m128i zero = _mm_setzero_si128();
  while (n >= 16) {
    __m128i hits = zero;
    for (int i = 0; i < 255 && n >= 16; ++i, p += 16, n -= 16) {
      const __m128i v = _mm_loadu_si128(reinterpret_cast<const __m128i*>(p));
      hits = _mm_sub_epi8(hits, _mm_cmpeq_epi8(v, nl));
    }
    const __m128i sums = _mm_sad_epu8(hits, zero);
    count += static_cast<std::size_t>(_mm_cvtsi128_si32(sums)) +
             static_cast<std::size_t>(_mm_cvtsi128_si32(_mm_unpackhi_epi64(sums, sums)));
  }
#endif
  for (std::size_t i = 0; i < n; ++i) count += p[i] == '\n' ? 1 : 0;
  return count;
}

std::string read_all(int fd, const std::string& name) {
  std::string text;
  std::size_t used = 0;
  while (true) {
    if (text.size() - used < 64 * 1024)
      text.resize(std::max<std::size_t>(text.size() * 2, 1 << 20));
    const ssize_t n = ::read(fd, text.data() + used, text.size() - used);
    if (n < 0) {
      if (errno == EINTR) continue;
      throw InputError(name, 0, 0, std::string("cannot read: ") + std::strerror(errno));
    }
    if (n == 0) break;
    used += static_cast<std::size_t>(n);
  }
  text.resize(used);
  return text;
}

}  // namespace benchtau::csv
