// benchtau: quantisation step and robust sigmas, on data whose answer is known.
#include <catch2/catch.hpp>

#include <cmath>
#include <random>
#include <vector>

#include "fit/noise_scale.h"

using namespace benchtau;

namespace {

// A slow sine through an ADC of the given step, with Gaussian noise.
std::vector<double> adc(double step_V, double noise_V, std::size_t n, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> g(0.0, 1.0);
  std::vector<double> v;
  for (std::size_t i = 0; i < n; ++i) {
    const double s = 4.0 + 2.0 * std::sin(1e-3 * static_cast<double>(i)) + noise_V * g(rng);
    v.push_back(step_V > 0.0 ? std::round(s / step_V) * step_V : s);
  }
  return v;
}

}  // namespace

TEST_CASE("the quantisation step is found from the data") {
  // An 8-bit converter over 10 V: 10 / 256 = 39.0625 mV; a 12-bit one: 2.44 mV.
  CHECK(quantisation_step_V(adc(10.0 / 256, 0.02, 20000, 1)) == Approx(10.0 / 256));
  CHECK(quantisation_step_V(adc(10.0 / 4096, 0.005, 20000, 2)) == Approx(10.0 / 4096));
  // Noisier than many steps: single steps are rarer, yet still common.
  CHECK(quantisation_step_V(adc(10.0 / 4096, 0.05, 20000, 3)) == Approx(10.0 / 4096));
  // Values scaled from decimal text, as a file in millivolts gives them: 1 mV steps.
  std::vector<double> mv;
  for (double v : adc(1e-3, 0.004, 20000, 4)) mv.push_back(std::round(v * 1e3) / 1e3);
  CHECK(quantisation_step_V(mv) == Approx(1e-3).epsilon(1e-6));
  // Unquantised data has no step.
  CHECK(quantisation_step_V(adc(0.0, 0.01, 20000, 5)) == 0.0);
  // Too little to say, and NaN cells skipped.
  CHECK(quantisation_step_V(std::vector<double>{1.0, 2.0}) == 0.0);
  std::vector<double> holes = adc(10.0 / 256, 0.02, 20000, 6);
  for (std::size_t i = 0; i < holes.size(); i += 7) holes[i] = std::nan("");
  CHECK(quantisation_step_V(holes) == Approx(10.0 / 256));
}

TEST_CASE("the MAD sigma is the standard deviation of Gaussian data and ignores glitches") {
  std::mt19937_64 rng(7);
  std::normal_distribution<double> g(1.5, 0.3);
  std::vector<double> v(40000);
  for (double& x : v) x = g(rng);
  for (std::size_t i = 0; i < 400; ++i) v[i * 100] = 50.0;  // 1 % wild values
  // The MAD of N(mu, s) is 0.6745 s (standard result). 1 % of wild values moves the two
  // medians by about a per cent of s; 40000 samples add about 0.5 % of random error.
  CHECK(mad_sigma(v) == Approx(0.3).epsilon(0.04));
  std::vector<double> none;
  CHECK(mad_sigma(none) == 0.0);
}

TEST_CASE("second differences give the noise of a smooth curve before any fit") {
  // Unquantised: the estimate is the noise. Var(y0 - 2 y1 + y2) = 6 sigma^2.
  CHECK(second_difference_sigma_V(adc(0.0, 0.01, 50000, 8)) == Approx(0.01).epsilon(0.03));
  // A curve with no noise at all gives (nearly) nothing.
  CHECK(second_difference_sigma_V(adc(0.0, 0.0, 50000, 9)) < 1e-6);
}
