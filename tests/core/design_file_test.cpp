// benchtau: design files: the example board, every circuit and wiring, parts, figures, captures.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <sstream>
#include <string>
#include <string_view>

#include "src/core/circuit.h"
#include "src/core/design_file.h"
#include "tests/core/design_test_files.h"

using namespace benchtau;
using namespace benchtau::test;

namespace {

bool is_nan(double x) { return std::isnan(x); }

void check_figures_equal(const TimerFigures& a, const TimerFigures& b) {
  CHECK(a.divider_ohm == b.divider_ohm);
  CHECK(a.out_high_drop_V == b.out_high_drop_V);
  CHECK(a.out_source_ohm == b.out_source_ohm);
  CHECK(a.out_low_V == b.out_low_V);
  CHECK(a.out_sink_ohm == b.out_sink_ohm);
  CHECK(a.discharge_on_ohm == b.discharge_on_ohm);
  CHECK(a.discharge_sat_V == b.discharge_sat_V);
  CHECK(a.threshold_current_A == b.threshold_current_A);
  CHECK(a.trigger_current_A == b.trigger_current_A);
  CHECK(a.reset_threshold_V == b.reset_threshold_V);
  CHECK(a.propagation_delay_s == b.propagation_delay_s);
  CHECK(a.comparator_offset_V == b.comparator_offset_V);
  CHECK(a.supply_min_V == b.supply_min_V);
  CHECK(a.supply_max_V == b.supply_max_V);
  CHECK(a.out_low_spread_V == b.out_low_spread_V);
  CHECK(a.out_high_drop_spread_V == b.out_high_drop_spread_V);
}

}  // namespace

TEST_CASE("the example design reads to exactly the design it describes") {
  const Design d = read(kExample);
  CHECK(d.name == "kiln controller, timer board rev C");
  CHECK(d.source == "board.toml");
  CHECK(d.supply_V == 9.0);
  CHECK(d.family == Family::bipolar);
  check_figures_equal(d.figures, typical_figures(Family::bipolar));
  CHECK(d.kind == CircuitKind::astable_two_resistor);
  CHECK(d.control == ControlWiring::decoupled);
  CHECK(d.reset == ResetWiring::supply);
  CHECK(d.control_to_V == 0.0);

  REQUIRE(d.parts.size() == 3);
  const Part& r1 = d.parts[0];
  CHECK(r1.ref == "R1");
  CHECK(r1.role == PartRole::upper);
  CHECK(r1.kind == PartKind::metal_film);
  CHECK(r1.value == Approx(10e3));
  CHECK(r1.tolerance == Approx(0.01));
  CHECK(is_nan(r1.rated_V));
  CHECK(is_nan(r1.vf_V));
  CHECK(r1.line == 9);
  const Part& r2 = d.parts[1];
  CHECK(r2.ref == "R2");
  CHECK(r2.role == PartRole::lower);
  CHECK(r2.kind == PartKind::metal_film);
  CHECK(r2.value == Approx(47e3));
  CHECK(r2.tolerance == Approx(0.01));
  CHECK(is_nan(r2.rated_V));
  CHECK(is_nan(r2.vf_V));
  CHECK(r2.line == 10);
  const Part& c1 = d.parts[2];
  CHECK(c1.ref == "C1");
  CHECK(c1.role == PartRole::timing_cap);
  CHECK(c1.kind == PartKind::electrolytic);
  CHECK(c1.value == Approx(4.7e-6));
  CHECK(c1.tolerance == Approx(0.20));
  CHECK(c1.rated_V == 16.0);
  CHECK(is_nan(c1.vf_V));
  CHECK(c1.line == 11);

  CHECK(d.out.column == "out_V");
  CHECK(d.cap.column == "cap_V");
  CHECK(d.ctl.column == "ctl_V");
  CHECK(d.out.input_ohm == kOpen);
  CHECK(d.cap.input_ohm == kOpen);
  CHECK(d.ctl.input_ohm == kOpen);

  CHECK(d.part_with(PartRole::lower) == &d.parts[1]);
  CHECK(d.part_with(PartRole::diode) == nullptr);
}

