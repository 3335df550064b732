// benchtau: the error every reader of user files throws.
#pragma once

#include <cstddef>
#include <stdexcept>
#include <string>

namespace benchtau {

// A problem with what the user gave us (a capture, a design file, an option).
// what() reads like a compiler diagnostic: "file:line:column: message", with
// line and column left out when they do not apply (0 means "not known").
// Line and column are 1-based; column counts bytes from the start of the line.
class InputError : public std::runtime_error {
 public:
  InputError(std::string file, std::size_t line, std::size_t column, std::string message);

  const std::string& file() const { return file_; }
  std::size_t line() const { return line_; }
  std::size_t column() const { return column_; }
  // The message without the location prefix.
  const std::string& message() const { return message_; }

 private:
  std::string file_;
  std::size_t line_;
  std::size_t column_;
  std::string message_;
};

}  // namespace benchtau
