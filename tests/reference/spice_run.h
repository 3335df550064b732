// benchtau: running ngspice on the reference netlists, in scratch directories under the build tree.
#pragma once

#include <fmt/format.h>
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <cstddef>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <string_view>
#include <system_error>
#include <thread>
#include <utility>
#include <vector>

namespace benchtau::spice {

namespace fs = std::filesystem;

// Where the netlists and the behavioural timer model live.
inline fs::path source_dir() {
  return fs::path(BENCHTAU_SOURCE_DIR) / "tests" / "reference" / "spice";
}

// A scratch directory in the build tree, removed on scope exit unless
// BENCHTAU_KEEP_SPICE is set (to inspect what ngspice wrote).
class ScratchDir {
 public:
  explicit ScratchDir(fs::path path) : path_(std::move(path)) {
    fs::remove_all(path_);
    fs::create_directories(path_);
  }
  ~ScratchDir() {
    if (std::getenv("BENCHTAU_KEEP_SPICE") == nullptr) {
      std::error_code ignored;
      fs::remove_all(path_, ignored);
    }
  }
  ScratchDir(const ScratchDir&) = delete;
  ScratchDir& operator=(const ScratchDir&) = delete;
  const fs::path& path() const { return path_; }

 private:
  fs::path path_;
};

// A scratch directory named for one run, unique to this process.
inline fs::path scratch_path(std::string_view label) {
  return fs::path(BENCHTAU_BINARY_DIR) / "reference_spice" /
         fmt::format("{}_{}", label, static_cast<long>(::getpid()));
}

inline std::string read_text(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

inline bool write_text(const fs::path& path, const std::string& text) {
  std::ofstream out(path, std::ios::binary);
  out << text;
  return out.good();
}

// Replaces the whole line that starts with key; false when there is none.
inline bool replace_line(std::string& text, std::string_view key, const std::string& line) {
  std::size_t at = 0;
  while (at < text.size()) {
    const std::size_t end = std::min(text.find('\n', at), text.size());
    if (std::string_view(text).substr(at, end - at).starts_with(key)) {
      text.replace(at, end - at, line);
      return true;
    }
    at = end + 1;
  }
  return false;
}

// Sets name=value on the netlist's .param lines, for every name in values.
// Returns the names that no .param line defines (empty when all were set).
inline std::vector<std::string> set_params(std::string& text,
                                           const std::map<std::string, double>& values) {
  std::vector<std::string> missing;
  for (const auto& [name, value] : values) {
    bool found = false;
    std::size_t at = 0;
    while (!found && at < text.size()) {
      const std::size_t end = std::min(text.find('\n', at), text.size());
      if (std::string_view(text).substr(at, end - at).starts_with(".param ")) {
        // name= preceded by a blank, so that "r" does not match "tr=".
        const std::string key = " " + name + "=";
        const std::size_t k = text.find(key, at);
        if (k != std::string::npos && k < end) {
          const std::size_t v0 = k + key.size();
          const std::size_t v1 = std::min(text.find(' ', v0), end);
          text.replace(v0, v1 - v0, fmt::format("{:.12g}", value));
          found = true;
        }
      }
      at = std::min(text.find('\n', at), text.size()) + 1;
    }
    if (!found) missing.push_back(name);
  }
  return missing;
}

inline bool ngspice_available() { return std::system("command -v ngspice > /dev/null 2>&1") == 0; }

// Single-quoted for the shell; empty when the path holds a quote itself.
inline std::string shell_quote(const fs::path& path) {
  const std::string s = path.string();
  if (s.find('\'') != std::string::npos) return {};
  return "'" + s + "'";
}

// One ngspice run: a netlist from source_dir() with its .param values set,
// simulated in its own scratch directory.
struct Run {
  std::string label;    // names the scratch directory
  std::string netlist;  // file name in source_dir()
  std::map<std::string, double> params;
  std::string capture = "capture.txt";  // what the netlist's wrdata writes
  // Filled in by run_all:
  std::string error;  // empty when ngspice ran and wrote the capture
  std::string log;    // ngspice's output, for failure messages
  fs::path capture_path;
};

// Prepares and runs one simulation; touches nothing but run and its directory,
// so that several can run at once (no test assertions here).
inline void run_one(Run& run, const fs::path& dir) {
  std::string netlist = read_text(source_dir() / run.netlist);
  if (netlist.empty()) {
    run.error = "cannot read " + (source_dir() / run.netlist).string();
    return;
  }
  const std::vector<std::string> missing = set_params(netlist, run.params);
  if (!missing.empty()) {
    run.error = fmt::format("{} has no .param {}", run.netlist, fmt::join(missing, ", "));
    return;
  }
  std::error_code ec;
  fs::copy_file(source_dir() / "timer_behavioural.lib", dir / "timer_behavioural.lib", ec);
  if (ec || !write_text(dir / "circuit.cir", netlist)) {
    run.error = "cannot write the netlist into " + dir.string();
    return;
  }
  const std::string quoted = shell_quote(dir);
  if (quoted.empty()) {
    run.error = "scratch path holds a quote: " + dir.string();
    return;
  }
  const std::string command =
      fmt::format("cd {} && ngspice -b circuit.cir > ngspice.log 2>&1", quoted);
  const int status = std::system(command.c_str());
  run.log = read_text(dir / "ngspice.log");
  run.capture_path = dir / run.capture;
  if (status != 0) {
    run.error = fmt::format("ngspice exited with status {}", status);
  } else if (run.log.find("aborted") != std::string::npos) {
    // ngspice exits 0 after an aborted transient and still writes what it has.
    run.error = "ngspice aborted the transient (see its log)";
  } else if (!fs::exists(run.capture_path) || fs::file_size(run.capture_path) == 0) {
    run.error = "ngspice wrote no capture " + run.capture_path.string();
  }
}

// Runs every simulation, two at a time (the reference suite's budget is two
// cores). The directories are the caller's, one per run, kept alive meanwhile.
inline void run_all(std::vector<Run>& runs, const std::vector<const ScratchDir*>& dirs) {
  std::atomic<std::size_t> next{0};
  auto worker = [&] {
    for (std::size_t k = next++; k < runs.size(); k = next++) run_one(runs[k], dirs[k]->path());
  };
  std::thread a(worker), b(worker);
  a.join();
  b.join();
}

}  // namespace benchtau::spice
