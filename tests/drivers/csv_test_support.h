// benchtau: helpers shared by the CSV reader's tests.
#pragma once

#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <string>
#include <string_view>

#include "drivers/csv_reader.h"
#include "src/core/input_error.h"

namespace benchtau::test {

// Options with one field set.
inline CsvOptions with_rate(double rate_Hz) {
  CsvOptions o;
  o.rate_Hz = rate_Hz;
  return o;
}
inline CsvOptions with_time_column(std::string column) {
  CsvOptions o;
  o.time_column = std::move(column);
  return o;
}
inline CsvOptions with_threads(unsigned threads) {
  CsvOptions o;
  o.threads = threads;
  return o;
}

inline CsvResult read(std::string_view text, const CsvOptions& options = {}) {
  return read_csv_text(text, "scope.csv", options);
}

// The message of the InputError that reading text throws, or "no error".
inline std::string error_of(std::string_view text, const CsvOptions& options = {}) {
  try {
    read_csv_text(text, "scope.csv", options);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

inline std::string file_error_of(const std::string& path, const CsvOptions& options = {}) {
  try {
    read_csv_file(path, options);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

// A scratch file under the build tree, written afresh.
inline std::string scratch_file(const std::string& name, std::string_view content) {
  const auto dir = std::filesystem::path(BENCHTAU_BINARY_DIR) / "test-scratch" / "csv";
  std::filesystem::create_directories(dir);
  const auto path = dir / name;
  std::ofstream(path, std::ios::binary)
      .write(content.data(), static_cast<std::streamsize>(content.size()));
  return path.string();
}

inline bool has_note(const CsvResult& r, std::string_view part) {
  for (const auto& n : r.notes) {
    if (n.find(part) != std::string::npos) return true;
  }
  return false;
}

}  // namespace benchtau::test
