// benchtau: the --rate option shared by the commands that read captures or streams.
#pragma once

#include <optional>
#include <string>

namespace benchtau::cli {

// Samples per second from --rate ("1M", "250k", "2.5 MS/s"), or nothing when it was not given.
// Throws InputError naming --rate for anything that is not a positive rate.
std::optional<double> rate_option(const std::string& text);

}  // namespace benchtau::cli
