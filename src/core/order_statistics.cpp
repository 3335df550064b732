// benchtau: exact percentiles by bracketing a sample and selecting with std::nth_element.
#include "src/core/order_statistics.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

namespace benchtau {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr std::size_t kDirect = 8192;  // below this many values, select on them all
constexpr std::size_t kChunk = 2048;

// Puts the order statistic of each rank in ranks (sorted, unique, within
// [lo, hi)) at its place in x, splitting the range at the middle rank.
void select_ranks(std::span<double> x, std::size_t lo, std::size_t hi,
                  std::span<const std::size_t> ranks) {
  if (ranks.empty() || hi - lo < 2) return;
  const std::size_t mid = ranks.size() / 2;
  const std::size_t k = ranks[mid];
  const auto first = x.begin() + static_cast<std::ptrdiff_t>(lo);
  const auto last = x.begin() + static_cast<std::ptrdiff_t>(hi);
  if (k == lo) {
    std::iter_swap(first, std::min_element(first, last));
  } else {
    std::nth_element(first, x.begin() + static_cast<std::ptrdiff_t>(k), last);
  }
  select_ranks(x, lo, k, ranks.subspan(0, mid));
  select_ranks(x, k + 1, hi, ranks.subspan(mid + 1));
}

// The values of x at each rank, selecting on all of x (no NaN in it).
void select_direct(std::span<double> x, std::span<const std::size_t> ranks,
                   std::span<double> value) {
  select_ranks(x, 0, x.size(), ranks);
  for (std::size_t r = 0; r < ranks.size(); ++r) value[r] = x[ranks[r]];
}

// One bracket [lo, hi] of values, holding some of the wanted ranks.
struct Bracket {
  double lo = -kInf;
  double hi = kInf;
  std::vector<std::size_t> ranks;   // indices into the wanted ranks
  std::size_t below = 0;            // values of x below lo
  std::vector<double> inside;       // values of x within [lo, hi]
  double lo_at = 0.0, hi_at = 0.0;  // the bounds' places in the sample
};

// Brackets each rank by value with a sorted sample of m of the n values: a
// sample quantile strays from its place by about sqrt(m p (1 - p)) sample
// positions, so four times that (and a few) holds the rank almost always.
std::vector<Bracket> brackets_for(std::span<const double> sample, std::size_t n,
                                  std::span<const std::size_t> ranks) {
  std::vector<Bracket> out;
  const auto m = static_cast<double>(sample.size());
  double last_hi_at = 0.0;
  for (std::size_t r = 0; r < ranks.size(); ++r) {
    const double p = static_cast<double>(ranks[r]) / static_cast<double>(n - 1);
    const double centre = p * (m - 1.0);
    const double half = 4.0 * std::sqrt(m * p * (1.0 - p)) + 4.0;
    const double lo_at = std::floor(centre - half), hi_at = std::ceil(centre + half);
    Bracket b;
    b.lo = lo_at < 0.0 ? -kInf : sample[static_cast<std::size_t>(lo_at)];
    b.hi = hi_at > m - 1.0 ? kInf : sample[static_cast<std::size_t>(hi_at)];
    b.ranks.push_back(r);
    b.lo_at = std::max(lo_at, 0.0);
    b.hi_at = std::min(hi_at, m - 1.0);
    // Ranks ascend, so brackets do too. Merge one that overlaps the last or
    // starts within m/16 sample positions of its end: a pass over x costs
    // per bracket, and a slightly wider bracket costs little.
    if (!out.empty() && (b.lo <= out.back().hi || lo_at <= last_hi_at + m / 16.0)) {
      out.back().hi = std::max(out.back().hi, b.hi);
      out.back().hi_at = b.hi_at;
      out.back().ranks.push_back(r);
    } else {
      out.push_back(std::move(b));
    }
    last_hi_at = hi_at;
  }
  return out;
}

// The values at each rank among the n numbers of x (x may hold NaN).
void select_bracketed(std::span<double> x, std::size_t n, std::span<const std::size_t> ranks,
                      std::span<double> value) {
  // 64 runs of consecutive values, spread evenly over x: cheap to read, and
  // spread enough that sorted input still gives a fair sample.
  constexpr std::size_t kRuns = 64;
  const std::size_t want = std::max<std::size_t>(1024, n / 64);
  const std::size_t run = std::max<std::size_t>(1, want / kRuns);
  std::vector<double> sample;
  sample.reserve(kRuns * run);
  for (std::size_t r = 0; r < kRuns; ++r) {
    const std::size_t start = r * (x.size() / kRuns);
    for (std::size_t i = start; i < std::min(x.size(), start + run); ++i) {
      if (!std::isnan(x[i])) sample.push_back(x[i]);
    }
  }
  std::sort(sample.begin(), sample.end());
  std::vector<Bracket> brackets = brackets_for(sample, n, ranks);
  // Chunk by chunk, bracket by bracket, without a branch on the values: each
  // value is written to a scratch slot that is kept only when it is inside.
  // NaN compares false, so it counts nowhere.
  for (Bracket& b : brackets) {
    // Room for the share of x the sample puts inside, and some.
    const double share = (b.hi_at - b.lo_at + 2.0) / static_cast<double>(sample.size());
    b.inside.reserve(static_cast<std::size_t>(1.25 * share * static_cast<double>(n)) + kChunk);
  }
  std::vector<double> scratch(kChunk);
  for (std::size_t start = 0; start < x.size(); start += kChunk) {
    const std::span<const double> chunk = x.subspan(start, std::min(kChunk, x.size() - start));
    for (Bracket& b : brackets) {
      const double lo = b.lo, hi = b.hi;
      std::size_t below = 0, kept = 0;
      for (const double v : chunk) {
        below += static_cast<std::size_t>(v < lo);
        scratch[kept] = v;
        kept += static_cast<std::size_t>((v >= lo) & (v <= hi));
      }
      b.below += below;
      b.inside.insert(b.inside.end(), scratch.begin(),
                      scratch.begin() + static_cast<std::ptrdiff_t>(kept));
    }
  }
  bool missed = false;
  for (Bracket& b : brackets) {
    std::vector<std::size_t> local;
    for (const std::size_t r : b.ranks) {
      if (ranks[r] < b.below || ranks[r] - b.below >= b.inside.size()) {
        missed = true;
        break;
      }
      local.push_back(ranks[r] - b.below);
    }
    if (missed) break;
    select_ranks(b.inside, 0, b.inside.size(), local);
    for (std::size_t j = 0; j < local.size(); ++j) value[b.ranks[j]] = b.inside[local[j]];
  }
  if (missed) {
    std::vector<double> all;
    all.reserve(n);
    for (const double v : x) {
      if (!std::isnan(v)) all.push_back(v);
    }
    select_direct(all, ranks, value);
  }
}

}  // namespace

