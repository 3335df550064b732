// benchtau: typical internal figures of bipolar and CMOS 555-type timers.
#include "src/core/timer_family.h"

namespace benchtau {

// All figures below are typical values of the trade recalled from memory (the
// general shape of bipolar and CMOS 555-type datasheets), not copied from any
// one maker's sheet. A design file overrides them when the part is known.
TimerFigures typical_figures(Family family) {
  TimerFigures f;
  if (family == Family::bipolar) {
    f.divider_ohm = 5e3;             // the classic "three 5 k" divider (memory)
    f.out_high_drop_V = 1.7;         // 1.4-2 V below the supply at moderate load (memory)
    f.out_source_ohm = 15.0;         // drop grows about 1.5 V per 100 mA (memory)
    f.out_low_V = 0.1;               // 0.1 V at 10 mA sink (memory)
    f.out_sink_ohm = 10.0;           // about 0.4 V more at 50 mA (memory)
    f.discharge_on_ohm = 5.0;        // with the saturation below, about 0.1 V at 10 mA (memory)
    f.discharge_sat_V = 0.05;        // a small transistor's saturation at light current (memory)
    f.threshold_current_A = 100e-9;  // typically 0.1 uA, 0.25 uA at most (memory)
    f.trigger_current_A = -500e-9;   // about 0.5 uA flows out of the trigger pin (memory)
    f.reset_threshold_V = 0.7;       // 0.4-1 V (memory)
    f.propagation_delay_s = 100e-9;  // about 100 ns (memory)
    f.comparator_offset_V = 0.01;    // a few millivolts, taken generously (memory)
    f.supply_min_V = 4.5;            // 4.5-16 V (memory)
    f.supply_max_V = 16.0;
    f.out_low_spread_V = 0.1;  // spread part to part (memory)
    f.out_high_drop_spread_V = 0.3;
  } else {
    f.divider_ohm = 100e3;     // CMOS dividers are tens to hundreds of kilohms (memory)
    f.out_high_drop_V = 0.0;   // rail to rail when lightly loaded (memory)
    f.out_source_ohm = 150.0;  // a few hundred ohms at 5 V (memory)
    f.out_low_V = 0.0;
    f.out_sink_ohm = 50.0;      // (memory)
    f.discharge_on_ohm = 20.0;  // a MOS switch: no saturation offset (memory)
    f.discharge_sat_V = 0.0;
    f.threshold_current_A = 10e-12;  // picoamps: CMOS inputs (memory)
    f.trigger_current_A = 10e-12;
    f.reset_threshold_V = 1.1;       // around 1.1 V (memory)
    f.propagation_delay_s = 100e-9;  // (memory)
    f.comparator_offset_V = 0.01;
    f.supply_min_V = 2.0;  // 2-15 V (memory)
    f.supply_max_V = 15.0;
    f.out_low_spread_V = 0.02;
    f.out_high_drop_spread_V = 0.05;
  }
  return f;
}

std::string_view family_name(Family family) {
  return family == Family::bipolar ? "bipolar" : "cmos";
}

}  // namespace benchtau
