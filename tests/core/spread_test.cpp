// benchtau: tolerance spread: corners, Monte Carlo determinism, textbook and propagated values.
#include <fmt/format.h>
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>
#include <string>

#include "src/core/design_file.h"
#include "src/core/spread.h"

using namespace benchtau;

namespace {

// A two-resistor astable (tolerances as given) with a chip free of
// second-order figures, so the textbook relations hold.
std::string classic_text(const char* r_tol, const char* c_tol) {
  return fmt::format(R"(name = "test astable"
supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
[parts]
R1 = {{ value = "10k", tolerance = "{0}", role = "upper" }}
R2 = {{ value = "47k", tolerance = "{0}", role = "lower" }}
C1 = {{ value = "100n", tolerance = "{1}", kind = "film", role = "timing-cap" }}
)",
                     r_tol, c_tol);
}

Design classic(const char* r_tol = "1%", const char* c_tol = "5%") {
  Design d = read_design_text(classic_text(r_tol, c_tol), "classic.toml");
  d.figures.discharge_on_ohm = 1e-9;
  d.figures.discharge_sat_V = 0.0;
  d.figures.threshold_current_A = 0.0;
  d.figures.trigger_current_A = 0.0;
  d.figures.propagation_delay_s = 0.0;
  return d;
}

// An output-resistor astable with a control-pin load: the general model path.
Design output_resistor() {
  return read_design_text(R"(supply_V = 5.0
family = "cmos"
[circuit]
kind = "astable-output-resistor"
control = "load-to-ground"
[parts]
R1 = { value = "100k", tolerance = "5%", role = "timing-res" }
C1 = { value = "10n", tolerance = "10%", kind = "x7r", role = "timing-cap" }
R2 = { value = "220k", tolerance = "5%", role = "control-res" }
)",
                          "out.toml");
}

constexpr double kLn2 = 0.69314718055994530942;

void check_identical(const Draws& a, const Draws& b) {
  REQUIRE(a.size() == b.size());
  CHECK(a.stopped == b.stopped);
  for (std::size_t k = 0; k < kOutputs; ++k) {
    std::size_t differ = 0;
    for (std::size_t i = 0; i < a.size(); ++i) {
      const double x = a.values[k][i], y = b.values[k][i];
      if (!(x == y || (std::isnan(x) && std::isnan(y)))) ++differ;
    }
    CHECK(differ == 0);
  }
}

void check_identical(const MonteCarlo& a, const MonteCarlo& b) {
  CHECK(a.draws == b.draws);
  CHECK(a.stopped == b.stopped);
  for (std::size_t k = 0; k < kOutputs; ++k) {
    const OutputStats &x = a.outputs[k], &y = b.outputs[k];
    CHECK(x.count == y.count);
    CHECK((x.mean == y.mean || (std::isnan(x.mean) && std::isnan(y.mean))));
    CHECK((x.std == y.std || (std::isnan(x.std) && std::isnan(y.std))));
    for (std::size_t i = 0; i < kPercentiles.size(); ++i) {
      CHECK((x.percentile[i] == y.percentile[i] ||
             (std::isnan(x.percentile[i]) && std::isnan(y.percentile[i]))));
    }
  }
}

}  // namespace

TEST_CASE("Monte Carlo results are identical for a seed whatever the thread count") {
  for (const Design& d : {classic(), output_resistor()}) {
    const Circuit c = nominal_circuit(d);
    const std::vector<Variation> vars = design_variations(d, true);
    MonteCarloOptions o;
    o.draws = 3 * kBlockDraws + 123;  // a partial last block
    o.seed = 7;
    o.threads = 1;
    const Draws one = monte_carlo_draws(c, vars, o);
    const MonteCarlo one_mc = monte_carlo(c, vars, o);
    for (unsigned threads : {2U, 3U, 7U}) {
      o.threads = threads;
      check_identical(one, monte_carlo_draws(c, vars, o));
      check_identical(one_mc, monte_carlo(c, vars, o));
    }
    // And a different seed gives different draws.
    o.seed = 8;
    CHECK(monte_carlo_draws(c, vars, o).values[0][0] != one.values[0][0]);
  }
}

