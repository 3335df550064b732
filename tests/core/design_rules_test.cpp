// benchtau: design rules: each fires on a design built for it, none on the healthy demo board.
#include <fmt/format.h>
#include <catch2/catch.hpp>

#include <algorithm>
#include <string>

#include "src/core/design_file.h"
#include "src/core/design_rules.h"

using namespace benchtau;

namespace {

// A design file around a [circuit] and [parts] of the caller's.
Design design(const std::string& head, const std::string& circuit, const std::string& parts) {
  return read_design_text(fmt::format("{}\n[circuit]\n{}\n[parts]\n{}\n", head, circuit, parts),
                          "rules.toml");
}

Findings findings_of(const Design& d) {
  const Circuit c = nominal_circuit(d);
  return check_design(d, c, predict_cycle(c));
}

// The message of the one finding with code, or a note that there is none.
std::string message(const Findings& f, const std::string& code) {
  const auto it =
      std::find_if(f.begin(), f.end(), [&](const Finding& x) { return x.code == code; });
  return it == f.end() ? std::string("(no ") + code + ")" : it->message;
}

Severity severity(const Findings& f, const std::string& code) {
  for (const Finding& x : f)
    if (x.code == code) return x.severity;
  return Severity::info;
}

const std::string kBipolar9 = "supply_V = 9.0\nfamily = \"bipolar\"";
const std::string kTwoResistor = "kind = \"astable-two-resistor\"";

std::string two_resistor_parts(const std::string& r1, const std::string& r2, const std::string& c1,
                               const std::string& extra = "") {
  return fmt::format(
      "R1 = {{ value = \"{}\", role = \"upper\" }}\nR2 = {{ value = \"{}\", role = \"lower\" }}\n"
      "C1 = {{ value = \"{}\", kind = \"film\", role = \"timing-cap\" }}\n{}",
      r1, r2, c1, extra);
}

}  // namespace

TEST_CASE("the healthy demo board raises no design finding") {
  const Design d =
      read_design_file(std::string(BENCHTAU_SOURCE_DIR) + "/captures/mister-rev-b.toml");
  CHECK(findings_of(d).empty());
}

TEST_CASE("discharge pin current: R1 too low for the family") {
  // By hand: (9 V - 50 mV saturation) / (470 ohm + 5 ohm switch) = 18.8 mA.
  const Findings f =
      findings_of(design(kBipolar9, kTwoResistor, two_resistor_parts("470", "10k", "1u")));
  CHECK(severity(f, "discharge_current") == Severity::warning);
  CHECK(
      message(f, "discharge_current") ==
      "the discharge pin sinks 18.8 mA while on (R1 470 ohm from the 9.00 V supply); common "
      "practice keeps it below 15.0 mA on a bipolar timer, about 600 ohm or more from the supply");
  // CMOS: (5 V - 0) / (680 ohm + 20 ohm) = 7.14 mA against 5 mA.
  const Findings g = findings_of(design("supply_V = 5.0\nfamily = \"cmos\"", kTwoResistor,
                                        two_resistor_parts("680", "10k", "1u")));
  CHECK(message(g, "discharge_current") ==
        "the discharge pin sinks 7.14 mA while on (R1 680 ohm from the 5.00 V supply); common "
        "practice keeps it below 5.00 mA on a cmos timer, about 1.00 kohm or more from the supply");
}

TEST_CASE("output pin current: a low timing resistor from a CMOS output") {
  // By hand, at the start of each phase: sourcing (5 V - 1.667 V) / (150 ohm
  // source + 100 ohm) = 13.3 mA while high, sinking 3.333 V / (50 ohm sink +
  // 100 ohm) = 22.2 mA while low; the larger is set against the 10 mA kept
  // for CMOS outputs.
  const Findings f =
      findings_of(design("supply_V = 5.0\nfamily = \"cmos\"", "kind = \"astable-output-resistor\"",
                         "R1 = { value = \"100\", role = \"timing-res\" }\n"
                         "C1 = { value = \"1u\", kind = \"film\", role = \"timing-cap\" }"));
  CHECK(message(f, "output_current") ==
        "the output pin sinks 22.2 mA at the start of each low phase; common practice keeps a "
        "cmos timer's output below 10.0 mA");
}

