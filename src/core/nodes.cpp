// benchtau: mapping captured channels to timer nodes, by request, name or shape.
#include "src/core/nodes.h"

#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>

#include "src/core/input_error.h"
#include "src/core/levels.h"

namespace benchtau {
namespace {

std::string lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

// "CH2 (mV)" -> "ch2", "out_V" -> "out", "cap/V" -> "cap": the name without its unit.
std::string base_name(std::string_view name) {
  std::string s = lower(name);
  for (std::string_view open : {" [", "[", " (", "(", "/"}) {
    if (auto p = s.find(open); p != std::string::npos && p > 0) s.resize(p);
  }
  for (std::string_view suffix : {"_v", "_mv", "_uv", "_a", "_ma"}) {
    if (s.size() > suffix.size() && s.ends_with(suffix)) s.resize(s.size() - suffix.size());
  }
  while (!s.empty() && s.back() == ' ') s.pop_back();
  return s;
}

std::size_t file_column(const Capture& c, std::size_t k) {
  if (c.channels[k].column != 0) return c.channels[k].column;
  // Readers that do not record columns: assume a leading time column.
  return k + 1 + (c.time.uniform() ? 0 : 1);
}

std::string channel_list(const Capture& c) {
  std::string out;
  for (std::size_t k = 0; k < c.channels.size(); ++k) {
    out +=
        fmt::format("{}\"{}\" (column {})", k ? ", " : "", c.channels[k].name, file_column(c, k));
  }
  return out;
}

// "none" (any case) says the node was not captured: it is neither looked up nor guessed.
bool is_none(const std::string& spec) { return lower(spec) == "none"; }

std::optional<std::size_t> find_requested(const Capture& c, const std::string& spec,
                                          std::string_view option) {
  if (spec.empty() || is_none(spec)) return std::nullopt;
  std::size_t index = 0;
  const auto [ptr, ec] = std::from_chars(spec.data(), spec.data() + spec.size(), index);
  if (ec == std::errc() && ptr == spec.data() + spec.size()) {
    for (std::size_t k = 0; k < c.channels.size(); ++k)
      if (file_column(c, k) == index) return k;
    throw InputError(c.source, 0, 0,
                     fmt::format("{} {}: no channel in column {}; channels are {}", option, spec,
                                 index, channel_list(c)));
  }
  for (std::size_t k = 0; k < c.channels.size(); ++k)
    if (lower(c.channels[k].name) == lower(spec)) return k;
  for (std::size_t k = 0; k < c.channels.size(); ++k)
    if (base_name(c.channels[k].name) == base_name(spec)) return k;
  throw InputError(
      c.source, 0, 0,
      fmt::format("{} \"{}\": no such channel; channels are {}", option, spec, channel_list(c)));
}

// Names people give each node. "vc" is left out: some mean the capacitor, some the control pin.
bool name_says(std::string_view base, std::initializer_list<std::string_view> words) {
  for (std::string_view w : words) {
    if (base == w) return true;
    if (base.starts_with(w) && base.size() > w.size() &&
        !std::isalpha(static_cast<unsigned char>(base[w.size()])))
      return true;
  }
  return false;
}

// A median step over a tenth of the swing: noise, or far too slow a capture.
constexpr double kRoughLimit = 0.1;

enum class Shape { two_level, sawtooth, steady, unclear };

struct Look {
  Shape shape = Shape::unclear;
  double swing_V = 0.0;
};

Look look_at(const Channel& ch) {
  const ChannelSpread spread = channel_spread(ch.values);
  const TwoLevels levels = two_levels(ch.values, spread);
  Look look;
  look.swing_V = spread.p_high_V - spread.p_low_V;
  if (spread.finite < 8 || !(look.swing_V > 0.0)) {
    look.shape = Shape::steady;
    return look;
  }
  const double rough = roughness(ch.values, spread);
  if (rough > kRoughLimit) {
    look.shape = Shape::unclear;
  } else if (levels.mid_band_fraction < 0.15) {
    look.shape = Shape::two_level;
  } else {
    look.shape = Shape::sawtooth;
  }
  return look;
}

}  // namespace

NodeMap map_nodes(const Capture& capture, const NodeRequest& request) {
  NodeMap map;
  map.out = find_requested(capture, request.out, "--out");
  map.cap = find_requested(capture, request.cap, "--cap");
  map.ctl = find_requested(capture, request.ctl, "--ctl");
  auto taken = [&](std::size_t k) { return map.out == k || map.cap == k || map.ctl == k; };
  const bool guess_out = !is_none(request.out), guess_cap = !is_none(request.cap),
             guess_ctl = !is_none(request.ctl);

  // By name first.
  for (std::size_t k = 0; k < capture.channels.size(); ++k) {
    if (taken(k)) continue;
    const std::string base = base_name(capture.channels[k].name);
    const auto& name = capture.channels[k].name;
    if (!map.out && guess_out && name_says(base, {"out", "output", "vout", "q", "pin3", "pin 3"})) {
      map.out = k;
      map.notes.push_back(fmt::format("output pin: \"{}\", from its name", name));
    } else if (!map.cap && guess_cap &&
               name_says(base, {"cap", "vcap", "timing", "thr", "threshold", "trig", "trigger",
                                "pin6", "pin 6", "pin2", "pin 2"})) {
      map.cap = k;
      map.notes.push_back(fmt::format("capacitor node: \"{}\", from its name", name));
    } else if (!map.ctl && guess_ctl &&
               name_says(base, {"ctl", "ctrl", "control", "cv", "pin5", "pin 5"})) {
      map.ctl = k;
      map.notes.push_back(fmt::format("control pin: \"{}\", from its name", name));
    }
  }

  // Then by shape: the output is two-level, the capacitor a sawtooth, the
  // control pin whatever is left with the smallest swing.
  std::vector<std::pair<std::size_t, Look>> rest;
  for (std::size_t k = 0; k < capture.channels.size(); ++k)
    if (!taken(k)) rest.emplace_back(k, look_at(capture.channels[k]));
  auto pick = [&](Shape shape) -> std::optional<std::size_t> {
    std::optional<std::size_t> best;
    double best_swing = -1.0;
    for (const auto& [k, look] : rest) {
      if (taken(k) || look.shape != shape) continue;
      if (look.swing_V > best_swing) {
        best = k;
        best_swing = look.swing_V;
      }
    }
    return best;
  };
  if (!map.out && guess_out) {
    if ((map.out = pick(Shape::two_level)))
      map.notes.push_back(fmt::format("output pin: \"{}\", guessed from its shape (two levels)",
                                      capture.channels[*map.out].name));
  }
  if (!map.cap && guess_cap) {
    if ((map.cap = pick(Shape::sawtooth)))
      map.notes.push_back(fmt::format("capacitor node: \"{}\", guessed from its shape (a sawtooth)",
                                      capture.channels[*map.cap].name));
  }
  if (!map.ctl && guess_ctl && (map.out || map.cap)) {
    std::optional<std::size_t> best;
    double best_swing = 0.0;
    for (const auto& [k, look] : rest) {
      if (taken(k) || look.shape == Shape::unclear) continue;
      if (!best || look.swing_V < best_swing) {
        best = k;
        best_swing = look.swing_V;
      }
    }
    if ((map.ctl = best))
      map.notes.push_back(fmt::format("control pin: \"{}\", guessed as the channel left over",
                                      capture.channels[*map.ctl].name));
  }
  // A single channel that fits no shape is still worth measuring as an output.
  if (!map.out && !map.cap && guess_out && capture.channels.size() == 1) {
    map.out = 0;
    map.notes.push_back(
        fmt::format("output pin: \"{}\", the only channel", capture.channels[0].name));
  }
  return map;
}

}  // namespace benchtau