TEST_CASE("a Monte Carlo of the period alone gives the full run's period, and nothing else") {
  for (const Design& d : {classic("5%", "20%"), output_resistor()}) {
    const Circuit c = nominal_circuit(d);
    const std::vector<Variation> vars = design_variations(d, true);
    MonteCarloOptions o;
    o.draws = 2 * kBlockDraws + 77;
    o.seed = 3;
    const MonteCarlo all = monte_carlo(c, vars, o);
    o.outputs = only(Output::period_s);
    const Draws draws = monte_carlo_draws(c, vars, o);
    CHECK(draws.size() == o.draws);
    CHECK(draws.values[0].empty());
    const MonteCarlo period = monte_carlo(c, vars, o);
    CHECK(period.draws == all.draws);
    const auto k = static_cast<std::size_t>(Output::period_s);
    CHECK(period.outputs[k].count == all.outputs[k].count);
    CHECK(period.outputs[k].mean == all.outputs[k].mean);
    CHECK(period.outputs[k].std == all.outputs[k].std);
    CHECK(period.outputs[k].percentile == all.outputs[k].percentile);
    CHECK(period.outputs[0].count == 0);
    CHECK(std::isnan(period.outputs[0].mean));
    CHECK(std::isnan(period.outputs[0].percentile[3]));
  }
}

TEST_CASE("every Monte Carlo draw lies within the worst-case corners") {
  for (const bool chip_spread : {false, true}) {
    for (const Design& d : {classic("5%", "20%"), output_resistor()}) {
      const Circuit c = nominal_circuit(d);
      const std::vector<Variation> vars = design_variations(d, chip_spread);
      const CornerSpread corners = corner_spread(c, vars);
      REQUIRE(corners.exhaustive);
      CHECK(corners.corners == (std::size_t{1} << corners.varying));
      CHECK(corners.stopped == 0);
      MonteCarloOptions o;
      o.draws = 20000;
      const Draws draws = monte_carlo_draws(c, vars, o);
      CHECK(draws.stopped == 0);
      for (std::size_t k = 0; k < kOutputs; ++k) {
        const Range r = corners.range[k];
        std::size_t outside = 0;
        for (double x : draws.values[k]) {
          // A relative hair of slack for rounding at the corners themselves.
          const double slack = 1e-12 * std::fabs(x);
          if (x < r.min - slack || x > r.max + slack) ++outside;
        }
        INFO(output_key(static_cast<Output>(k)) << (chip_spread ? " with chip spread" : ""));
        CHECK(outside == 0);
      }
    }
  }
}

TEST_CASE("classic astable: nominal and corners are the textbook relations") {
  // t_high = ln 2 (R1 + R2) C and t_low = ln 2 R2 C: P. Horowitz and W. Hill,
  // The Art of Electronics, 3rd ed., 2015, on the 555 astable (from memory).
  const Design d = classic("1%", "5%");
  const Circuit c = nominal_circuit(d);
  const CyclePrediction p = predict_cycle(c);
  REQUIRE(p.oscillates);
  CHECK(p.high_s == Approx(kLn2 * 57e3 * 100e-9).epsilon(1e-9));
  CHECK(p.low_s == Approx(kLn2 * 47e3 * 100e-9).epsilon(1e-9));
  const CornerSpread k = corner_spread(c, design_variations(d, false));
  CHECK(k.varying == 3);
  CHECK(k.corners == 8);
  // The period is monotone in every part, so its extremes are all-low and all-high.
  const auto at = [](Output o) { return static_cast<std::size_t>(o); };
  CHECK(k.range[at(Output::period_s)].min ==
        Approx(kLn2 * (10e3 + 2 * 47e3) * 0.99 * 100e-9 * 0.95).epsilon(1e-9));
  CHECK(k.range[at(Output::period_s)].max ==
        Approx(kLn2 * (10e3 + 2 * 47e3) * 1.01 * 100e-9 * 1.05).epsilon(1e-9));
  // Duty (R1 + R2) / (R1 + 2 R2) is lowest with R1 low and R2 high.
  CHECK(k.range[at(Output::duty)].min ==
        Approx((9.9e3 + 47.47e3) / (9.9e3 + 2 * 47.47e3)).epsilon(1e-9));
  CHECK(k.range[at(Output::duty)].max ==
        Approx((10.1e3 + 46.53e3) / (10.1e3 + 2 * 46.53e3)).epsilon(1e-9));
  // Thresholds at 2/3 and 1/3 of the supply whatever the parts (common practice).
  CHECK(k.range[at(Output::cap_max_V)].min == Approx(6.0).epsilon(1e-12));
  CHECK(k.range[at(Output::cap_min_V)].max == Approx(3.0).epsilon(1e-12));
}