TEST_CASE("LED on the discharge pin: too much current, or too little supply") {
  // By hand: (9 V - 2 V - 50 mV) / (220 ohm + 5 ohm) = 30.9 mA.
  const std::string led =
      "R3 = { value = \"220\", role = \"load-res\" }\n"
      "D1 = { vf_V = 2.0, kind = \"led\", role = \"led\" }";
  const Findings f =
      findings_of(design(kBipolar9, kTwoResistor, two_resistor_parts("10k", "47k", "1u", led)));
  CHECK(message(f, "led_current") ==
        "D1 carries 30.9 mA while the discharge pin is on (9.00 V supply, 2.00 V forward voltage, "
        "R3 220 ohm and the switch's 5.00 ohm); common practice keeps a small indicator LED at "
        "20.0 mA or less");
  // The same LED current also loads the discharge pin.
  CHECK(message(f, "discharge_current").find("R1 10.0 kohm, R3 220 ohm with D1") !=
        std::string::npos);
  const std::string blue =
      "R3 = { value = \"220\", role = \"load-res\" }\n"
      "D1 = { vf_V = 3.2, kind = \"led\", role = \"led\" }";
  const Findings g = findings_of(design("supply_V = 3.0\nfamily = \"cmos\"", kTwoResistor,
                                        two_resistor_parts("10k", "47k", "1u", blue)));
  CHECK(message(g, "led_unlit") ==
        "D1 will not light: the 3.00 V supply less the discharge switch's 0 V does not exceed its "
        "3.20 V forward voltage");
}

TEST_CASE("reset: open on each family, and a small margin") {
  const std::string parts = two_resistor_parts("10k", "47k", "100n");
  const Findings b = findings_of(design(kBipolar9, kTwoResistor + "\nreset = \"open\"", parts));
  CHECK(severity(b, "reset_open") == Severity::info);
  CHECK(message(b, "reset_open") ==
        "the reset pin is left open; a bipolar timer usually holds it high by itself, but common "
        "practice ties it to the supply");
  const Findings c = findings_of(
      design("supply_V = 9.0\nfamily = \"cmos\"", kTwoResistor + "\nreset = \"open\"", parts));
  CHECK(severity(c, "reset_open") == Severity::warning);
  CHECK(message(c, "reset_open") ==
        "the reset pin is left open; a CMOS timer's reset input has no pull-up and can float low "
        "and stop the timer: tie it to the supply");
  // Reset on the capacitor node of a 4.5 V CMOS timer: the node's lowest is
  // 1/3 of 4.5 V = 1.50 V, 0.40 V above the 1.1 V threshold.
  const Findings m = findings_of(
      design("supply_V = 4.5\nfamily = \"cmos\"", kTwoResistor + "\nreset = \"cap-node\"", parts));
  CHECK(message(m, "reset_margin") ==
        "the reset pin falls to 1.50 V, only 400 mV above its 1.10 V threshold; reset thresholds "
        "spread from part to part, and common practice keeps 500 mV or more");
}

TEST_CASE("timing resistance too high for the threshold input current") {
  // By hand: (9 V - 6 V) / (1 M + 1 M) = 1.50 uA in the resistors at the upper
  // threshold; the bipolar threshold input's 100 nA is 6.7 % of it.
  const Findings f =
      findings_of(design(kBipolar9, kTwoResistor, two_resistor_parts("1M", "1M", "1n")));
  CHECK(message(f, "threshold_current") ==
        "the timing resistance is high for the threshold input: at the upper threshold only 1.50 "
        "uA flows through R1 + R2 (2.00 Mohm), and the threshold pin draws 100 nA of it (6.7 %); "
        "that input current varies from part to part, so common practice keeps it under 1 % (a "
        "smaller resistance and a larger capacitor)");
}

TEST_CASE("electrolytic leakage against the charging current, and ratings") {
  // By hand: 0.01 C V = 0.01 x 100 x 25 = 25 uA (more than 3 uA), against
  // (9 V - 6 V) / 110 k = 27.3 uA in the resistors: 91.7 %.
  const std::string head = kBipolar9;
  const auto cap = [](const char* rated) {
    return fmt::format(
        "R1 = {{ value = \"10k\", role = \"upper\" }}\nR2 = {{ value = \"100k\", role = \"lower\" "
        "}}\nC1 = {{ value = \"100u\", kind = \"electrolytic\", rated_V = {}, role = "
        "\"timing-cap\" }}",
        rated);
  };
  const Findings f = findings_of(design(head, kTwoResistor, cap("25")));
  CHECK(message(f, "cap_leakage") ==
        "C1 (electrolytic, 100 uF) may leak about 25.0 uA (the rule of thumb 0.01 CV or 3 uA, "
        "whichever is greater, at 25.0 V), 91.7 % of the 27.3 uA through the timing resistance at "
        "the upper threshold; the timing will run long and drift with temperature and age");
  CHECK(message(f, "cap_rating_low") == "(no cap_rating_low)");
  const Findings low = findings_of(design(head, kTwoResistor, cap("6.3")));
  CHECK(severity(low, "cap_rating_low") == Severity::problem);
  CHECK(message(low, "cap_rating_low") == "C1 is rated 6.30 V, below the 9.00 V supply");
  const Findings close = findings_of(design(head, kTwoResistor, cap("10")));
  CHECK(message(close, "cap_rating_close") ==
        "C1 (electrolytic) is rated 10.0 V, within 20 % of the 9.00 V supply; common practice "
        "leaves more headroom");
}

