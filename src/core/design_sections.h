// benchtau: the design file's sections, read one by one (internal to the design reader).
#pragma once

#include <toml++/toml.h>

#include <optional>
#include <string_view>
#include <vector>

#include "src/core/design.h"
#include "src/core/design_toml.h"

namespace benchtau::design_detail {

// What sort of component a role takes and a kind is.
enum class PartGroup { resistor, capacitor, diode };
PartGroup role_group(PartRole r);
std::optional<PartGroup> kind_group(PartKind k);  // none for unknown

// One entry of [parts], checked on its own (roles against the circuit come later).
Part read_part(const design_toml::Reader& r, const toml::key& ref, const toml::node& entry);

// The parts' roles against the circuit: each needed role present, none twice,
// none the circuit does not use. parts_table is null when there is no [parts].
void check_roles(const design_toml::Reader& r, const Design& design,
                 const toml::table* parts_table);

// [timer]: overrides of the family's figures, applied to figures.
// given collects the figures the table sets.
void read_timer(const design_toml::Reader& r, const toml::table& timer, TimerFigures& figures,
                std::vector<double TimerFigures::*>& given);

}  // namespace benchtau::design_detail
