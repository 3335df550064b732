// benchtau: the tolerance spread of a prediction: worst-case corners and a seeded Monte Carlo.
#pragma once

#include <array>
#include <bitset>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <memory>
#include <new>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "src/core/circuit.h"
#include "src/core/design.h"
#include "src/core/findings.h"

namespace benchtau {

// One quantity that varies between low and high about its nominal value: a
// part's value (or a diode's forward voltage), or one of the chip's figures.
// It lands in the circuit at field, or at chip_field within CircuitValues::chip.
struct Variation {
  std::string name;  // the part's ref ("R1"), or "timer out_low_V"
  double nominal = 0.0;
  double low = 0.0;
  double high = 0.0;
  double CircuitValues::*field = nullptr;
  double TimerFigures::*chip_field = nullptr;

  void apply(Circuit& c, double value) const {
    if (field != nullptr) {
      c.v.*field = value;
    } else {
      c.v.chip.*chip_field = value;
    }
  }
};

// Every part with a tolerance, as value * (1 -/+ tolerance); a part without
// one (a diode's forward voltage) is held at its value. With chip_spread,
// also the chip's figures within their usual part-to-part spreads.
std::vector<Variation> design_variations(const Design& design, bool chip_spread);

// What the spread is reported for, in this order.
enum class Output : std::size_t {
  high_s,
  low_s,
  period_s,
  frequency_Hz,
  duty,
  cap_max_V,
  cap_min_V
};
inline constexpr std::size_t kOutputs = 7;
using OutputValues = std::array<double, kOutputs>;

std::string_view output_key(Output o);              // "high_s", as in the JSON
OutputValues outputs_of(const CyclePrediction& p);  // all NaN when it does not oscillate

struct Range {
  double min = std::numeric_limits<double>::quiet_NaN();
  double max = std::numeric_limits<double>::quiet_NaN();
};

// Worst-case corners: with up to kMaxExhaustive varying quantities, every
// one of the 2^n corners; with more, the sensitivity-sign method: each
// quantity's effect on each output is found by moving it alone to its low and
// high ends, and for each output the two corners that push it down and up
// (every quantity at the end its sign calls for) are evaluated.
inline constexpr std::size_t kMaxExhaustive = 12;
struct CornerSpread {
  bool exhaustive = true;
  std::size_t varying = 0;            // quantities with low < high
  std::size_t corners = 0;            // corner circuits evaluated
  std::size_t stopped = 0;            // of them, those that do not oscillate
  std::array<Range, kOutputs> range;  // over the nominal and every corner that oscillates
};
CornerSpread corner_spread(const Circuit& nominal, std::span<const Variation> variations);

// Monte Carlo. Each quantity is drawn from a normal distribution whose 3
// sigma reaches its tolerance (the common practice of reading a part's
// tolerance as a 3-sigma bound), truncated at the tolerance; an asymmetric
// range uses the half-normal of each side. Draws run in fixed blocks of
// kBlockDraws, each with its own random stream from (seed, block index), so
// the results are identical for a seed whatever the thread count.
inline constexpr double kSigmasPerTolerance = 3.0;
inline constexpr std::size_t kBlockDraws = 4096;
inline constexpr std::array<double, 7> kPercentiles{0.1, 1.0, 5.0, 50.0, 95.0, 99.0, 99.9};

using OutputSet = std::bitset<kOutputs>;  // bit k: Output k
inline OutputSet only(Output o) { return OutputSet{}.set(static_cast<std::size_t>(o)); }

struct MonteCarloOptions {
  std::size_t draws = 100000;
  std::uint64_t seed = 1;
  unsigned threads = 0;  // 0: one per core
  // The outputs kept and summarised; the others are not stored, and their
  // statistics are empty (count 0, NaN). The draws are the same either way.
  OutputSet outputs = OutputSet{}.set();
};

// A vector that leaves its doubles uninitialised on resize: every draw's slot
// is written by the thread that draws it, so zero-filling first is wasted.
template <class T>
struct UninitialisedAllocator : std::allocator<T> {
  template <class U>
  struct rebind {
    using other = UninitialisedAllocator<U>;
  };
  UninitialisedAllocator() = default;
  template <class U>
  explicit UninitialisedAllocator(const UninitialisedAllocator<U>&) {}
  template <class U>
  void construct(U* p) {
    ::new (static_cast<void*>(p)) U;
  }
  template <class U, class... Args>
  void construct(U* p, Args&&... args) {
    ::new (static_cast<void*>(p)) U(std::forward<Args>(args)...);
  }
};
using DrawValues = std::vector<double, UninitialisedAllocator<double>>;

// Count, mean and sum of squared deviations of one block's values of one
// output, merged in block order (Chan, Golub and LeVeque's pairwise update)
// so that the sums never depend on the threads.
struct BlockMoments {
  double count = 0.0;
  double mean = 0.0;
  double m2 = 0.0;
  void merge(const BlockMoments& o);
};

// Every draw's outputs, NaN where that draw does not oscillate, and each
// block's moments, taken while its values were fresh in the cache.
struct Draws {
  std::size_t draws = 0;
  std::array<DrawValues, kOutputs> values;                  // empty for an output not kept
  std::vector<std::array<BlockMoments, kOutputs>> moments;  // one per block
  std::size_t stopped = 0;
  std::size_t size() const { return draws; }
};

Draws monte_carlo_draws(const Circuit& nominal, std::span<const Variation> variations,
                        const MonteCarloOptions& options);

// Over the draws that oscillate: the mean, the standard deviation (dividing
// by the count) and the percentiles of kPercentiles, each interpolated
// linearly between the two nearest order statistics (rank p/100 (count - 1)).
struct OutputStats {
  std::size_t count = 0;
  double mean = std::numeric_limits<double>::quiet_NaN();
  double std = std::numeric_limits<double>::quiet_NaN();
  std::array<double, kPercentiles.size()> percentile{};
};

struct MonteCarlo {
  std::size_t draws = 0;
  std::size_t stopped = 0;  // draws that do not oscillate
  std::uint64_t seed = 1;
  std::array<OutputStats, kOutputs> outputs;
  double stopped_fraction() const {
    return draws == 0 ? 0.0 : static_cast<double>(stopped) / static_cast<double>(draws);
  }
};

// Summarises draws, reordering their values (the percentiles select in place).
MonteCarlo summarise_draws(Draws&& draws, std::uint64_t seed, unsigned threads);

MonteCarlo monte_carlo(const Circuit& nominal, std::span<const Variation> variations,
                       const MonteCarloOptions& options);

// What the spread says about whether every board will run: corners_stop and
// draws_stop (warnings) when some corners or draws do not oscillate.
Findings spread_findings(const CornerSpread& corners, const MonteCarlo& mc);

}  // namespace benchtau
