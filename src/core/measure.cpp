// benchtau: from edges to cycles, summary and findings.
#include "src/core/measure.h"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <optional>
#include <string_view>
#include <thread>

#include "src/core/engineering.h"
#include "src/core/input_error.h"
#include "src/core/levels.h"

namespace benchtau {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// An output that moves less than this is not switching: even a CMOS part on a
// 1.5 V supply swings over ten times more (common practice).
constexpr double kFlatOutput_V = 0.1;
constexpr double kFlatCap_V = 0.05;
// An output sitting below this is low; a 555's output low is a few tenths of a
// volt at bench loads (common practice).
constexpr double kLowLevel_V = 0.8;
// Segments shorter than this many samples put the edge times at risk.
constexpr double kFewSamples = 10.0;
// A share of samples flat at a channel's extreme that means the instrument clipped.
constexpr double kClippedFraction = 0.002;
constexpr std::size_t kClippedRuns = 3;
// A discharged capacitor rests within a few tenths of a volt of ground (the
// switch's saturation and its share of the supply), and cannot be driven below
// it, while an astable's lowest turnaround is about half its highest (common
// practice). So a capacitor node resting flat at its bottom, at 0 V or above
// and under this share of its top, is a monostable's discharged floor between
// pulses, not an instrument's rail.
constexpr double kDischargedFloorShare = 0.1;
// A sampled sawtooth moves a few percent of its swing per sample at most;
// noise moves a large part of it.
constexpr double kRoughLimit = 0.1;

void add(Findings& f, std::string code, Severity s, std::string message) {
  f.push_back({std::move(code), s, std::move(message)});
}

double mean_between(const TimeBase& time, std::span<const double> v, double t0, double t1) {
  // Leave out the first and last tenth: the control pin kicks at each edge.
  const double margin = 0.1 * (t1 - t0);
  double sum = 0.0;
  std::size_t n = 0;
  // Edges are in time order; a binary search keeps long records fast.
  std::size_t lo = 0, hi = v.size();
  while (lo < hi) {
    const std::size_t mid = (lo + hi) / 2;
    if (time.at(mid) < t0 + margin)
      lo = mid + 1;
    else
      hi = mid;
  }
  for (std::size_t i = lo; i < v.size() && time.at(i) <= t1 - margin; ++i) {
    if (std::isnan(v[i])) continue;
    sum += v[i];
    ++n;
  }
  return n ? sum / static_cast<double>(n) : kNaN;
}

double median_of(std::vector<double> v) {
  std::erase_if(v, [](double x) { return std::isnan(x); });
  if (v.empty()) return kNaN;
  std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2), v.end());
  return v[v.size() / 2];
}

std::vector<Cycle> cycles_from(const std::vector<Edge>& edges) {
  std::vector<Cycle> cycles;
  for (std::size_t k = 0; k + 2 < edges.size(); ++k) {
    const Edge& a = edges[k];
    const Edge& b = edges[k + 1];
    const Edge& c = edges[k + 2];
    if (a.kind != EdgeKind::rising || b.kind != EdgeKind::falling || c.kind != EdgeKind::rising)
      continue;
    if (b.after_gap || c.after_gap) continue;
    Cycle cy;
    cy.start_s = a.t_s;
    cy.high_s = b.t_s - a.t_s;
    cy.low_s = c.t_s - b.t_s;
    cy.period_s = c.t_s - a.t_s;
    cy.duty = cy.high_s / cy.period_s;
    cy.cap_min_V = a.cap_V;
    cy.cap_max_V = b.cap_V;
    cy.ctl_high_V = cy.ctl_low_V = kNaN;
    cycles.push_back(cy);
  }
  return cycles;
}

std::string node_name(const Capture& c, std::optional<std::size_t> k) {
  return k ? fmt::format("\"{}\"", c.channels[*k].name) : std::string("-");
}

