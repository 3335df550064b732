// benchtau: running the benchtau program from a test, and scratch files for it.
#pragma once

#include <fmt/format.h>
#include <sys/wait.h>
#include <unistd.h>
#include <catch2/catch.hpp>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

namespace cli_support {

namespace fs = std::filesystem;

struct Run {
  int exit_code = -1;
  std::string out;  // standard output
  std::string err;  // standard error
};

// Runs a shell command line, capturing both streams (stderr through a file
// named for this process, since CTest runs test cases side by side).
inline Run run(const std::string& command) {
  const fs::path err_path =
      fs::path(BENCHTAU_BINARY_DIR) / fmt::format("cli-stderr-{}.txt", ::getpid());
  const std::string full = fmt::format("{} 2>'{}'", command, err_path.string());
  Run r;
  std::FILE* p = ::popen(full.c_str(), "r");
  REQUIRE(p != nullptr);
  std::array<char, 4096> buf{};
  std::size_t n = 0;
  while ((n = std::fread(buf.data(), 1, buf.size(), p)) > 0) r.out.append(buf.data(), n);
  const int status = ::pclose(p);
  r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  std::ifstream e(err_path);
  r.err.assign(std::istreambuf_iterator<char>(e), std::istreambuf_iterator<char>());
  return r;
}

inline std::string exe() { return fmt::format("'{}'", BENCHTAU_EXE); }

inline fs::path scratch(const std::string& name) {
  const fs::path dir = fs::path(BENCHTAU_BINARY_DIR) / "cli-predict-test";
  fs::create_directories(dir);
  return dir / name;
}

inline fs::path write_file(const std::string& name, const std::string& text) {
  const fs::path path = scratch(name);
  std::ofstream(path, std::ios::binary) << text;
  return path;
}

inline std::string read_file(const fs::path& path) {
  std::ifstream f(path, std::ios::binary);
  return std::string(std::istreambuf_iterator<char>(f), std::istreambuf_iterator<char>());
}

inline bool has_line(const std::string& text, const std::string& line) {
  return text.find("\n" + line + "\n") != std::string::npos || text.rfind(line + "\n", 0) == 0;
}

inline std::string demo(const std::string& name) {
  return fmt::format("'{}/captures/{}'", BENCHTAU_SOURCE_DIR, name);
}

}  // namespace cli_support