TEST_CASE("the example design's nominal circuit and part slots") {
  const Design d = read(kExample);
  const Circuit c = nominal_circuit(d);
  CHECK(c.kind == CircuitKind::astable_two_resistor);
  CHECK(c.control == ControlWiring::decoupled);
  CHECK(c.reset == ResetWiring::supply);
  const CircuitValues& v = c.v;
  CHECK(v.supply_V == 9.0);
  CHECK(v.upper_ohm == Approx(10e3));
  CHECK(v.lower_ohm == Approx(47e3));
  CHECK(v.timing_ohm == kOpen);
  CHECK(v.cap_F == Approx(4.7e-6));
  const CircuitValues defaults;  // what no part of the design touches keeps its default
  CHECK(v.diode_vf_V == defaults.diode_vf_V);
  CHECK(v.diode_ohm == defaults.diode_ohm);
  CHECK(v.control_ohm == kOpen);
  CHECK(v.control_to_V == 0.0);
  CHECK(v.pullup_ohm == kOpen);
  CHECK(v.load_ohm == kOpen);
  CHECK(v.led_vf_V == 0.0);
  CHECK(v.leak_ohm == kOpen);
  CHECK(v.leak_A == 0.0);
  CHECK(v.probe_cap_ohm == kOpen);
  CHECK(v.probe_ctl_ohm == kOpen);
  CHECK(v.probe_out_ohm == kOpen);
  CHECK(v.family == Family::bipolar);
  check_figures_equal(v.chip, typical_figures(Family::bipolar));

  const std::vector<PartSlot> slots = part_slots(d);
  REQUIRE(slots.size() == 3);
  CHECK(slots[0].part == 0);
  CHECK(slots[0].field == &CircuitValues::upper_ohm);
  CHECK(slots[1].part == 1);
  CHECK(slots[1].field == &CircuitValues::lower_ohm);
  CHECK(slots[2].part == 2);
  CHECK(slots[2].field == &CircuitValues::cap_F);
}

TEST_CASE("every circuit kind reads, with its parts in their slots") {
  struct Case {
    std::string_view word;
    CircuitKind kind;
  };
  for (const Case& k : {Case{"astable-two-resistor", CircuitKind::astable_two_resistor},
                        Case{"astable-output-resistor", CircuitKind::astable_output_resistor},
                        Case{"astable-diode-steered", CircuitKind::astable_diode_steered},
                        Case{"monostable", CircuitKind::monostable}}) {
    CAPTURE(k.word);
    const Design d = read(small_design(k.word, "decoupled", "supply", "", ""));
    CHECK(d.kind == k.kind);
    CHECK(d.family == Family::cmos);
    check_figures_equal(d.figures, typical_figures(Family::cmos));
    const Circuit c = nominal_circuit(d);
    CHECK(c.kind == k.kind);
    CHECK(c.v.supply_V == 12.0);
    CHECK(c.v.cap_F == Approx(100e-9));
    if (k.kind == CircuitKind::astable_two_resistor ||
        k.kind == CircuitKind::astable_diode_steered) {
      CHECK(c.v.upper_ohm == Approx(4.7e3));
      CHECK(c.v.lower_ohm == Approx(22e3));
      CHECK(c.v.timing_ohm == kOpen);
    } else {
      CHECK(c.v.upper_ohm == kOpen);
      CHECK(c.v.lower_ohm == kOpen);
      CHECK(c.v.timing_ohm == Approx(33e3));
    }
    if (k.kind == CircuitKind::astable_diode_steered) {
      CHECK(c.v.diode_vf_V == 0.65);
      REQUIRE(d.part_with(PartRole::diode) != nullptr);
      CHECK(is_nan(d.part_with(PartRole::diode)->value));
      CHECK(part_slots(d)[2].field == &CircuitValues::diode_vf_V);
    }
  }
}

