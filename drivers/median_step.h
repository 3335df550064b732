// benchtau: the median step of a strictly increasing time column.
#pragma once

#include <span>

namespace benchtau::csv {

// The median of t[i + 1] - t[i] (the mean of the two middle steps when their
// count is even), exact, in a few passes and without a copy of the steps, so
// that a 10-million-row column costs no extra memory. t must increase
// strictly; fewer than two samples give 0.
double median_step(std::span<const double> t_s);

}  // namespace benchtau::csv
