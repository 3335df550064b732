// benchtau: the bytes of a capture, held in memory or read from a file in blocks.
#pragma once

#include <cstddef>
#include <span>
#include <string>
#include <vector>

namespace benchtau::csv {

// Where a capture's bytes come from. A file is read with pread in blocks, so
// that resident memory does not grow with the file; text already in memory is
// viewed in place. Copyable and cheap: it borrows the memory or descriptor.
class ByteSource {
 public:
  static ByteSource memory(std::span<const char> bytes);
  // fd must stay open while the source is used; name is for error messages.
  static ByteSource file(int fd, std::size_t size_bytes, std::string name);

  std::size_t size() const { return size_; }
  bool in_memory() const { return fd_ < 0; }

  // The bytes [offset, offset + length), clipped to the end. For a file they
  // are read into scratch, which the returned span then points into.
  std::span<const char> view(std::size_t offset, std::size_t length,
                             std::vector<char>& scratch) const;

  // Copies exactly out.size() bytes from offset, which must lie within size().
  void read_into(std::size_t offset, std::span<char> out) const;

  // The offset just past the first '\n' at or after offset, or size().
  std::size_t next_line_start(std::size_t offset) const;

 private:
  std::span<const char> bytes_;
  int fd_ = -1;
  std::size_t size_ = 0;
  std::string name_;
};

// Walks [begin, end) of a source in spans that hold whole lines only (the last
// span may end without '\n' at the end of the range). begin must be a line start.
class LineBlocks {
 public:
  static constexpr std::size_t default_block_bytes = std::size_t{1} << 20;

  LineBlocks(const ByteSource& source, std::size_t begin, std::size_t end,
             std::size_t block_bytes = default_block_bytes);

  // The next span, valid until the next call; empty when the range is done.
  std::span<const char> next();
  // Whether the span next() last gave was the range's final one.
  bool done() const { return pos_ >= end_ && carry_size_ == 0; }

 private:
  const ByteSource& source_;
  std::size_t pos_;
  std::size_t end_;
  std::size_t block_bytes_;
  std::vector<char> buffer_;
  std::size_t carry_begin_ = 0;  // leftover partial line in buffer_
  std::size_t carry_size_ = 0;
};

// How many '\n' bytes the span holds.
std::size_t count_newlines(std::span<const char> bytes);

// Reads all of a descriptor that cannot be read by offset (a pipe, a terminal).
std::string read_all(int fd, const std::string& name);

}  // namespace benchtau::csv