TEST_CASE("every control wiring reads, with its resistor and voltage") {
  const std::string_view control_res = "R5 = { value = \"10k\", role = \"control-res\" }\n";
  SECTION("decoupled") {
    const Circuit c =
        nominal_circuit(read(small_design("monostable", "decoupled", "supply", "", "")));
    CHECK(c.control == ControlWiring::decoupled);
    CHECK(c.v.control_ohm == kOpen);
  }
  SECTION("load-to-ground, to 0 V unless control_V says otherwise") {
    Circuit c = nominal_circuit(
        read(small_design("astable-two-resistor", "load-to-ground", "supply", "", control_res)));
    CHECK(c.control == ControlWiring::load_to_ground);
    CHECK(c.v.control_ohm == Approx(10e3));
    CHECK(c.v.control_to_V == 0.0);
    c = nominal_circuit(read(small_design("astable-two-resistor", "load-to-ground", "supply",
                                          "control_V = 1.5\n", control_res)));
    CHECK(c.v.control_to_V == 1.5);
  }
  SECTION("feedback-from-output") {
    const Design d = read(
        small_design("astable-diode-steered", "feedback-from-output", "supply", "", control_res));
    CHECK(d.control == ControlWiring::feedback_from_output);
    CHECK(nominal_circuit(d).v.control_ohm == Approx(10e3));
  }
  SECTION("feedback-from-discharge, on the output-resistor circuit with its pull-up") {
    const Design d = read(
        small_design("astable-output-resistor", "feedback-from-discharge", "supply", "",
                     std::string(control_res) + "R6 = { value = \"2k2\", role = \"pull-up\" }\n"));
    CHECK(d.control == ControlWiring::feedback_from_discharge);
    const Circuit c = nominal_circuit(d);
    CHECK(c.v.control_ohm == Approx(10e3));
    CHECK(c.v.pullup_ohm == Approx(2.2e3));
  }
  SECTION("driven, stiffly unless a source resistance is given") {
    Circuit c = nominal_circuit(
        read(small_design("astable-two-resistor", "driven", "supply", "control_V = 5\n", "")));
    CHECK(c.control == ControlWiring::driven);
    CHECK(c.v.control_to_V == 5.0);
    CHECK(c.v.control_ohm == 0.0);
    c = nominal_circuit(read(
        small_design("astable-two-resistor", "driven", "supply", "control_V = 5\n", control_res)));
    CHECK(c.v.control_ohm == Approx(10e3));
  }
}

TEST_CASE("every reset wiring reads") {
  struct Case {
    std::string_view word;
    ResetWiring reset;
  };
  for (const Case& r : {Case{"supply", ResetWiring::supply}, Case{"control", ResetWiring::control},
                        Case{"cap-node", ResetWiring::cap_node}, Case{"open", ResetWiring::open}}) {
    CAPTURE(r.word);
    const Design d = read(small_design("astable-output-resistor", "decoupled", r.word, "", ""));
    CHECK(d.reset == r.reset);
    CHECK(nominal_circuit(d).reset == r.reset);
  }
}

TEST_CASE("control and reset default to the textbook wiring when left out") {
  const Design d =
      read(with("control = \"decoupled\"               # load-to-ground | "
                "feedback-from-output | feedback-from-discharge | driven\nreset = "
                "\"supply\"",
                "", kExample));
  CHECK(d.control == ControlWiring::decoupled);
  CHECK(d.reset == ResetWiring::supply);
}

TEST_CASE("a load into the discharge pin, through an LED") {
  const Design d = read(small_design("astable-output-resistor", "decoupled", "supply", "",
                                     "R7 = { value = \"470\", kind = \"carbon-film\", role = "
                                     "\"load-res\" }\nD2 = { vf_V = 2.0, kind = \"led\", role = "
                                     "\"led\" }\n"));
  const Circuit c = nominal_circuit(d);
  CHECK(c.v.load_ohm == Approx(470.0));
  CHECK(c.v.led_vf_V == 2.0);
  const std::vector<PartSlot> slots = part_slots(d);
  REQUIRE(slots.size() == 4);
  CHECK(slots[2].field == &CircuitValues::load_ohm);
  CHECK(slots[3].field == &CircuitValues::led_vf_V);
  CHECK(d.parts[3].kind == PartKind::led);
  CHECK(is_nan(d.parts[3].tolerance));  // a diode's vf_V is taken as given
}

