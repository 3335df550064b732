// benchtau: edge extraction from the output pin and from the capacitor sawtooth.
#include "src/core/edges.h"

#include <algorithm>
#include <array>
#include <cmath>
#include <optional>
#include <thread>

namespace benchtau {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// v(t) = a0 + a1 x + a2 x^2 with x = (t - t_ref) / scale; fitted by least squares.
struct Quadratic {
  double t_ref = 0.0, scale = 1.0;
  std::array<double, 3> a{};
  int degree = 2;

  double at(double t) const {
    const double x = (t - t_ref) / scale;
    return a[0] + x * (a[1] + x * a[2]);
  }
};

// Solves the (degree+1)-square normal equations by Gaussian elimination with
// partial pivoting; the system is at most 3x3.
std::optional<Quadratic> fit_poly(const TimeBase& time, std::span<const double> v,
                                  std::size_t first, std::size_t last, double t_ref) {
  const std::size_t n = last - first;
  if (n < 2) return std::nullopt;
  Quadratic q;
  q.t_ref = t_ref;
  q.degree = n >= 3 ? 2 : 1;
  const int m = q.degree + 1;
  // Time rises, so the farthest sample from t_ref is an end one (and were it
  // not, the scale only conditions the sums: the curve is the same).
  const double scale =
      std::max(std::fabs(time.at(first) - t_ref), std::fabs(time.at(last - 1) - t_ref));
  q.scale = scale > 0.0 ? scale : 1.0;
  const double per_scale = 1.0 / q.scale;
  // The power sums of x and of x^k v in one pass; a NaN sample makes them NaN.
  double s1 = 0, s2 = 0, s3 = 0, s4 = 0, t0 = 0, t1 = 0, t2 = 0;
  const bool uniform = time.uniform();
  for (std::size_t i = first; i < last; ++i) {
    const double t = uniform ? time.t0_s + static_cast<double>(i) * time.dt_s : time.t_s[i];
    const double x = (t - t_ref) * per_scale, x2 = x * x, y = v[i];
    s1 += x;
    s2 += x2;
    s3 += x2 * x;
    s4 += x2 * x2;
    t0 += y;
    t1 += x * y;
    t2 += x2 * y;
  }
  if (std::isnan(t0 + t1 + t2)) return std::nullopt;
  std::array<std::array<double, 4>, 3> A{};
  A[0] = {static_cast<double>(n), s1, s2, t0};
  A[1] = {s1, s2, s3, t1};
  A[2] = {s2, s3, s4, t2};
  for (int col = 0; col < m; ++col) {
    int pivot = col;
    for (int r = col + 1; r < m; ++r)
      if (std::fabs(A[r][col]) > std::fabs(A[pivot][col])) pivot = r;
    if (std::fabs(A[pivot][col]) < 1e-300) return std::nullopt;
    std::swap(A[col], A[pivot]);
    for (int r = 0; r < m; ++r) {
      if (r == col) continue;
      const double f = A[r][col] / A[col][col];
      for (int c = col; c < 4; ++c) A[r][c] -= f * A[col][c];
    }
  }
  for (int r = 0; r < m; ++r) q.a[r] = A[r][3] / A[r][r];
  return q;
}

// Where two curves fitted about the same t_ref meet, nearest t_guess within [t_lo, t_hi].
std::optional<double> meeting_time(const Quadratic& left, const Quadratic& right, double t_guess,
                                   double t_lo, double t_hi) {
  // Coefficients in u = t - t_ref, undoing each fit's own scaling.
  auto in_u = [](const Quadratic& q) {
    return std::array<double, 3>{q.a[0], q.a[1] / q.scale, q.a[2] / (q.scale * q.scale)};
  };
  const auto l = in_u(left), r = in_u(right);
  const double d0 = l[0] - r[0], d1 = l[1] - r[1], d2 = l[2] - r[2];
  std::array<double, 2> roots{kNaN, kNaN};
  const double span = t_hi - t_lo;
  if (std::fabs(d2) * span < 1e-9 * std::fabs(d1)) {
    if (d1 != 0.0) roots[0] = -d0 / d1;
  } else {
    const double disc = d1 * d1 - 4.0 * d2 * d0;
    if (disc < 0.0) return std::nullopt;
    // The numerically stable pair of quadratic roots.
    const double qq = -0.5 * (d1 + std::copysign(std::sqrt(disc), d1));
    if (qq != 0.0) {
      roots[0] = qq / d2;
      roots[1] = d0 / qq;
    }
  }
  std::optional<double> best;
  for (double u : roots) {
    if (std::isnan(u)) continue;
    const double t = left.t_ref + u;
    if (t < t_lo || t > t_hi) continue;
    if (!best || std::fabs(t - t_guess) < std::fabs(*best - t_guess)) best = t;
  }
  return best;
}

// The smallest step the channel resolves (one ADC code, or finer for
// unquantised data): the 1st percentile of the nonzero sample-to-sample steps.
double resolution_V(std::span<const double> v) {
  std::vector<double> steps;
  const std::size_t stride = std::max<std::size_t>(1, v.size() / 100000);
  for (std::size_t i = stride; i < v.size(); i += stride) {
    const double d = std::fabs(v[i] - v[i - 1]);
    if (d > 0.0 && std::isfinite(d)) steps.push_back(d);
  }
  if (steps.empty()) return 0.0;
  const auto at = static_cast<std::ptrdiff_t>(steps.size() / 100);
  std::nth_element(steps.begin(), steps.begin() + at, steps.end());
  // Floating-point residue from unit scaling must not count as a step.
  return 1.001 * steps[static_cast<std::size_t>(at)];
}

std::size_t fit_window(std::size_t segment_samples) {
  // A quarter of the segment keeps the curvature error small; short segments
  // take more of themselves, or quantisation dominates.
  const std::size_t floor = std::min<std::size_t>(8, segment_samples > 2 ? segment_samples - 2 : 0);
  return std::clamp<std::size_t>(segment_samples / 4, std::max<std::size_t>(floor, 3), 256);
}

// Removes short segments (with the edge pair that bounds them) relative to the
// median segment of the same kind.
std::vector<Edge> drop_glitches(const std::vector<Edge>& edges, double fraction,
                                std::size_t& glitches) {
  if (edges.size() < 3) return edges;
  std::vector<double> high, low;
  for (std::size_t k = 0; k + 1 < edges.size(); ++k) {
    if (edges[k + 1].after_gap) continue;
    const double d = edges[k + 1].t_s - edges[k].t_s;
    (edges[k].kind == EdgeKind::rising ? high : low).push_back(d);
  }
  auto median = [](std::vector<double>& v) {
    if (v.empty()) return 0.0;
    std::nth_element(v.begin(), v.begin() + static_cast<std::ptrdiff_t>(v.size() / 2), v.end());
    return v[v.size() / 2];
  };
  const double high_med = median(high), low_med = median(low);
  std::vector<Edge> kept;
  kept.reserve(edges.size());
  bool pending_gap = false;
  std::size_t k = 0;
  while (k < edges.size()) {
    if (k + 1 < edges.size() && !edges[k + 1].after_gap) {
      const double d = edges[k + 1].t_s - edges[k].t_s;
      const double med = edges[k].kind == EdgeKind::rising ? high_med : low_med;
      if (d < fraction * med) {
        ++glitches;
        pending_gap = pending_gap || edges[k].after_gap;
        k += 2;
        continue;
      }
    }
    Edge e = edges[k];
    e.after_gap = e.after_gap || pending_gap;
    pending_gap = false;
    kept.push_back(e);
    ++k;
  }
  return kept;
}

// The samples either side of a turnaround: the curve before it is fitted to
// the last samples of [seg_first, left_end), the curve after it to the first
// samples of [right_first, seg_end).
struct Spans {
  std::size_t seg_first, left_end, right_first, seg_end;
};

struct Meeting {
  std::optional<Quadratic> left, right;
  bool both = false;  // the curves met within [t_lo, t_hi]
  double t_s = 0.0;
  double cap_V = 0.0;
};

Meeting meet_curves(const TimeBase& time, std::span<const double> v, Spans s, double t_guess,
                    double t_lo, double t_hi) {
  Meeting m;
  if (s.left_end >= s.seg_first + 3) {
    const std::size_t w = std::min(fit_window(s.left_end - s.seg_first), s.left_end - s.seg_first);
    m.left = fit_poly(time, v, s.left_end - w, s.left_end, t_guess);
  }
  if (s.seg_end >= s.right_first + 3 && s.seg_end <= v.size()) {
    const std::size_t w =
        std::min(fit_window(s.seg_end - s.right_first), s.seg_end - s.right_first);
    m.right = fit_poly(time, v, s.right_first, s.right_first + w, t_guess);
  }
  if (m.left && m.right) {
    if (auto t = meeting_time(*m.left, *m.right, t_guess, t_lo, t_hi)) {
      m.both = true;
      m.t_s = *t;
      m.cap_V = m.left->at(*t);
    }
  }
  return m;
}

}  // namespace