void percentiles_of(std::span<double> x, std::span<const double> percents, std::span<double> out,
                    std::size_t count) {
  const std::size_t n = count != kCountUnknown
                            ? count
                            : static_cast<std::size_t>(std::count_if(
                                  x.begin(), x.end(), [](double v) { return !std::isnan(v); }));
  if (n == 0) {
    std::fill(out.begin(), out.end(), kNaN);
    return;
  }
  // Rank p/100 (n - 1) lies between order statistics floor and floor + 1.
  std::vector<std::size_t> ranks;
  for (const double p : percents) {
    const auto below = static_cast<std::size_t>(std::floor(p / 100.0 * static_cast<double>(n - 1)));
    ranks.push_back(below);
    if (below + 1 < n) ranks.push_back(below + 1);
  }
  std::sort(ranks.begin(), ranks.end());
  ranks.erase(std::unique(ranks.begin(), ranks.end()), ranks.end());
  std::vector<double> value(ranks.size());
  if (n < kDirect) {
    const auto end = std::remove_if(x.begin(), x.end(), [](double v) { return std::isnan(v); });
    select_direct(x.first(static_cast<std::size_t>(end - x.begin())), ranks, value);
  } else {
    select_bracketed(x, n, ranks, value);
  }
  auto at = [&](std::size_t rank) {
    return value[static_cast<std::size_t>(std::lower_bound(ranks.begin(), ranks.end(), rank) -
                                          ranks.begin())];
  };
  for (std::size_t i = 0; i < percents.size(); ++i) {
    const double pos = percents[i] / 100.0 * static_cast<double>(n - 1);
    const auto below = static_cast<std::size_t>(std::floor(pos));
    const double frac = pos - static_cast<double>(below);
    const double a = at(below);
    out[i] = (below + 1 < n && frac > 0.0) ? a + frac * (at(below + 1) - a) : a;
  }
}

}  // namespace benchtau
