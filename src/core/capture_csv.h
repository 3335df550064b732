// benchtau: a capture written as CSV text that `benchtau measure` reads back.
#pragma once

#include <string>
#include <vector>

#include "src/core/capture.h"

namespace benchtau {

// A header line "t_s,<channel names>" and one row per sample: the time to ten
// significant figures, the values to seven (below a microvolt on a 10 V
// node). names, when not empty, replace the channels' names in the header;
// a name holding a comma or a quote is quoted.
std::string capture_csv(const Capture& capture, const std::vector<std::string>& names = {});

}  // namespace benchtau