EdgeScan output_edges(const TimeBase& time, std::span<const double> out_V,
                      const EdgeOptions& options) {
  return output_edges(time, out_V, two_levels(out_V, channel_spread(out_V)), options);
}

EdgeScan output_edges(const TimeBase& time, std::span<const double> out_V, const TwoLevels& levels,
                      const EdgeOptions& options) {
  EdgeScan scan;
  scan.levels = levels;
  const double swing = scan.levels.swing_V();
  if (!(swing > 0.0)) return scan;
  const double mid = scan.levels.low_V + 0.5 * swing;
  const double up = mid + options.hysteresis * swing;
  const double down = mid - options.hysteresis * swing;

  enum class State { unknown, low, high } state = State::unknown;
  bool gap = false;
  std::vector<Edge> edges;
  for (std::size_t i = 0; i < out_V.size(); ++i) {
    const double v = out_V[i];
    if (std::isnan(v)) {
      state = State::unknown;
      gap = !edges.empty();
      continue;
    }
    if (state == State::unknown) {
      if (v >= up) state = State::high;
      if (v <= down) state = State::low;
      continue;
    }
    const bool rising = state == State::low && v >= up;
    const bool falling = state == State::high && v <= down;
    if (!rising && !falling) continue;
    // Walk back to the pair of samples that straddles the midpoint; the walk
    // never leaves the hysteresis band, so the whole scan stays linear.
    std::size_t j = i;
    while (j > 0 && !std::isnan(out_V[j - 1]) && (rising ? out_V[j - 1] > mid : out_V[j - 1] < mid))
      --j;
    double t = time.at(j);
    if (j > 0 && !std::isnan(out_V[j - 1])) {
      const double v0 = out_V[j - 1], v1 = out_V[j];
      const double frac = (mid - v0) / (v1 - v0);
      t = time.at(j - 1) + frac * (time.at(j) - time.at(j - 1));
    }
    edges.push_back({t, rising ? EdgeKind::rising : EdgeKind::falling, j, gap, kNaN});
    gap = false;
    state = rising ? State::high : State::low;
  }
  scan.edges = drop_glitches(edges, options.glitch_fraction, scan.glitches);
  return scan;
}