// smooth_spread is the channel's spread when it is the capacitor node, whose
// sawtooth never rests; null for the others.
void check_channel(const Capture& c, std::size_t k, const ChannelSpread* smooth_spread,
                   Findings& findings) {
  const Channel& ch = c.channels[k];
  if (ch.missing > 0) {
    add(findings, "missing_samples", Severity::warning,
        fmt::format("channel \"{}\" has {} empty or NaN cells (the first on line {}); they were "
                    "left out, not filled in, and no edge is timed across them",
                    ch.name, ch.missing, ch.first_missing_line));
  }
  // The output pin is flat at its levels by nature, and so is a control pin
  // fed back from the output; only the capacitor's sawtooth never rests.
  if (smooth_spread == nullptr) return;
  const ChannelSpread& s = *smooth_spread;
  // Clipping flattens every cycle that crosses the rail; one flat stretch is
  // something else (the supply still off at the start of the record).
  for (const auto& [fraction, runs, level, which] :
       {std::tuple{s.at_max_fraction, s.at_max_runs, s.max_V, "top"},
        std::tuple{s.at_min_fraction, s.at_min_runs, s.min_V, "bottom"}}) {
    const bool discharged_floor = std::string_view(which) == "bottom" && level >= 0.0 &&
                                  level <= kDischargedFloorShare * s.max_V;
    if (fraction > kClippedFraction && runs >= kClippedRuns && !discharged_floor) {
      add(findings, "clipped_channel", Severity::warning,
          fmt::format("channel \"{}\" sits flat at {} for {} of the samples: the instrument's "
                      "input range was probably exceeded at the {}, and turnaround voltages "
                      "there are not trustworthy",
                      ch.name, format_eng(level, "V"), format_percent(fraction), which));
    }
  }
}

// A power-up charge starts from below the lower threshold, so it runs longer
// than any steady high phase. Seen either as the first whole cycle (the
// supply came up inside the record) or as the record's leading high phase.
void mark_startup(Measurement& m, const std::vector<Edge>& edges, std::span<const double> cap,
                  const TimeBase& time) {
  std::vector<double> mins, maxs, highs;
  for (std::size_t i = 1; i < m.cycles.size(); ++i) {
    mins.push_back(m.cycles[i].cap_min_V);
    maxs.push_back(m.cycles[i].cap_max_V);
    highs.push_back(m.cycles[i].high_s);
  }
  const double min_med = median_of(mins), max_med = median_of(maxs), high_med = median_of(highs);
  const double margin_V = 0.25 * (max_med - min_med);
  const bool have_cap = !std::isnan(min_med);
  std::optional<std::string> why;
  if (m.cycles.size() >= 2 && m.cycles.front().start_s == edges.front().t_s) {
    Cycle& first = m.cycles.front();
    if (have_cap && !std::isnan(first.cap_min_V)) {
      first.startup = first.cap_min_V < min_med - margin_V;
      if (first.startup)
        why = fmt::format(
            "the first cycle starts with the capacitor at {}, below the lower "
            "turnaround ({}): a power-up charge; left out of the statistics",
            format_eng(first.cap_min_V, "V"), format_eng(min_med, "V"));
    } else if (m.cycles.size() >= 3 && first.high_s > 1.25 * high_med) {
      first.startup = true;
      why = fmt::format(
          "the first cycle's high time ({}) is much longer than the rest ({}): a "
          "power-up charge from below the lower threshold; left out of the "
          "statistics",
          format_eng(first.high_s, "s"), format_eng(high_med, "s"));
    }
  }
  if (!why && !edges.empty() && edges.front().kind == EdgeKind::falling && m.cycles.size() >= 2) {
    // The record starts in a high phase: a partial one is shorter than a
    // steady high phase; a power-up charge is longer, or starts from below.
    double v0 = std::numeric_limits<double>::quiet_NaN();
    for (double v : cap) {
      if (!std::isnan(v)) {
        v0 = v;
        break;
      }
    }
    const double lead_s = edges.front().t_s - time.at(0);
    if (have_cap && !std::isnan(v0) && v0 < min_med - margin_V) {
      why = fmt::format(
          "the record starts with the capacitor at {}, below the lower turnaround "
          "({}): a power-up charge, left out with the partial cycle",
          format_eng(v0, "V"), format_eng(min_med, "V"));
    } else if (!have_cap && lead_s > 1.25 * high_med) {
      why = fmt::format(
          "the record starts with a high phase of {}, longer than the steady ones "
          "({}): a power-up charge, left out with the partial cycle",
          format_eng(lead_s, "s"), format_eng(high_med, "s"));
    }
  }
  if (why) add(m.findings, "startup_cycle", Severity::info, *why);
}

}  // namespace

