// benchtau: the noise scale of a sampled channel: quantisation step and robust sigmas.
#pragma once

// What goes in: samples in volts (NaN skipped) or residuals in volts. What comes out: volts.
// None of these keeps a reference to its input.
#include <span>

namespace benchtau {

// The ADC's step, found from the data: the smallest nonzero difference between successive
// samples that is common (at least 0.5 % of the nonzero differences, within 1e-6 of itself)
// and of which nearly all differences (95 %) are whole multiples. 0 when there is none, as
// for unquantised data. Reads at most about 50 000 differences, spread over the record.
double quantisation_step_V(std::span<const double> values_V);

// 1.4826 * the median absolute deviation from the median: the standard deviation for
// Gaussian data, and barely moved by a few glitches. Reorders scratch. 0 for no values.
double mad_sigma(std::span<double> scratch);

// A noise sigma from the data alone, before any fit: the MAD sigma of second differences
// y[i-1] - 2 y[i] + y[i+1] over sqrt(6). A smooth curve sampled finely has second differences
// far below the noise, and the few corners at the edges do not move a median.
double second_difference_sigma_V(std::span<const double> values_V);

}  // namespace benchtau
