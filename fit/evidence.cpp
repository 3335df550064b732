// benchtau: a fault path's evidence, integrated over its conductance on a grid.
#include "fit/evidence.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <utility>

namespace benchtau {
namespace {

constexpr double kNoEvidence = -std::numeric_limits<double>::infinity();

struct GridPoint {
  double log_g = 0.0;
  double log_z = kNoEvidence;
};

}  // namespace

FaultEvidence integrate_fault(const CircuitProblem& problem, const FitSpec& spec, double lo_S,
                              double hi_S, const std::vector<double>& z_start) {
  FaultEvidence out;
  const double a = std::log(lo_S), b = std::log(hi_S);
  std::vector<GridPoint> grid;
  FitSpec s = spec;
  std::vector<double> start = z_start;
  double best_z = kNoEvidence;
  auto evaluate = [&](double log_g, const std::vector<double>& from) {
    s.fault_S = std::exp(log_g);
    CircuitFitResult f = fit_circuit(problem, s, from);
    GridPoint p{log_g, f.ok ? f.log_evidence : kNoEvidence};
    if (f.ok) start = f.z;
    if (f.ok && p.log_z > best_z) {
      best_z = p.log_z;
      out.fault_S = s.fault_S;
      out.peak_chi2 = f.chi2_data;
      out.best = std::move(f);
    }
    grid.push_back(p);
  };

  // Coarse: about three points a decade, from no fault upward (each fit starts from the last).
  const int coarse = std::max(8, static_cast<int>(std::ceil((b - a) / std::log(10.0) * 3.0)));
  for (int i = 0; i <= coarse; ++i) evaluate(a + (b - a) * i / coarse, start);
  if (!out.best.ok) return out;

  // Fine: around the peak, where a well-determined fault's Z(G) is far narrower than a step.
  const double step = (b - a) / coarse;
  const double peak = std::log(out.fault_S);
  const std::vector<double> from = out.best.z;
  for (int i = -12; i <= 12; ++i) {
    const double g = peak + step * i / 12.0;
    if (i == 0 || g < a || g > b) continue;
    evaluate(g, from);
  }
  std::sort(grid.begin(), grid.end(),
            [](const GridPoint& l, const GridPoint& r) { return l.log_g < r.log_g; });

  // Trapezoid rule on Z(G) = exp(log_z - best) over ln G, and the cumulative for quantiles.
  std::vector<double> cum(grid.size(), 0.0);
  double total = 0.0;
  for (std::size_t i = 1; i < grid.size(); ++i) {
    const double h = grid[i].log_g - grid[i - 1].log_g;
    const double fa = std::exp(grid[i - 1].log_z - best_z);
    const double fb = std::exp(grid[i].log_z - best_z);
    total += 0.5 * h * (fa + fb);
    cum[i] = total;
  }
  if (!(total > 0.0)) return out;
  auto quantile = [&](double q) {
    const double target = q * total;
    for (std::size_t i = 1; i < grid.size(); ++i) {
      if (cum[i] >= target) {
        const double span = cum[i] - cum[i - 1];
        const double t = span > 0.0 ? (target - cum[i - 1]) / span : 0.0;
        return grid[i - 1].log_g + t * (grid[i].log_g - grid[i - 1].log_g);
      }
    }
    return grid.back().log_g;
  };
  out.median_S = std::exp(quantile(0.5));
  out.log_sigma = 0.5 * (quantile(0.8413) - quantile(0.1587));
  out.log_evidence = best_z + std::log(total) - std::log(b - a);
  out.ok = true;
  return out;
}

}  // namespace benchtau