Measurement measure(const Capture& capture, const NodeMap& map, const MeasureOptions& options) {
  if (!map.out && !map.cap) {
    throw InputError(capture.source, 0, 0,
                     "found neither an output-pin nor a capacitor-node channel; name one with "
                     "--out or --cap");
  }
  Measurement m;
  const TimeBase& time = capture.time;
  auto values = [&](std::optional<std::size_t> k) -> std::span<const double> {
    return k ? std::span<const double>(capture.channels[*k].values) : std::span<const double>();
  };
  const auto out = values(map.out), cap = values(map.cap), ctl = values(map.ctl);
  m.summary.out_low_V = m.summary.out_high_V = kNaN;

  // The output's spread and levels and the capacitor's spread are a few
  // passes each over the whole record: on a long one, side by side.
  std::optional<ChannelSpread> out_spread, cap_spread;
  std::optional<TwoLevels> out_levels;
  auto out_side = [&] {
    out_spread = channel_spread(out);
    out_levels = two_levels(out, *out_spread);
  };
  auto cap_side = [&] { cap_spread = channel_spread(cap); };
  constexpr std::size_t kSideBySide = 200000;
  if (map.out && map.cap && out.size() + cap.size() >= kSideBySide &&
      std::thread::hardware_concurrency() > 1) {
    std::jthread cap_thread(cap_side);
    out_side();
  } else {
    if (map.out) out_side();
    if (map.cap) cap_side();
  }

  for (auto k : {map.out, map.cap, map.ctl})
    if (k) check_channel(capture, *k, k == map.cap ? &*cap_spread : nullptr, m.findings);

  EdgeScan scan;
  bool have_edges = false;
  bool try_cap = out.empty();
  if (!out.empty()) {
    const ChannelSpread& spread = *out_spread;
    const TwoLevels& levels = *out_levels;
    if (!(spread.p_high_V - spread.p_low_V > kFlatOutput_V)) {
      const bool low = spread.median_V < kLowLevel_V;
      add(m.findings, low ? "stuck_low" : "stuck_high", Severity::problem,
          fmt::format("not oscillating: the output {} stays {} at {}{}",
                      node_name(capture, map.out), low ? "low" : "high",
                      format_eng(spread.median_V, "V"),
                      low ? " (no supply, reset held low, or the threshold held above the control "
                            "voltage)"
                          : " (the capacitor never reaches the upper threshold: an open timing "
                            "capacitor path, a leaky capacitor, or a control pin pulled high)"));
    } else if (levels.mid_band_fraction > 0.2) {
      add(m.findings, "no_clean_levels", Severity::problem,
          fmt::format("the output {} does not switch between two clean levels ({} of the samples "
                      "lie mid-way): it may be noise, a wrong channel, or far too slow a capture",
                      node_name(capture, map.out), format_percent(levels.mid_band_fraction, 0)));
      try_cap = true;
    } else {
      scan = output_edges(time, out, levels, options.edges);
      m.edge_node = "out";
      m.summary.out_low_V = scan.levels.low_V;
      m.summary.out_high_V = scan.levels.high_V;
      have_edges = true;
      if (!cap.empty()) refine_with_cap(time, cap, scan.edges);
    }
  }
  if (try_cap && !cap.empty()) {
    const ChannelSpread& spread = *cap_spread;
    const double rough = roughness(cap, spread);
    if (!(spread.p_high_V - spread.p_low_V > kFlatCap_V)) {
      add(m.findings, "stuck_cap", Severity::problem,
          fmt::format("not oscillating: the capacitor node {} sits at {} and never turns around",
                      node_name(capture, map.cap), format_eng(spread.median_V, "V")));
    } else if (rough > kRoughLimit) {
      add(m.findings, "no_clean_sawtooth", Severity::problem,
          fmt::format("the capacitor node {} jumps {} of its swing from one sample to the next: "
                      "it may be noise, a wrong channel, or far too slow a capture",
                      node_name(capture, map.cap), format_percent(rough, 0)));
    } else {
      scan = sawtooth_edges(time, cap, options.edges);
      m.edge_node = "cap";
      have_edges = true;
      if (!out.empty())
        add(m.findings, "edges_from_cap", Severity::info,
            "edges were taken from the capacitor node's turnarounds instead of the output");
    }
  }
  if (scan.glitches > 0) {
    add(m.findings, "glitches_removed", Severity::info,
        fmt::format("{} short pulse{} on the {} (under {} of a typical segment) were taken as "
                    "glitches and removed",
                    scan.glitches, scan.glitches == 1 ? "" : "s",
                    m.edge_node == "out" ? "output" : "capacitor node",
                    format_percent(options.edges.glitch_fraction, 0)));
  }
  if (!have_edges) return m;

  m.cycles = cycles_from(scan.edges);
  m.edges = scan.edges;
  const double t_first = time.at(0), t_last = time.at(capture.samples() - 1);

  if (!ctl.empty()) {
    for (Cycle& c : m.cycles) {
      c.ctl_high_V = mean_between(time, ctl, c.start_s, c.start_s + c.high_s);
      c.ctl_low_V = mean_between(time, ctl, c.start_s + c.high_s, c.start_s + c.period_s);
    }
  }

  mark_startup(m, scan.edges, cap, time);

  std::vector<double> period, high, low, duty, cmax, cmin, ctlv, mid_t;
  for (const Cycle& c : m.cycles) {
    if (c.startup) continue;
    period.push_back(c.period_s);
    high.push_back(c.high_s);
    low.push_back(c.low_s);
    duty.push_back(c.duty);
    cmax.push_back(c.cap_max_V);
    cmin.push_back(c.cap_min_V);
    ctlv.push_back(c.ctl_high_V);
    ctlv.push_back(c.ctl_low_V);
    mid_t.push_back(c.start_s + 0.5 * c.period_s);
  }
  Summary& s = m.summary;
  s.cycles = period.size();
  s.period_s = describe(period);
  s.high_s = describe(high);
  s.low_s = describe(low);
  s.duty = describe(duty);
  s.cap_max_V = describe(cmax);
  s.cap_min_V = describe(cmin);
  s.ctl_V = describe(ctlv);
  s.frequency_Hz = s.cycles ? 1.0 / s.period_s.mean : kNaN;
  s.jitter_c2c_s = rms_successive_difference(period);
  if (s.cycles >= 3) {
    const LineFit f = fit_line(mid_t, period);
    s.drift.known = !std::isnan(f.slope_sigma);
    s.drift.ppm_per_s = f.slope / s.period_s.mean * 1e6;
    s.drift.sigma_ppm_per_s = f.slope_sigma / s.period_s.mean * 1e6;
  }

  // Partial cycles at either end of the record.
  if (!m.cycles.empty()) {
    const double head_s = m.cycles.front().start_s - t_first;
    const Cycle& last = m.cycles.back();
    const double tail_s = t_last - (last.start_s + last.period_s);
    if (head_s > 0.0 || tail_s > 0.0) {
      add(m.findings, "partial_cycles", Severity::info,
          fmt::format("the record starts {} before the first whole cycle and ends {} after the "
                      "last; those partial cycles are left out",
                      format_eng(head_s, "s"), format_eng(tail_s, "s")));
    }
  }
  if (s.cycles < 2) {
    add(m.findings, "few_cycles", s.cycles == 0 ? Severity::problem : Severity::warning,
        s.cycles == 0
            ? fmt::format("the record ({}) holds no whole steady cycle; capture for longer",
                          format_eng(t_last - t_first, "s"))
            : fmt::format("the record holds only one whole steady cycle; its spread, jitter and "
                          "drift cannot be measured; capture for longer"));
  }
  if (s.cycles > 0 && time.dt_s > 0.0) {
    const double shortest = std::min(s.high_s.min, s.low_s.min);
    m.min_samples_per_segment = shortest / time.dt_s;
    if (m.min_samples_per_segment < kFewSamples) {
      add(m.findings, "few_samples_per_segment", Severity::warning,
          fmt::format("the shortest segment ({}) spans only {:.1f} samples: edge times are "
                      "uncertain by up to a sample ({} of it) and faster events may be aliased; "
                      "capture at {} or more",
                      format_eng(shortest, "s"), m.min_samples_per_segment,
                      format_percent(1.0 / m.min_samples_per_segment, 0),
                      format_eng(kFewSamples * 5.0 / shortest, "S/s")));
    }
  }
  return m;
}

}  // namespace benchtau
