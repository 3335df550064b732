// benchtau: a design file's [timer] table, overriding the family's typical internal figures.
#include <fmt/format.h>

#include <array>
#include <string_view>

#include "src/core/design_sections.h"

namespace benchtau::design_detail {
namespace {

using design_toml::Sign;

struct Figure {
  std::string_view key;  // named after the TimerFigures field, with its unit
  double TimerFigures::*field;
  std::string_view unit;  // allowed after an engineering string
  Sign sign;
};

// Currents may flow either way (a bipolar trigger pin sources current).
constexpr std::array kFigures{
    Figure{"divider_ohm", &TimerFigures::divider_ohm, "ohm", Sign::positive},
    Figure{"out_high_drop_V", &TimerFigures::out_high_drop_V, "V", Sign::non_negative},
    Figure{"out_source_ohm", &TimerFigures::out_source_ohm, "ohm", Sign::non_negative},
    Figure{"out_low_V", &TimerFigures::out_low_V, "V", Sign::non_negative},
    Figure{"out_sink_ohm", &TimerFigures::out_sink_ohm, "ohm", Sign::non_negative},
    Figure{"discharge_on_ohm", &TimerFigures::discharge_on_ohm, "ohm", Sign::non_negative},
    Figure{"discharge_sat_V", &TimerFigures::discharge_sat_V, "V", Sign::non_negative},
    Figure{"threshold_current_A", &TimerFigures::threshold_current_A, "A", Sign::any},
    Figure{"trigger_current_A", &TimerFigures::trigger_current_A, "A", Sign::any},
    Figure{"reset_threshold_V", &TimerFigures::reset_threshold_V, "V", Sign::non_negative},
    Figure{"propagation_delay_s", &TimerFigures::propagation_delay_s, "s", Sign::non_negative},
    Figure{"comparator_offset_V", &TimerFigures::comparator_offset_V, "V", Sign::non_negative},
    Figure{"supply_min_V", &TimerFigures::supply_min_V, "V", Sign::positive},
    Figure{"supply_max_V", &TimerFigures::supply_max_V, "V", Sign::positive},
    Figure{"out_low_spread_V", &TimerFigures::out_low_spread_V, "V", Sign::non_negative},
    Figure{"out_high_drop_spread_V", &TimerFigures::out_high_drop_spread_V, "V",
           Sign::non_negative},
};

}  // namespace

void read_timer(const design_toml::Reader& r, const toml::table& timer, TimerFigures& figures,
                std::vector<double TimerFigures::*>& given) {
  std::array<std::string_view, kFigures.size()> keys{};
  for (std::size_t k = 0; k < kFigures.size(); ++k) keys[k] = kFigures[k].key;
  r.check_keys(timer, keys, "in [timer]");
  for (const Figure& f : kFigures) {
    if (const toml::node* n = timer.get(f.key)) {
      figures.*f.field = r.eng(*n, {f.key, "[timer]"}, f.unit, f.sign);
      given.push_back(f.field);
    }
  }
  if (!(figures.supply_min_V < figures.supply_max_V)) {
    const toml::node* at = timer.get("supply_min_V");
    if (at == nullptr) at = timer.get("supply_max_V");
    r.fail(at != nullptr ? *at : static_cast<const toml::node&>(timer),
           fmt::format("[timer] gives a supply range of {} V to {} V; supply_min_V must be "
                       "below supply_max_V",
                       figures.supply_min_V, figures.supply_max_V));
  }
}

}  // namespace benchtau::design_detail