TEST_CASE("part values in engineering notation, plain numbers and with their unit") {
  auto value_of = [](std::string_view r1) {
    return read(with("value = \"10k\", tolerance = \"1%\", kind = \"metal-film\", role = \"upper\"",
                     r1))
        .parts[0]
        .value;
  };
  CHECK(value_of("value = \"4k7\", role = \"upper\"") == Approx(4.7e3));
  CHECK(value_of("value = 4700, role = \"upper\"") == Approx(4.7e3));
  CHECK(value_of("value = 4.7e3, role = \"upper\"") == Approx(4.7e3));
  CHECK(value_of("value = \"2M2\", role = \"upper\"") == Approx(2.2e6));
  CHECK(value_of("value = \"4.7 kohm\", role = \"upper\"") == Approx(4.7e3));
  const Design d = read(with("\"4.7u\"", "\"100nF\""));
  CHECK(d.parts[2].value == Approx(100e-9));
}

TEST_CASE("tolerances as percentages or fractions, and the usual one for each kind") {
  auto tolerance_of = [](std::string_view r1) {
    return read(with("value = \"10k\", tolerance = \"1%\", kind = \"metal-film\", role = \"upper\"",
                     r1))
        .parts[0]
        .tolerance;
  };
  CHECK(tolerance_of("value = \"10k\", tolerance = \"0.5 %\", role = \"upper\"") == Approx(0.005));
  CHECK(tolerance_of("value = \"10k\", tolerance = 0.02, role = \"upper\"") == Approx(0.02));
  CHECK(tolerance_of("value = \"10k\", tolerance = \"5%\", role = \"upper\"") == Approx(0.05));
  // Defaults by kind: common practice of the trade, from memory.
  CHECK(tolerance_of("value = \"10k\", kind = \"metal-film\", role = \"upper\"") == Approx(0.01));
  CHECK(tolerance_of("value = \"10k\", kind = \"carbon-film\", role = \"upper\"") == Approx(0.05));
  CHECK(tolerance_of("value = \"10k\", kind = \"wirewound\", role = \"upper\"") == Approx(0.05));
  CHECK(tolerance_of("value = \"10k\", role = \"upper\"") == Approx(0.05));
  auto cap_tolerance_of = [](std::string_view kind) {
    return read(with("tolerance = \"20%\", kind = \"electrolytic\", rated_V = 16,",
                     std::string(kind) + ","))
        .parts[2]
        .tolerance;
  };
  CHECK(cap_tolerance_of("kind = \"film\"") == Approx(0.05));
  CHECK(cap_tolerance_of("kind = \"C0G\"") == Approx(0.05));
  CHECK(cap_tolerance_of("kind = \"ceramic\"") == Approx(0.10));
  CHECK(cap_tolerance_of("kind = \"X7R\"") == Approx(0.10));
  CHECK(cap_tolerance_of("kind = \"tantalum\"") == Approx(0.10));
  CHECK(cap_tolerance_of("kind = \"electrolytic\"") == Approx(0.20));
  CHECK(cap_tolerance_of("rated_V = 50") == Approx(0.20));  // kind unknown
}

TEST_CASE("part kinds are read whatever their case, and every kind has its word") {
  const Design d = read(with("kind = \"electrolytic\"", "kind = \"c0g\""));
  CHECK(d.parts[2].kind == PartKind::c0g);
  CHECK(part_kind_name(PartKind::c0g) == "C0G");
  CHECK(part_kind_name(PartKind::x7r) == "X7R");
  CHECK(part_kind_name(PartKind::metal_film) == "metal-film");
  CHECK(part_kind_name(PartKind::signal_diode) == "signal-diode");
  CHECK(part_role_name(PartRole::pullup) == "pull-up");
  CHECK(part_role_name(PartRole::timing_cap) == "timing-cap");
  CHECK(part_role_name(PartRole::control_res) == "control-res");
}

