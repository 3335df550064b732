// benchtau: fast seeded random numbers for Monte Carlo: splitmix64, xoshiro256**, a ziggurat
// normal.
#pragma once

#include <array>
#include <bit>
#include <cstddef>
#include <cstdint>

namespace benchtau {

// splitmix64's output function: a strong 64-bit mix, used to derive seeds.
// Written from memory of Vigna's published splitmix64 (the constants are its).
constexpr std::uint64_t mix64(std::uint64_t z) {
  z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
  z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
  return z ^ (z >> 31);
}

// xoshiro256**, written from memory of Blackman and Vigna's published paper
// ("Scrambled linear pseudorandom number generators") and its reference code.
// Fast, 256 bits of state, and fine for floating-point Monte Carlo work.
class Xoshiro256 {
 public:
  // The stream for (seed, stream): the four state words are successive
  // splitmix64 outputs from a start mixed from both, so every stream (a
  // Monte Carlo block) is fixed by the seed and its own index alone.
  Xoshiro256(std::uint64_t seed, std::uint64_t stream) {
    std::uint64_t x = mix64(seed ^ mix64(stream + 0x632BE59BD9B4E019ULL));
    for (std::uint64_t& w : s_) {
      x += 0x9E3779B97F4A7C15ULL;
      w = mix64(x);
    }
  }

  std::uint64_t next() {
    const std::uint64_t result = rotl(s_[1] * 5, 7) * 9;
    const std::uint64_t t = s_[1] << 17;
    s_[2] ^= s_[0];
    s_[3] ^= s_[1];
    s_[1] ^= s_[2];
    s_[0] ^= s_[3];
    s_[2] ^= t;
    s_[3] = rotl(s_[3], 45);
    return result;
  }

  // Uniform on [0, 1) from the top 53 bits.
  double uniform() { return static_cast<double>(next() >> 11) * 0x1.0p-53; }

 private:
  static constexpr std::uint64_t rotl(std::uint64_t x, int k) { return (x << k) | (x >> (64 - k)); }
  std::array<std::uint64_t, 4> s_{};
};

// A standard normal by the ziggurat method (Marsaglia and Tsang's published
// algorithm, written from memory), 256 layers. The layer edges are solved for
// at first use from the normal density itself, not taken from a table.
// Layer i has width edge[i]: edge[0] is the base layer's virtual width (its
// rectangle under the density at r = edge[1] plus the tail beyond, as one
// area), edge[256] = 0, and every layer has the same area.
struct Ziggurat {
  static constexpr int kLayers = 256;
  std::array<double, kLayers + 1> edge{};
  std::array<double, kLayers + 1> f{};        // the (unnormalised) density at each edge
  std::array<double, kLayers> inner_ratio{};  // edge[i + 1] / edge[i]: always under the curve
  double r = 0.0;
  Ziggurat();
};
const Ziggurat& ziggurat();

// The rare draws that land in a wedge or the tail.
double standard_normal_slow(Xoshiro256& rng, const Ziggurat& z, std::uint64_t bits);

inline double standard_normal(Xoshiro256& rng, const Ziggurat& z) {
  const std::uint64_t bits = rng.next();
  const auto i = static_cast<std::size_t>(bits & 0xFF);          // layer: the low 8 bits
  const double u = static_cast<double>(bits >> 11) * 0x1.0p-53;  // the top 53 bits
  if (u < z.inner_ratio[i]) {                                    // about 99 % of draws end here
    // Bit 8 is the sign, moved into the double's sign bit: no branch to
    // mispredict on a coin toss.
    const std::uint64_t sign = (bits & 0x100) << 55;
    return std::bit_cast<double>(std::bit_cast<std::uint64_t>(u * z.edge[i]) ^ sign);
  }
  return standard_normal_slow(rng, z, bits);
}

inline double standard_normal(Xoshiro256& rng) { return standard_normal(rng, ziggurat()); }

// A standard normal truncated to [-limit, limit], by rejection.
inline double truncated_normal(Xoshiro256& rng, const Ziggurat& z, double limit) {
  for (;;) {
    const double x = standard_normal(rng, z);
    if (x >= -limit && x <= limit) return x;
  }
}

inline double truncated_normal(Xoshiro256& rng, double limit) {
  return truncated_normal(rng, ziggurat(), limit);
}

}  // namespace benchtau
