// benchtau: the seeded, block-parallel Monte Carlo of a prediction, and its statistics.
#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdint>
#include <functional>
#include <thread>

#if __has_include(<sys/mman.h>)
#include <sys/mman.h>
#endif

#include "src/core/cycle_timing.h"
#include "src/core/fast_astable.h"
#include "src/core/order_statistics.h"
#include "src/core/random.h"
#include "src/core/spread.h"

namespace benchtau {
namespace {

unsigned thread_count(unsigned asked, std::size_t jobs) {
  unsigned n = asked != 0 ? asked : std::max(1U, std::thread::hardware_concurrency());
  return static_cast<unsigned>(std::min<std::size_t>(n, std::max<std::size_t>(jobs, 1)));
}

// Runs job(0) .. job(jobs - 1) on threads workers, each job taken once. Which
// worker runs a job never changes what the job computes.
void parallel_for(std::size_t jobs, unsigned threads, const std::function<void(std::size_t)>& job) {
  const unsigned n = thread_count(threads, jobs);
  std::atomic<std::size_t> next{0};
  auto worker = [&] {
    for (std::size_t j = next++; j < jobs; j = next++) job(j);
  };
  if (n <= 1) {
    worker();
    return;
  }
  std::vector<std::jthread> pool;
  pool.reserve(n - 1);
  for (unsigned t = 1; t < n; ++t) pool.emplace_back(worker);
  worker();
}

// A quantity's value for a standard normal z truncated at kSigmasPerTolerance:
// each side of the nominal scaled to its own end. The side is chosen without
// a branch, since z's sign is a coin toss.
double value_at(const Variation& v, double z) {
  const double down = v.nominal - v.low, up = v.high - v.nominal;
  const double side = down + static_cast<double>(z >= 0.0) * (up - down);
  return v.nominal + z * (1.0 / kSigmasPerTolerance) * side;
}

// Sizes a draw column, asking for huge pages first: faulting in tens of
// megabytes 4 KiB at a time costs a good share of a run.
void allocate_column(DrawValues& column, std::size_t n) {
  column.reserve(n);
#if defined(MADV_HUGEPAGE)
  constexpr std::uintptr_t huge = std::uintptr_t{2} << 20;
  const auto begin = reinterpret_cast<std::uintptr_t>(column.data());
  const std::uintptr_t first = (begin + huge - 1) & ~(huge - 1);
  const std::uintptr_t last = (begin + n * sizeof(double)) & ~(huge - 1);
  if (last > first) ::madvise(reinterpret_cast<void*>(first), last - first, MADV_HUGEPAGE);
#endif
  column.resize(n);  // uninitialised: each worker writes its own block
}

// Without a branch on NaN, so the loops vectorise.
BlockMoments block_moments(std::span<const double> x) {
  BlockMoments m;
  double sum = 0.0, count = 0.0;
  for (double v : x) {
    const bool number = v == v;
    sum += number ? v : 0.0;
    count += number ? 1.0 : 0.0;
  }
  m.count = count;
  if (count == 0.0) return m;
  m.mean = sum / count;
  double m2 = 0.0;
  for (double v : x) {
    const double dv = v - m.mean;
    m2 += v == v ? dv * dv : 0.0;
  }
  m.m2 = m2;
  return m;
}

// One draw's outputs the general way: NaN for a draw that stops.
OutputValues slow_outputs(const Circuit& c, bool try_fast, std::size_t& stopped) {
  if (try_fast) {
    if (const std::optional<OutputValues> o = fast_astable_outputs(c)) return *o;
  }
  // The times and turnarounds alone: a draw needs nothing else.
  const CycleTiming t = cycle_timing(c);
  if (!t.oscillates) ++stopped;
  return OutputValues{t.high_s, t.low_s,     t.period_s, t.frequency_Hz,
                      t.duty,   t.cap_max_V, t.cap_min_V};
}

// Draws [begin, end) a batch of lanes at a time through the batch fast path;
// a lane the batch declines (it stops, or its delay is long) is drawn again
// from its stored values and worked out the general way. draw(c, values)
// draws one board into c, keeping its varied values; the random stream is
// used in the same order as one draw at a time would.
template <class Draw>
void draw_block_batched(const Circuit& nominal, std::span<const Variation> variations, Draw& draw,
                        OutputSet kept, std::size_t begin, std::size_t end, Draws& d,
                        std::size_t& stopped) {
  const std::size_t nv = variations.size();
  Circuit c = nominal;
  AstableBatch batch;
  AstableBatchOutputs out;
  std::vector<double> drawn(kAstableLanes * nv);
  for (std::size_t first = begin; first < end; first += kAstableLanes) {
    const std::size_t lanes = std::min(kAstableLanes, end - first);
    for (std::size_t i = 0; i < lanes; ++i) {
      draw(c, std::span(drawn).subspan(i * nv, nv));
      load_lane(c, batch, i);
    }
    batch_outputs(batch, lanes, out);
    for (std::size_t k = 0; k < kOutputs; ++k) {
      if (kept[k])
        std::copy_n(out.value[k].begin(), lanes,
                    d.values[k].begin() + static_cast<std::ptrdiff_t>(first));
    }
    for (std::size_t i = 0; i < lanes; ++i) {
      if (out.done[i]) continue;
      Circuit s = nominal;
      for (std::size_t k = 0; k < nv; ++k) variations[k].apply(s, drawn[i * nv + k]);
      const OutputValues o = slow_outputs(s, true, stopped);
      for (std::size_t k = 0; k < kOutputs; ++k) {
        if (kept[k]) d.values[k][first + i] = o[k];
      }
    }
  }
}

}  // namespace

void BlockMoments::merge(const BlockMoments& o) {
  if (o.count == 0.0) return;
  const double n = count + o.count;
  const double d = o.mean - mean;
  mean += d * o.count / n;
  m2 += o.m2 + d * d * count * o.count / n;
  count = n;
}

Draws monte_carlo_draws(const Circuit& nominal, std::span<const Variation> variations,
                        const MonteCarloOptions& options) {
  Draws d;
  const std::size_t n = options.draws;
  d.draws = n;
  const OutputSet kept = options.outputs;
  for (std::size_t k = 0; k < kOutputs; ++k) {
    if (kept[k]) allocate_column(d.values[k], n);
  }
  const std::size_t blocks = (n + kBlockDraws - 1) / kBlockDraws;
  d.moments.resize(blocks);
  std::vector<std::size_t> stopped(blocks, 0);
  const bool fast = fast_astable_outputs(nominal).has_value();
  const Ziggurat& zig = ziggurat();
  parallel_for(blocks, options.threads, [&](std::size_t b) {
    Xoshiro256 rng(options.seed, b);
    const std::size_t begin = b * kBlockDraws, end = std::min(n, begin + kBlockDraws);
    auto draw = [&](Circuit& c, std::span<double> drawn) {
      for (std::size_t k = 0; k < variations.size(); ++k) {
        drawn[k] = value_at(variations[k], truncated_normal(rng, zig, kSigmasPerTolerance));
        variations[k].apply(c, drawn[k]);
      }
    };
    if (fast) {
      draw_block_batched(nominal, variations, draw, kept, begin, end, d, stopped[b]);
    } else {
      Circuit c = nominal;
      std::vector<double> drawn(variations.size());
      for (std::size_t i = begin; i < end; ++i) {
        draw(c, drawn);
        const OutputValues o = slow_outputs(c, false, stopped[b]);
        for (std::size_t k = 0; k < kOutputs; ++k) {
          if (kept[k]) d.values[k][i] = o[k];
        }
      }
    }
    for (std::size_t k = 0; k < kOutputs; ++k) {
      if (kept[k])
        d.moments[b][k] = block_moments(std::span(d.values[k]).subspan(begin, end - begin));
    }
  });
  for (std::size_t s : stopped) d.stopped += s;
  return d;
}

MonteCarlo summarise_draws(Draws&& draws, std::uint64_t seed, unsigned threads) {
  MonteCarlo mc;
  mc.draws = draws.size();
  mc.stopped = draws.stopped;
  mc.seed = seed;
  for (std::size_t k = 0; k < kOutputs; ++k) {
    BlockMoments m;
    for (const auto& block : draws.moments) m.merge(block[k]);
    OutputStats& s = mc.outputs[k];
    s.count = static_cast<std::size_t>(m.count);
    if (m.count > 0.0) {
      s.mean = m.mean;
      s.std = std::sqrt(m.m2 / m.count);
    }
  }
  // The k-th smallest value is the same whichever order selection meets the
  // values in, so the percentiles too are independent of the threads.
  parallel_for(kOutputs, threads, [&](std::size_t k) {
    percentiles_of(draws.values[k], kPercentiles, mc.outputs[k].percentile, mc.outputs[k].count);
  });
  return mc;
}

MonteCarlo monte_carlo(const Circuit& nominal, std::span<const Variation> variations,
                       const MonteCarloOptions& options) {
  return summarise_draws(monte_carlo_draws(nominal, variations, options), options.seed,
                         options.threads);
}

}  // namespace benchtau
