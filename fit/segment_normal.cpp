// benchtau: one segment's normal equations, four samples at a time.
#include "fit/segment_normal.h"

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>
#include <cstring>

// The vector helpers below pass 32-byte vectors by value, which GCC notes changes the ABI
// without AVX; they are inline and internal, so no ABI is crossed.
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic ignored "-Wpsabi"
#endif

// x86-64 builds carry a second copy of the kernel for CPUs with AVX2 and FMA (x86-64-v3),
// picked when the program loads: about three times faster than the baseline SSE2 copy.
#if defined(__x86_64__) && defined(__GNUC__) && !defined(__clang__) && \
    !defined(__SANITIZE_ADDRESS__)
#define BENCHTAU_CLONES __attribute__((target_clones("arch=x86-64-v3", "default")))
#else
#define BENCHTAU_CLONES
#endif

namespace benchtau::detail {
namespace {

// Four samples at a time in the GNU vector extension (GCC and Clang): two SSE2 operations
// each on plain x86-64, one where the build targets AVX. The sums stay in four lanes until
// the end, so no add waits on the one before.
using Lanes = double __attribute__((vector_size(4 * sizeof(double))));
using LaneMask = long long __attribute__((vector_size(4 * sizeof(long long))));

Lanes load_lanes(const double* p) {
  Lanes v;
  std::memcpy(&v, p, sizeof v);
  return v;
}

Lanes all_lanes(double v) { return Lanes{v, v, v, v}; }

double lane_sum(Lanes v) { return (v[0] + v[1]) + (v[2] + v[3]); }

}  // namespace

BENCHTAU_CLONES
SegmentNormal segment_normal(std::span<const double> x, std::span<const double> y, double log_tau,
                             double vinf, double amp, double inv_sigma, double huber_a) {
  SegmentNormal out;
  const std::size_t n = x.size();
  const double inv_tau = std::exp(-log_tau);
  if (n == 0 || !std::isfinite(inv_tau) || !(inv_tau > 0.0) || !std::isfinite(vinf) ||
      !std::isfinite(amp))
    return out;
  constexpr std::size_t kBlock = 32;  // a multiple of 4
  const double h = n > 1 ? (x[n - 1] - x[0]) / static_cast<double>(n - 1) : 0.0;
  // q^j and j h, j < kBlock: the decay over j mean steps, and their length.
  alignas(32) double q_pow[kBlock], j_h[kBlock];
  q_pow[0] = 1.0;
  const double q = std::exp(-h * inv_tau);
  for (std::size_t j = 1; j < kBlock; ++j) q_pow[j] = q_pow[j - 1] * q;
  for (std::size_t j = 0; j < kBlock; ++j) j_h[j] = static_cast<double>(j) * h;
  const double b = huber_a * huber_a;

  // Sums over the samples of the Jacobian row (A e z, 1, e) and the plain residual r, as if
  // every sample were on the quadratic part of the loss; samples past the Huber threshold are
  // put right afterwards (few: 5 % of Gaussian noise at 2 sigma).
  Lanes s00{}, s01{}, s02{}, s12{}, s22{}, g0{}, g1{}, g2{}, rr{};
  const Lanes v_amp = all_lanes(amp), v_vinf = all_lanes(vinf), v_inv_tau = all_lanes(inv_tau),
              v_inv_sigma = all_lanes(inv_sigma), v_one = all_lanes(1.0), v_even = all_lanes(1e-18);
  double f00 = 0, f01 = 0, f02 = 0, f11 = 0, f12 = 0, f22 = 0, h0 = 0, h1 = 0, h2 = 0, fcost = 0;
  double n00 = 0, n01 = 0, n02 = 0, n11 = 0, n12 = 0, n22 = 0;
  alignas(32) double e[kBlock] = {}, r[kBlock] = {}, u0[kBlock] = {};
  const Lanes v_b = all_lanes(b);
  static_assert(kBlock <= 32, "one bit a sample of a block");
  for (std::size_t start = 0; start < n; start += kBlock) {
    const std::size_t m = std::min(kBlock, n - start);
    const std::size_t m4 = m / 4 * 4;
    const double* xb = x.data() + start;
    const double* yb = y.data() + start;
    const double eb = std::exp(-xb[0] * inv_tau);
    const Lanes v_eb = all_lanes(eb), v_x0 = all_lanes(xb[0]);
    // The sample's offset from the block's even grid, in units of tau: u; even while u^2 <
    // 1e-18 (a NaN fails that too).
    LaneMask even = {-1, -1, -1, -1};
    for (std::size_t j = 0; j < m4; j += 4) {
      const Lanes u = ((load_lanes(xb + j) - v_x0) - load_lanes(j_h + j)) * v_inv_tau;
      const Lanes ej = v_eb * load_lanes(q_pow + j) * (v_one - u);
      std::memcpy(e + j, &ej, sizeof ej);
      even &= u * u < v_even;
    }
    bool uneven = !(even[0] && even[1] && even[2] && even[3]);
    for (std::size_t j = m4; j < m; ++j) {
      const double u = ((xb[j] - xb[0]) - j_h[j]) * inv_tau;
      e[j] = eb * q_pow[j] * (1.0 - u);
      uneven |= !(u * u < 1e-18);
    }
    if (uneven) {
      for (std::size_t j = 0; j < m; ++j) {
        const double u = ((xb[j] - xb[0]) - j_h[j]) * inv_tau;
        if (!(u * u < 1e-18)) e[j] = std::exp(-xb[j] * inv_tau);
      }
    }
    // The block's samples past the Huber threshold, a bit each: the correction below visits
    // only those (about one in twenty) rather than testing every sample in turn.
    std::uint32_t past = 0;
    for (std::size_t j = 0; j < m4; j += 4) {
      const Lanes ej = load_lanes(e + j);
      const Lanes p = v_amp * ej * (load_lanes(xb + j) * v_inv_tau);  // d/d ln(tau) / inv_sigma
      const Lanes rj = (v_vinf + v_amp * ej - load_lanes(yb + j)) * v_inv_sigma;
      std::memcpy(r + j, &rj, sizeof rj);
      std::memcpy(u0 + j, &p, sizeof p);
      s00 += p * p;
      s01 += p;
      s02 += p * ej;
      s12 += ej;
      s22 += ej * ej;
      g0 += rj * p;
      g1 += rj;
      g2 += rj * ej;
      rr += rj * rj;
      const LaneMask over = rj * rj > v_b;  // NaN is never past: it counts nowhere
      past |=
          static_cast<std::uint32_t>((over[0] & 1) | (over[1] & 2) | (over[2] & 4) | (over[3] & 8))
          << j;
    }
    for (std::size_t j = m4; j < m; ++j) {
      const double ej = e[j];
      const double p = amp * ej * (xb[j] * inv_tau);
      const double rj = (vinf + amp * ej - yb[j]) * inv_sigma;
      r[j] = rj;
      u0[j] = p;
      s00[0] += p * p;
      s01[0] += p;
      s02[0] += p * ej;
      s12[0] += ej;
      s22[0] += ej * ej;
      g0[0] += rj * p;
      g1[0] += rj;
      g2[0] += rj * ej;
      rr[0] += rj * rj;
      if (rj * rj > b) past |= std::uint32_t{1} << j;
    }
    if (huber_a > 0.0) {
      for (; past != 0; past &= past - 1) {
        const auto j = static_cast<std::size_t>(std::countr_zero(past));
        const double rj = r[j];
        // Ceres's HuberLoss: rho = 2 a |r| - a^2, rho' = a / |r|; r becomes sign(r) sqrt(rho)
        // and the row is scaled by rho' |r| / sqrt(rho) = a / sqrt(rho).
        const double root = std::sqrt(2.0 * huber_a * std::fabs(rj) - b);
        const double w = huber_a / root, w2m1 = w * w - 1.0;
        const double shaped = std::copysign(root, rj), dg = w * shaped - rj;
        const double p = u0[j], ej = e[j];
        f00 += w2m1 * p * p;
        f01 += w2m1 * p;
        f02 += w2m1 * p * ej;
        f11 += w2m1;
        f12 += w2m1 * ej;
        f22 += w2m1 * ej * ej;
        n00 += p * p;
        n01 += p;
        n02 += p * ej;
        n11 += 1.0;
        n12 += ej;
        n22 += ej * ej;
        h0 += dg * p;
        h1 += dg;
        h2 += dg * ej;
        fcost += shaped * shaped - rj * rj;
      }
    }
  }
  const double is2 = inv_sigma * inv_sigma;
  const double c00 = lane_sum(s00), c01 = lane_sum(s01), c02 = lane_sum(s02),
               c11 = static_cast<double>(n), c12 = lane_sum(s12), c22 = lane_sum(s22);
  out.jtj << c00 + f00, c01 + f01, c02 + f02, c01 + f01, c11 + f11, c12 + f12, c02 + f02, c12 + f12,
      c22 + f22;
  out.jtj *= is2;
  out.hessian << c00 - n00, c01 - n01, c02 - n02, c01 - n01, c11 - n11, c12 - n12, c02 - n02,
      c12 - n12, c22 - n22;
  out.hessian *= is2;
  out.jtr << (lane_sum(g0) + h0) * inv_sigma, (lane_sum(g1) + h1) * inv_sigma,
      (lane_sum(g2) + h2) * inv_sigma;
  const double plain = lane_sum(rr);
  out.cost = plain + fcost;
  out.raw_ss_V2 = plain / is2;
  out.finite = std::isfinite(out.cost) && out.jtj.allFinite() && out.hessian.allFinite() &&
               out.jtr.allFinite();
  return out;
}

}  // namespace benchtau::detail
