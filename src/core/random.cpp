// benchtau: the ziggurat normal: layer edges solved from the density, and the sampler.
#include "src/core/random.h"

#include <cmath>
#include <numbers>

namespace benchtau {
namespace {

constexpr int kLayers = Ziggurat::kLayers;

double density(double x) { return std::exp(-0.5 * x * x); }  // unnormalised

// How far the stack of layers overshoots (+) or falls short of (-) the
// density's peak when the base starts at r_try; fills edges when given.
double closure(double r_try, std::array<double, kLayers + 1>* edges) {
  const double area = r_try * density(r_try) +
                      std::sqrt(std::numbers::pi / 2) * std::erfc(r_try / std::numbers::sqrt2);
  double x = r_try;
  if (edges != nullptr) {
    (*edges)[0] = area / density(r_try);
    (*edges)[1] = r_try;
  }
  for (int i = 1; i < kLayers - 1; ++i) {
    const double top = density(x) + area / x;
    if (top >= 1.0) return top - 1.0 + static_cast<double>(kLayers - 1 - i);  // reached too soon
    x = std::sqrt(-2.0 * std::log(top));
    if (edges != nullptr) (*edges)[static_cast<std::size_t>(i) + 1] = x;
  }
  return density(x) + area / x - 1.0;
}

}  // namespace

Ziggurat::Ziggurat() {
  // Bisection: a larger r leaves less area per layer, so the stack falls short.
  double lo = 2.0, hi = 5.0;
  for (int it = 0; it < 200; ++it) {
    const double mid = 0.5 * (lo + hi);
    (closure(mid, nullptr) > 0.0 ? lo : hi) = mid;
  }
  r = hi;
  closure(r, &edge);
  edge[kLayers] = 0.0;
  for (std::size_t i = 0; i <= kLayers; ++i) f[i] = density(edge[i]);
  for (std::size_t i = 0; i < kLayers; ++i) inner_ratio[i] = edge[i + 1] / edge[i];
}

const Ziggurat& ziggurat() {
  static const Ziggurat z;
  return z;
}

double standard_normal_slow(Xoshiro256& rng, const Ziggurat& z, std::uint64_t bits) {
  for (;;) {
    const auto i = static_cast<std::size_t>(bits & 0xFF);
    const double sign = (bits & 0x100) != 0 ? -1.0 : 1.0;
    const double u = static_cast<double>(bits >> 11) * 0x1.0p-53;
    if (u < z.inner_ratio[i]) return sign * u * z.edge[i];
    if (i == 0) {
      // The tail beyond r (Marsaglia's method): exponential proposals, accepted exactly.
      for (;;) {
        const double x = -std::log(1.0 - rng.uniform()) / z.r;
        const double y = -std::log(1.0 - rng.uniform());
        if (2.0 * y > x * x) return sign * (z.r + x);
      }
    }
    // The wedge between the layer's inner edge and its outer one.
    const double x = u * z.edge[i];
    const double y = z.f[i] + rng.uniform() * (z.f[i + 1] - z.f[i]);
    if (y < density(x)) return sign * x;
    bits = rng.next();
  }
}

}  // namespace benchtau