TEST_CASE("timer figures overridden by number or engineering string, the rest kept") {
  const Design d = read(std::string(kExample) +
                        "[timer]\n"
                        "divider_ohm = \"4k7\"\n"
                        "out_high_drop_V = 1.5\n"
                        "out_source_ohm = 12\n"
                        "out_low_V = \"50m\"\n"
                        "out_sink_ohm = \"8R2\"\n"
                        "discharge_on_ohm = 9.1\n"
                        "threshold_current_A = \"250n\"\n"
                        "trigger_current_A = \"-0.4u\"\n"
                        "reset_threshold_V = 0.8\n"
                        "propagation_delay_s = \"120n\"\n"
                        "comparator_offset_V = \"5m\"\n"
                        "supply_min_V = 5\n"
                        "supply_max_V = 15\n");
  const TimerFigures& f = d.figures;
  CHECK(f.divider_ohm == Approx(4.7e3));
  CHECK(f.out_high_drop_V == 1.5);
  CHECK(f.out_source_ohm == 12.0);
  CHECK(f.out_low_V == Approx(0.05));
  CHECK(f.out_sink_ohm == Approx(8.2));
  CHECK(f.discharge_on_ohm == 9.1);
  CHECK(f.threshold_current_A == Approx(250e-9));
  CHECK(f.trigger_current_A == Approx(-0.4e-6));
  CHECK(f.reset_threshold_V == 0.8);
  CHECK(f.propagation_delay_s == Approx(120e-9));
  CHECK(f.comparator_offset_V == Approx(5e-3));
  CHECK(f.supply_min_V == 5.0);
  CHECK(f.supply_max_V == 15.0);
  const TimerFigures typical = typical_figures(Family::bipolar);
  CHECK(f.out_low_spread_V == typical.out_low_spread_V);
  CHECK(f.out_high_drop_spread_V == typical.out_high_drop_spread_V);
  CHECK(nominal_circuit(d).v.chip.divider_ohm == Approx(4.7e3));
}

TEST_CASE("the discharge switch's saturation voltage is one of the timer figures") {
  const Design typical = read(kExample);
  const Design d = read(std::string(kExample) + "[timer]\ndischarge_sat_V = \"200m\"\n");
  CHECK(d.figures.discharge_sat_V == Approx(0.2));
  CHECK(nominal_circuit(d).v.chip.discharge_sat_V == Approx(0.2));
  CHECK(read(std::string(kExample) + "[timer]\ndischarge_sat_V = 0\n").figures.discharge_sat_V ==
        0.0);
  CHECK(error_of(std::string(kExample) + "[timer]\ndischarge_sat_V = -0.1\n") ==
        "board.toml:17: discharge_sat_V in [timer] must not be negative, found -0.1");
  // It reaches the model: the discharging target of the capacitor node moves
  // by the saturation's change seen through the divider R1 : Ron (superposition,
  // a textbook property of linear networks), and the charging target not at all.
  const CyclePrediction a = predict_cycle(nominal_circuit(typical));
  const CyclePrediction b = predict_cycle(nominal_circuit(d));
  const double r1_ohm = 10e3, ron_ohm = typical.figures.discharge_on_ohm;
  const double change_V = 0.2 - typical.figures.discharge_sat_V;
  CHECK(b.low.target_V - a.low.target_V == Approx(change_V * r1_ohm / (r1_ohm + ron_ohm)));
  CHECK(b.high.target_V == a.high.target_V);
  CHECK(b.low_s > a.low_s);
}

TEST_CASE("capture columns by number, and the instruments' input resistance") {
  const Design d = read(with("out = \"out_V\"", "out = 2\nout_input_ohm = \"10 Mohm\"\n") +
                        "cap_input_ohm = 1e6\nctl_input_ohm = \"2M2\"\n");
  CHECK(d.out.column == "2");
  CHECK(d.out.input_ohm == Approx(10e6));
  CHECK(d.cap.input_ohm == Approx(1e6));
  CHECK(d.ctl.input_ohm == Approx(2.2e6));
  const Circuit c = nominal_circuit(d);
  CHECK(c.v.probe_out_ohm == Approx(10e6));
  CHECK(c.v.probe_cap_ohm == Approx(1e6));
  CHECK(c.v.probe_ctl_ohm == Approx(2.2e6));
}