TEST_CASE("Monte Carlo mean and std of the period follow first-order propagation") {
  // Derivation (ours, in this test): T = ln 2 (R1 + 2 R2) C. Each part is x
  // (1 + t z / 3) with z a standard normal truncated at +/-3, whose variance
  // is 1 - 6 phi(3) / (2 Phi(3) - 1) = 0.97334 (phi, Phi: the normal density
  // and distribution). To first order
  //   (sigma_T / T)^2 = [(R1 s1)^2 + (2 R2 s2)^2] / (R1 + 2 R2)^2 + s_C^2,
  // with s = t / 3 * sqrt(0.97334); the mean is T at the nominal values
  // (T is linear in each part and the parts are independent and symmetric).
  const Design d = classic("5%", "10%");
  const Circuit c = nominal_circuit(d);
  MonteCarloOptions o;
  o.draws = 200000;
  const MonteCarlo mc = monte_carlo(c, design_variations(d, false), o);
  const OutputStats& period = mc.outputs[static_cast<std::size_t>(Output::period_s)];
  const double phi3 = std::exp(-4.5) / std::sqrt(2.0 * std::numbers::pi);
  const double Phi3 = 0.5 * std::erfc(-3.0 / std::sqrt(2.0));
  const double var_z = 1.0 - 6.0 * phi3 / (2.0 * Phi3 - 1.0);
  CHECK(var_z == Approx(0.97334).epsilon(1e-4));
  const double r1 = 10e3, r2 = 47e3, cap = 100e-9;
  const double sr = 0.05 / 3.0 * std::sqrt(var_z), sc = 0.10 / 3.0 * std::sqrt(var_z);
  const double rel = std::sqrt(
      (std::pow(r1 * sr, 2) + std::pow(2 * r2 * sr, 2)) / std::pow(r1 + 2 * r2, 2) + sc * sc);
  const double t = kLn2 * (r1 + 2 * r2) * cap;
  CHECK(period.mean == Approx(t).epsilon(0.002));
  CHECK(period.std == Approx(rel * t).epsilon(0.03));
  CHECK(period.count == o.draws);
  CHECK(mc.stopped == 0);
  // The median sits at the nominal period; the 0.1 % and 99.9 % points lie
  // near 3.1 sigma (the truncated normal's, for a sum of three), inside the corners.
  CHECK(period.percentile[3] == Approx(t).epsilon(0.003));
  CHECK(period.percentile[0] < t * (1 - 2.5 * rel));
  CHECK(period.percentile[6] > t * (1 + 2.5 * rel));
}

TEST_CASE("parts without a tolerance are held, chip spread adds the timer's figures") {
  Design d = classic();
  const std::vector<Variation> parts = design_variations(d, false);
  REQUIRE(parts.size() == 3);
  CHECK(parts[0].name == "R1");
  CHECK(parts[0].low == Approx(9.9e3));
  CHECK(parts[0].high == Approx(10.1e3));
  CHECK(parts[2].name == "C1");
  // The ideal chip's zero figures cannot spread, so only the output levels,
  // the (tiny) discharge switch and the divider join in.
  const std::vector<Variation> all = design_variations(d, true);
  std::vector<std::string> names;
  for (std::size_t i = 3; i < all.size(); ++i) names.push_back(all[i].name);
  CHECK(names == std::vector<std::string>{"timer out_high_drop_V", "timer out_low_V",
                                          "timer discharge_on_ohm", "timer divider_ohm"});
}

