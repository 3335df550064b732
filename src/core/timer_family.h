// benchtau: the timer chip's internal figures, with typical defaults for each family.
#pragma once

#include <string_view>

namespace benchtau {

enum class Family { bipolar, cmos };

// What the chip itself contributes to the timing. A design file may override
// any of them. Currents are positive in the direction named.
struct TimerFigures {
  double divider_ohm = 0.0;          // each of the three equal divider resistors
  double out_high_drop_V = 0.0;      // supply minus the output's unloaded high level
  double out_source_ohm = 0.0;       // output resistance when high
  double out_low_V = 0.0;            // the output's unloaded low level
  double out_sink_ohm = 0.0;         // output resistance when low
  double discharge_on_ohm = 0.0;     // discharge switch when on...
  double discharge_sat_V = 0.0;      // ...in series with its saturation voltage
  double threshold_current_A = 0.0;  // drawn into the threshold pin from the capacitor node
  double trigger_current_A = 0.0;    // drawn into the trigger pin from the capacitor node
  double reset_threshold_V = 0.0;    // reset below this forces the output low
  double propagation_delay_s = 0.0;  // comparator to output
  double comparator_offset_V = 0.0;  // typical offset either way, for marginal checks
  double supply_min_V = 0.0;         // the family's usual supply range
  double supply_max_V = 0.0;
  // Typical part-to-part spread of the output levels, for marginal checks.
  double out_low_spread_V = 0.0;
  double out_high_drop_spread_V = 0.0;
};

// Typical figures. Each default's origin is given beside it in the .cpp;
// they are typical values recalled from the trade, not from one datasheet.
TimerFigures typical_figures(Family family);

std::string_view family_name(Family family);

}  // namespace benchtau