TEST_CASE("supply outside the family's range") {
  const std::string parts = two_resistor_parts("10k", "47k", "100n");
  const Findings hi =
      findings_of(design("supply_V = 18.0\nfamily = \"bipolar\"", kTwoResistor, parts));
  CHECK(severity(hi, "supply_high") == Severity::problem);
  CHECK(message(hi, "supply_high") ==
        "the 18.0 V supply is above the 4.50 V to 16.0 V usual for a bipolar timer");
  const Findings lo =
      findings_of(design("supply_V = 3.0\nfamily = \"bipolar\"", kTwoResistor, parts));
  CHECK(message(lo, "supply_low") ==
        "the 3.00 V supply is below the 4.50 V to 16.0 V usual for a bipolar timer");
}

TEST_CASE("a marginal circuit names the deciding figure") {
  // A bipolar output drives the timing resistor: its high level (6 V less the
  // 1.7 V drop, and 4 mV more from the pins' net 0.4 uA through 10 k) clears
  // the 4 V upper threshold by 304 mV, inside the 0.3 V part-to-part spread of
  // that level plus the comparator's 10 mV.
  const Findings f = findings_of(
      design("supply_V = 6.0\nfamily = \"bipolar\"", "kind = \"astable-output-resistor\"",
             "R1 = { value = \"10k\", role = \"timing-res\" }\n"
             "C1 = { value = \"100n\", kind = \"film\", role = \"timing-cap\" }"));
  CHECK(severity(f, "marginal") == Severity::warning);
  CHECK(message(f, "marginal") ==
        "a threshold margin of 304 mV is within the part-to-part spread of the output "
        "high level; the same design may run on one timer and stop on another");
}

TEST_CASE("a circuit that stops by less than the spread may run on another timer") {
  // The same board on 5 V: the output's high level (5 V less the 1.7 V drop,
  // and 4 mV more from the pins' net 0.4 uA through 10 k) falls short of the
  // 3.33 V upper threshold by 29.3 mV, inside that level's 0.3 V spread.
  const Findings f = findings_of(
      design("supply_V = 5.0\nfamily = \"bipolar\"", "kind = \"astable-output-resistor\"",
             "R1 = { value = \"10k\", role = \"timing-res\" }\n"
             "C1 = { value = \"100n\", kind = \"film\", role = \"timing-cap\" }"));
  CHECK(severity(f, "no_oscillation") == Severity::problem);
  CHECK(severity(f, "marginal") == Severity::warning);
  CHECK(message(f, "marginal") ==
        "it stops because the charging target falls short of the upper threshold by "
        "29.3 mV, within the part-to-part spread of the output high level; the same design may "
        "run on another timer");
  // Driven to 12 V, far above anything the 9 V supply can charge to: stopped for good.
  const Findings far = findings_of(
      design(kBipolar9, "kind = \"astable-two-resistor\"\ncontrol = \"driven\"\ncontrol_V = 12.0",
             "R1 = { value = \"10k\", role = \"upper\" }\n"
             "R2 = { value = \"47k\", role = \"lower\" }\n"
             "C1 = { value = \"100n\", kind = \"film\", role = \"timing-cap\" }"));
  CHECK(severity(far, "no_oscillation") == Severity::problem);
  CHECK(message(far, "marginal") == "(no marginal)");
}

TEST_CASE("a circuit that cannot oscillate says why") {
  // The control pin tied to the output through 1 ohm: the lower threshold
  // follows the output's low level down below the discharge floor.
  const Design d = design(
      kBipolar9, kTwoResistor + "\ncontrol = \"feedback-from-output\"",
      two_resistor_parts("10k", "47k", "100n", "R3 = { value = \"1\", role = \"control-res\" }"));
  const Circuit c = nominal_circuit(d);
  const CyclePrediction p = predict_cycle(c);
  REQUIRE_FALSE(p.oscillates);
  const Findings f = check_design(d, c, p);
  CHECK(severity(f, "no_oscillation") == Severity::problem);
  CHECK(message(f, "no_oscillation") == describe_stop(p));
  CHECK(message(f, "no_oscillation").rfind("will not oscillate: while discharging", 0) == 0);
}