TEST_CASE("parts can be tables of their own, kept in file order") {
  const Design d = read(
      "supply_V = 5\nfamily = \"cmos\"\n[circuit]\nkind = \"monostable\"\n"
      "[parts.Rt]\nvalue = \"100k\"\nrole = \"timing-res\"\n"
      "[parts.Ct]\nvalue = \"1u\"\nkind = \"film\"\nrole = \"timing-cap\"\n");
  REQUIRE(d.parts.size() == 2);
  CHECK(d.parts[0].ref == "Rt");
  CHECK(d.parts[0].line == 5);
  CHECK(d.parts[1].ref == "Ct");
  CHECK(d.parts[1].line == 8);
  CHECK(d.name.empty());
  CHECK(d.out.column.empty());
}

TEST_CASE("a design file that cannot be opened names itself") {
  CHECK_THROWS_WITH(read_design_file(std::string(BENCHTAU_BINARY_DIR) + "/no/such/board.toml"),
                    std::string(BENCHTAU_BINARY_DIR) +
                        "/no/such/board.toml: cannot read the design file: No such file or "
                        "directory");
}

TEST_CASE("the demo design files read as their boards are described") {
  const Design mister =
      read_design_file(std::string(BENCHTAU_SOURCE_DIR) + "/captures/mister-rev-b.toml");
  CHECK(mister.name == "greenhouse mister timer, rev B");
  CHECK(mister.supply_V == 9.0);
  REQUIRE(mister.part_with(PartRole::upper) != nullptr);
  CHECK(mister.part_with(PartRole::upper)->value == Approx(4.7e3));
  CHECK(mister.part_with(PartRole::timing_cap)->rated_V == 50.0);
  CHECK(mister.ctl.column == "ctl (V)");
  CHECK(mister.ctl.input_ohm == Approx(10e6));
  const Design blinker =
      read_design_file(std::string(BENCHTAU_SOURCE_DIR) + "/captures/night-light-blinker.toml");
  CHECK(blinker.family == Family::cmos);
  CHECK(blinker.part_with(PartRole::lower)->value == Approx(68e3));
  CHECK(blinker.cap.input_ohm == Approx(1e6));
  CHECK(blinker.out.column.empty());
}

// The full example in README.md must read as it says.
TEST_CASE("the README's design file example reads") {
  std::ifstream in(std::string(BENCHTAU_SOURCE_DIR) + "/README.md");
  std::stringstream readme;
  readme << in.rdbuf();
  const std::string text = readme.str();
  const std::size_t section = text.find("## Design files");
  REQUIRE(section != std::string::npos);
  const std::size_t open = text.find("```toml\n", section);
  REQUIRE(open != std::string::npos);
  const std::size_t start = open + std::string_view("```toml\n").size();
  const std::size_t close = text.find("```", start);
  REQUIRE(close != std::string::npos);
  const Design d = read(text.substr(start, close - start));
  CHECK(d.kind == CircuitKind::astable_output_resistor);
  CHECK(d.control == ControlWiring::feedback_from_discharge);
  CHECK(d.family == Family::cmos);
  CHECK(d.figures.divider_ohm == Approx(100e3));
  CHECK(d.figures.out_sink_ohm == 40.0);
  CHECK(d.parts.size() == 6);
  const Circuit c = nominal_circuit(d);
  CHECK(c.v.timing_ohm == Approx(33e3));
  CHECK(c.v.pullup_ohm == Approx(2.2e3));
  CHECK(c.v.led_vf_V == 2.0);
  CHECK(d.cap.column == "3");
  CHECK(c.v.probe_cap_ohm == Approx(10e6));
}
