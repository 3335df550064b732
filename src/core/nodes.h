// benchtau: which captured channel is which node of the timer.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "src/core/capture.h"

namespace benchtau {

// Channel indices into Capture::channels for the nodes benchtau understands.
struct NodeMap {
  std::optional<std::size_t> out;  // output pin
  std::optional<std::size_t> cap;  // timing-capacitor node (threshold and trigger)
  std::optional<std::size_t> ctl;  // control pin
  std::vector<std::string> notes;  // how each guess was made, for the report
};

// What the user asked for: a channel name (as in the header, case-insensitive,
// with or without its unit) or a 1-based column index among the channels, or
// empty to let benchtau guess from names and then from the waveforms' shapes, or "none" for
// a node that was not captured (never guessed).
struct NodeRequest {
  std::string out;
  std::string cap;
  std::string ctl;
};

// Throws InputError (naming the option) when a requested channel does not exist.
NodeMap map_nodes(const Capture& capture, const NodeRequest& request);

}  // namespace benchtau
