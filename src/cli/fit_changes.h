// benchtau: the fit command's --change option, a known change to the board for one capture.
#pragma once

#include <cstddef>
#include <span>
#include <string>
#include <vector>

#include "fit/diagnosis.h"
#include "src/core/design.h"

namespace benchtau::cli {

// Each text is CAPTURE:CHANGE, where CAPTURE is the 1-based position of a capture on the
// command line (2 or later: the first is the board as designed) and CHANGE is one of
//   supply=VOLTS   the capture was taken at this supply ("2:supply=12", "2:supply=4.5V")
//   PART||OHMS     a known resistor was added across a design part ("2:R2||100k")
// A capture may take one of each, from two options. Returns one change per capture (the
// first always empty). Throws InputError naming --change and the text for anything else.
std::vector<BoardChange> parse_changes(std::span<const std::string> texts, std::size_t captures,
                                       const Design& design);

// "taken at 12.0 V", "100 kohm added across R2", both joined by "; "; empty for no change.
std::string change_text(const BoardChange& change);

}  // namespace benchtau::cli
