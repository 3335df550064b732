// benchtau: findings, the sentences a measurement or fit reports besides its numbers.
#pragma once

#include <string>
#include <vector>

namespace benchtau {

// info: worth knowing, nothing wrong (a partial cycle left out).
// warning: the numbers stand but deserve care (few samples per segment).
// problem: the numbers are missing or cannot be trusted (not oscillating).
enum class Severity { info, warning, problem };

const char* severity_name(Severity s);

// code is stable across releases (scripts match on it); message is for people.
struct Finding {
  std::string code;
  Severity severity = Severity::info;
  std::string message;
};

using Findings = std::vector<Finding>;

}  // namespace benchtau
