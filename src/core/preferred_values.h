// benchtau: the E-series of preferred values (IEC 60063), and rounding to them.
#pragma once

#include <optional>
#include <span>
#include <string_view>

namespace benchtau {

// The series of IEC 60063. E3 to E24 have two significant figures, E48 to
// E192 three; each is named by how many values it has per decade.
enum class ESeries { e3, e6, e12, e24, e48, e96, e192 };

// The series' members in one decade, ascending, in [1, 10).
std::span<const double> series_values(ESeries series);

// "E24"; and back, case-insensitive ("e24" works too).
std::string_view series_name(ESeries series);
std::optional<ESeries> parse_series(std::string_view name);

// The tolerance a series is usually bought in, as a fraction (E24: 0.05);
// common practice.
double series_tolerance(ESeries series);

// The member of the series (in any decade) nearest to value, by ratio: the
// series are geometric, so "nearest" means the smallest |log(member / value)|.
// value must be positive and finite; otherwise NaN.
double nearest_preferred(double value, ESeries series);

// The largest member at or below value and the smallest at or above it; both
// equal value (as the series writes it) when value is a member, to within
// 1e-9 relative. NaN for a value that is not positive and finite.
struct PreferredNeighbours {
  double below = 0.0;
  double above = 0.0;
};
PreferredNeighbours preferred_neighbours(double value, ESeries series);

}  // namespace benchtau