EdgeScan sawtooth_edges(const TimeBase& time, std::span<const double> cap_V,
                        const EdgeOptions& options) {
  EdgeScan scan;
  const ChannelSpread spread = channel_spread(cap_V);
  scan.levels.low_V = spread.p_low_V;
  scan.levels.high_V = spread.p_high_V;
  scan.levels.mid_band_fraction = 0.5;
  const double swing = spread.p_high_V - spread.p_low_V;
  if (!(swing > 0.0)) return scan;
  const double drop = 2.0 * options.hysteresis * swing;

  // First pass: the extreme sample of each turnaround, found with hysteresis.
  struct Turn {
    std::size_t i;
    EdgeKind kind;
    bool after_gap;
  };
  std::vector<Turn> turns;
  enum class State { unknown, rising, falling } state = State::unknown;
  std::size_t start = 0, hi_i = 0, lo_i = 0;
  bool gap = false;
  for (std::size_t i = 0; i < cap_V.size(); ++i) {
    const double v = cap_V[i];
    if (std::isnan(v)) {
      state = State::unknown;
      start = i + 1;
      gap = !turns.empty();
      continue;
    }
    if (state == State::unknown && i == start) hi_i = lo_i = i;
    if (v > cap_V[hi_i]) hi_i = i;
    if (v < cap_V[lo_i]) lo_i = i;
    if (state != State::falling && v < cap_V[hi_i] - drop) {
      // A maximum at the very start of a run is where the record began, not a turnaround.
      if (hi_i > start) turns.push_back({hi_i, EdgeKind::falling, gap});
      gap = gap && hi_i == start;
      state = State::falling;
      lo_i = i;
    } else if (state != State::rising && v > cap_V[lo_i] + drop) {
      if (lo_i > start) turns.push_back({lo_i, EdgeKind::rising, gap});
      gap = gap && lo_i == start;
      state = State::rising;
      hi_i = i;
    }
  }

  // Second pass: refine each turnaround where the curves on either side meet.
  const double step_V = resolution_V(cap_V);
  std::vector<Edge> edges;
  edges.reserve(turns.size());
  for (std::size_t k = 0; k < turns.size(); ++k) {
    const std::size_t m = turns[k].i;
    const std::size_t prev = k > 0 ? turns[k - 1].i : 0;
    const std::size_t next = k + 1 < turns.size() ? turns[k + 1].i : cap_V.size();
    // Samples within a step of the extreme may belong to either side (a flat
    // top of one ADC code): leave them all out of the fits.
    std::size_t a = m, b = m;
    while (a > prev + 1 && std::fabs(cap_V[a - 1] - cap_V[m]) <= step_V) --a;
    while (b + 1 < next && std::fabs(cap_V[b + 1] - cap_V[m]) <= step_V) ++b;
    const double t_m = time.at(m);
    Edge e{t_m, turns[k].kind, m + 1, turns[k].after_gap, cap_V[m]};
    const Meeting meet =
        meet_curves(time, cap_V, {prev + 1, a, b + 1, next}, t_m, time.at(a > 1 ? a - 1 : 0),
                    time.at(std::min(b + 1, cap_V.size() - 1)));
    if (meet.both) {
      e.t_s = meet.t_s;
      e.cap_V = meet.cap_V;
    } else if (meet.left) {
      // The far side is too short to fit (a near-instant discharge): the turn
      // lies within the sample interval after the extreme sample.
      e.t_s = 0.5 * (t_m + time.at(std::min(m + 1, cap_V.size() - 1)));
      e.cap_V = meet.left->at(e.t_s);
    } else if (meet.right) {
      e.t_s = 0.5 * (time.at(m > 0 ? m - 1 : 0) + t_m);
      e.cap_V = meet.right->at(e.t_s);
    }
    edges.push_back(e);
  }
  scan.edges = drop_glitches(edges, options.glitch_fraction, scan.glitches);
  return scan;
}

