// benchtau: InputError.
#include "src/core/input_error.h"

#include <fmt/format.h>

namespace benchtau {
namespace {

std::string located(const std::string& file, std::size_t line, std::size_t column,
                    const std::string& message) {
  if (line == 0) return fmt::format("{}: {}", file, message);
  if (column == 0) return fmt::format("{}:{}: {}", file, line, message);
  return fmt::format("{}:{}:{}: {}", file, line, column, message);
}

}  // namespace

InputError::InputError(std::string file, std::size_t line, std::size_t column, std::string message)
    : std::runtime_error(located(file, line, column, message)),
      file_(std::move(file)),
      line_(line),
      column_(column),
      message_(std::move(message)) {}

}  // namespace benchtau
