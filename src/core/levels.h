// benchtau: the levels a channel sits at, found from the signal itself.
#pragma once

#include <cstddef>
#include <span>

namespace benchtau {

// Robust spread of a channel: percentiles read off a fine histogram, so one
// spike or a NaN does not move them. NaN samples are skipped.
struct ChannelSpread {
  std::size_t finite = 0;  // samples that are numbers
  double min_V = 0.0;      // raw extremes
  double max_V = 0.0;
  double p_low_V = 0.0;  // 0.1th and 99.9th percentiles: the extremes less stray spikes
  double p_high_V = 0.0;
  double median_V = 0.0;
  // Fraction of samples exactly equal to min_V (or max_V) that sit in runs of
  // at least three equal samples: the signature of an instrument's rail.
  double at_min_fraction = 0.0;
  double at_max_fraction = 0.0;
  std::size_t at_min_runs = 0;  // how many separate such runs
  std::size_t at_max_runs = 0;
};

ChannelSpread channel_spread(std::span<const double> values);

// The two levels of an output-type (square) signal, each the median of the
// samples on its side of the midpoint. mid_band_fraction is the share of
// samples between 25 % and 75 % of the swing: small for a clean two-level
// signal, about half for a sawtooth, most of them for noise.
struct TwoLevels {
  double low_V = 0.0;
  double high_V = 0.0;
  double mid_band_fraction = 1.0;
  double swing_V() const { return high_V - low_V; }
};

TwoLevels two_levels(std::span<const double> values, const ChannelSpread& spread);

// The typical step between successive samples (their median absolute
// difference) over the channel's robust swing. A sampled waveform moves a
// small fraction of its swing per sample; noise jumps across much of it.
// Reads at most about 20 000 steps, spread over the record.
double roughness(std::span<const double> values, const ChannelSpread& spread);

}  // namespace benchtau