namespace {

// Edges [begin, end) of edges, each from the curves either side of it.
void refine_edges(const TimeBase& time, std::span<const double> cap_V, std::vector<Edge>& edges,
                  std::size_t begin, std::size_t end) {
  for (std::size_t k = begin; k < end; ++k) {
    Edge& e = edges[k];
    const std::size_t j = e.index;  // first sample after the output crossed
    if (j < 2 || j + 1 >= cap_V.size()) continue;
    const std::size_t from = (k > 0 && !e.after_gap) ? edges[k - 1].index + 1 : 0;
    const std::size_t to =
        (k + 1 < edges.size() && !edges[k + 1].after_gap) ? edges[k + 1].index - 1 : cap_V.size();
    // The samples either side of the crossing may hold the switching itself.
    const Meeting meet =
        meet_curves(time, cap_V, {from, j - 1, j + 1, to}, e.t_s, time.at(j - 2), time.at(j + 1));
    if (meet.both) {
      e.t_s = meet.t_s;
      e.cap_V = meet.cap_V;
    } else if (meet.left) {
      e.cap_V = meet.left->at(e.t_s);
    }
  }
}

}  // namespace

void refine_with_cap(const TimeBase& time, std::span<const double> cap_V,
                     std::vector<Edge>& edges) {
  // Each edge reads its neighbours' sample indices, which no edge changes:
  // on a long record, two halves of the edges side by side.
  constexpr std::size_t kSideBySide = 4096;
  if (edges.size() >= kSideBySide && std::thread::hardware_concurrency() > 1) {
    const std::size_t half = edges.size() / 2;
    std::jthread other([&] { refine_edges(time, cap_V, edges, half, edges.size()); });
    refine_edges(time, cap_V, edges, 0, half);
    return;
  }
  refine_edges(time, cap_V, edges, 0, edges.size());
}

}  // namespace benchtau