TEST_CASE("more than twelve varying quantities use the sensitivity-sign corners") {
  // Typical figures: all seven chip figures vary, with three parts: ten, so
  // exhaustive; with an LED load on the discharge pin, still twelve or fewer.
  Design d = read_design_text(R"(supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
[parts]
R1 = { value = "10k", tolerance = "1%", role = "upper" }
R2 = { value = "47k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
)",
                              "typ.toml");
  const Circuit c = nominal_circuit(d);
  std::vector<Variation> vars = design_variations(d, true);
  CHECK(vars.size() == 10);
  const CornerSpread all = corner_spread(c, vars);
  CHECK(all.exhaustive);
  CHECK(all.corners == 1024);
  // Thirteen: the same quantities and three more chip-figure copies with no
  // effect... use the parts three times over instead: each ref moves the same field.
  for (int i = 0; i < 3; ++i) vars.push_back(vars[static_cast<std::size_t>(i)]);
  const CornerSpread signs = corner_spread(c, vars);
  CHECK_FALSE(signs.exhaustive);
  CHECK(signs.varying == 13);
  CHECK(signs.corners == 2 * kOutputs);
  // Repeated quantities set one field, so the extremes are the exhaustive ones
  // wherever each output is monotone in every quantity (period and times are).
  for (Output o : {Output::high_s, Output::low_s, Output::period_s}) {
    const auto k = static_cast<std::size_t>(o);
    CHECK(signs.range[k].min == Approx(all.range[k].min).epsilon(1e-12));
    CHECK(signs.range[k].max == Approx(all.range[k].max).epsilon(1e-12));
  }
}

TEST_CASE("a design that stops at some corners counts them, and its draws that stop") {
  // A discharge switch whose saturation floor sits near the lower threshold:
  // some timers run, some do not.
  Design d = read_design_text(R"(supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
reset = "supply"
[parts]
R1 = { value = "10k", tolerance = "1%", role = "upper" }
R2 = { value = "47k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
)",
                              "stops.toml");
  d.figures.discharge_sat_V = 2.98;  // a floor just below the 3 V lower threshold
  const Circuit c = nominal_circuit(d);
  std::vector<Variation> vars = design_variations(d, false);
  Variation sat;
  sat.name = "timer discharge_sat_V";
  sat.nominal = 2.98;
  sat.low = 2.90;
  sat.high = 3.06;
  sat.chip_field = &TimerFigures::discharge_sat_V;
  vars.push_back(sat);
  const CornerSpread k = corner_spread(c, vars);
  CHECK(k.stopped == 8);  // every corner with the floor at 3.06 V
  // The draws stop when the floor passes the value where the nominal circuit
  // stops (found here by bisection on the model; the parts' 1 % barely moves
  // it). The floor is drawn as a normal of sigma 0.08 V / 3 truncated at 3
  // sigma, so the expected share that stops is its tail beyond that value.
  double lo = 2.90, hi = 3.06;
  for (int i = 0; i < 60; ++i) {
    Circuit t = c;
    const double mid = 0.5 * (lo + hi);
    t.v.chip.discharge_sat_V = mid;
    (predict_cycle(t).oscillates ? lo : hi) = mid;
  }
  const double z = (lo - 2.98) / (0.08 / 3.0);
  const auto Phi = [](double x) { return 0.5 * std::erfc(-x / std::sqrt(2.0)); };
  const double expected = (Phi(3.0) - Phi(z)) / (Phi(3.0) - Phi(-3.0));
  MonteCarloOptions o;
  o.draws = 50000;
  const MonteCarlo mc = monte_carlo(c, vars, o);
  // Binomial sigma sqrt(p (1 - p) / n) is about 0.0022; allow 0.01.
  CHECK(mc.stopped_fraction() == Approx(expected).margin(0.01));
  CHECK(mc.outputs[0].count == o.draws - mc.stopped);
}
