// benchtau: bad design files as exact text, and a design file cut at every byte.
#include <catch2/catch.hpp>

#include <algorithm>
#include <string>

#include "src/core/design_file.h"
#include "src/core/input_error.h"
#include "tests/core/design_test_files.h"

using namespace benchtau;
using namespace benchtau::test;

TEST_CASE("bad design files: one exact message each, with file and line") {
  const std::string r1 =
      "value = \"10k\", tolerance = \"1%\", kind = \"metal-film\", role = \"upper\"";
  const std::string c1 =
      "value = \"4.7u\", tolerance = \"20%\", kind = \"electrolytic\", rated_V = 16, role = "
      "\"timing-cap\"";

  SECTION("TOML syntax: toml++'s line and column passed through") {
    CHECK(error_of(with("supply_V = 9.0", "supply_V = 9.")) ==
          "board.toml:2:14: bad TOML: error while parsing floating-point: expected decimal digit, "
          "saw '\\n'");
    CHECK(error_of(with("[capture]", "[capture")) ==
          "board.toml:12:9: bad TOML: error while parsing table header: expected ']', saw '\\n'");
  }
  SECTION("TOML syntax: columns count bytes, as in every benchtau message") {
    // "\xC2\xB5" is one code point in two bytes: the x is the 15th byte of the line.
    CHECK(error_of("name = \"\xC2\xB5\xC2\xB5\" x\n") ==
          "board.toml:1:15: bad TOML: error while parsing key-value pair: expected a comment or "
          "whitespace, saw 'x'");
    CHECK(error_of("supply_V = 9\nname = \"\xC2\xB5\"\nfamily = \"cmos\" x") ==
          "board.toml:3:17: bad TOML: error while parsing key-value pair: expected a comment or "
          "whitespace, saw 'x'");
  }
  SECTION("unknown keys and tables, with a near miss suggested") {
    CHECK(error_of(with("supply_V = 9.0", "suply_V = 9.0")) ==
          "board.toml:2: unknown key \"suply_V\" at the top level; did you mean \"supply_V\"?");
    CHECK(
        error_of(with("family", "colour = \"green\"\nfamily")) ==
        "board.toml:3: unknown key \"colour\" at the top level; accepted: name, supply_V, family");
    CHECK(error_of(std::string(kExample) + "[probe]\nx = 1\n") ==
          "board.toml:16: unknown table [probe]; accepted tables: [circuit], [timer], [parts], "
          "[capture]");
    CHECK(error_of(with("[capture]", "[capure]")) ==
          "board.toml:12: unknown table [capure]; did you mean [capture]?");
    CHECK(error_of(with("tolerance = \"1%\", kind = \"metal-film\", role = \"upper\"",
                        "tolerence = \"1%\", kind = \"metal-film\", role = \"upper\"")) ==
          "board.toml:9: unknown key \"tolerence\" in part R1; did you mean \"tolerance\"?");
    CHECK(error_of(with("reset = ", "rest = ")) ==
          "board.toml:7: unknown key \"rest\" in [circuit]; did you mean \"reset\"?");
    CHECK(error_of(std::string(kExample) + "[timer]\ndivider_ohms = \"5k\"\n") ==
          "board.toml:17: unknown key \"divider_ohms\" in [timer]; did you mean \"divider_ohm\"?");
    CHECK(error_of(with("cap = \"cap_V\"", "cap = \"cap_V\"\nrate_Hz = 100")) ==
          "board.toml:15: unknown key \"rate_Hz\" in [capture]; accepted: out, cap, ctl, "
          "out_input_ohm, cap_input_ohm, ctl_input_ohm");
  }
  SECTION("wrong types") {
    CHECK(error_of(with("supply_V = 9.0", "supply_V = \"nine\"")) ==
          "board.toml:2: supply_V must be a number, found a string \"nine\"");
    CHECK(error_of(with("family = \"bipolar\"", "family = 555")) ==
          "board.toml:3: family must be a string, found an integer 555");
    CHECK(error_of(with("R1 = { " + r1 + " }", "R1 = \"10k\"")) ==
          "board.toml:9: part R1 must be a table such as { value = \"10k\", tolerance = \"1%\", "
          "role = \"upper\" }, found a string \"10k\"");
    CHECK(error_of(with("value = \"10k\"", "value = true")) ==
          "board.toml:9: value in part R1 must be a number or a string such as \"4k7\", found a "
          "boolean true");
    CHECK(error_of("supply_V = 5\nfamily = \"cmos\"\ncircuit = \"555\"\n") ==
          "board.toml:3: circuit must be a table ([circuit] on a line of its own), found a string "
          "\"555\"");
    CHECK(error_of(with("[parts]", "[[parts]]")) ==
          "board.toml:8: parts must be a table ([parts] on a line of its own), found an array");
    CHECK(error_of(with("supply_V = 9.0", "supply_V = inf")) ==
          "board.toml:2: supply_V must be a finite number, found inf");
  }
  SECTION("bad numbers") {
    CHECK(error_of(with("\"10k\"", "\"4k7k\"")) ==
          "board.toml:9: value \"4k7k\" in part R1 is not a number in engineering notation (such "
          "as 4k7, 4.7u or 100n)");
    CHECK(error_of(with("\"47k\"", "\"-47k\"")) ==
          "board.toml:10: value in part R2 must be above zero, found \"-47k\"");
    CHECK(error_of(with("\"4.7u\"", "0")) ==
          "board.toml:11: value in part C1 must be above zero, found 0");
    CHECK(error_of(with("supply_V = 9.0", "supply_V = -9")) ==
          "board.toml:2: supply_V must be above zero, found -9");
    CHECK(error_of(with("rated_V = 16", "rated_V = 0")) ==
          "board.toml:11: rated_V in part C1 must be above zero, found 0");
    CHECK(error_of(std::string(kExample) + "[timer]\n\ndivider_ohm = \"-5k\"\n") ==
          "board.toml:18: divider_ohm in [timer] must be above zero, found \"-5k\"");
    CHECK(error_of(std::string(kExample) + "[timer]\nsupply_min_V = 18\n") ==
          "board.toml:17: [timer] gives a supply range of 18 V to 16 V; supply_min_V must be "
          "below supply_max_V");
  }
  SECTION("tolerances outside 0 to 100 %") {
    CHECK(error_of(with("\"20%\"", "\"150%\"")) ==
          "board.toml:11: tolerance \"150%\" in part C1 must lie between 0 and 100 %");
    CHECK(error_of(with("\"20%\"", "\"0%\"")) ==
          "board.toml:11: tolerance \"0%\" in part C1 must lie between 0 and 100 %");
    CHECK(error_of(with("tolerance = \"1%\"", "tolerance = 5")) ==
          "board.toml:9: tolerance 5 in part R1 must lie between 0 and 1 (a plain number is a "
          "fraction: 0.05 is 5 %)");
    CHECK(error_of(with("tolerance = \"1%\"", "tolerance = \"5\"")) ==
          "board.toml:9: tolerance \"5\" in part R1 must end in % (\"1%\") or be a plain number "
          "as a fraction (0.01)");
    CHECK(error_of(with("tolerance = \"1%\"", "tolerance = \"one%\"")) ==
          "board.toml:9: tolerance \"one%\" in part R1 is not a percentage such as \"1%\"");
  }
  SECTION("unknown words, each with the accepted ones") {
    CHECK(error_of(with("\"bipolar\"", "\"bipoler\"")) ==
          "board.toml:3: unknown family \"bipoler\"; accepted: bipolar, cmos; did you mean "
          "\"bipolar\"?");
    CHECK(error_of(with("\"astable-two-resistor\"", "\"astable\"")) ==
          "board.toml:5: unknown kind \"astable\" in [circuit]; accepted: astable-two-resistor, "
          "astable-output-resistor, astable-diode-steered, monostable");
    CHECK(error_of(with("\"decoupled\"", "\"bypassed\"")) ==
          "board.toml:6: unknown control \"bypassed\" in [circuit]; accepted: decoupled, "
          "load-to-ground, feedback-from-output, feedback-from-discharge, driven");
    CHECK(error_of(with("reset = \"supply\"", "reset = \"vcc\"")) ==
          "board.toml:7: unknown reset \"vcc\" in [circuit]; accepted: supply, control, "
          "cap-node, open");
    CHECK(error_of(with("kind = \"metal-film\"", "kind = \"metalfilm\"")) ==
          "board.toml:9: unknown kind \"metalfilm\" in part R1; accepted: metal-film, "
          "carbon-film, wirewound, film, ceramic, C0G, X7R, electrolytic, tantalum, "
          "signal-diode, led; did you mean \"metal-film\"?");
    CHECK(error_of(with("role = \"upper\"", "role = \"top\"")) ==
          "board.toml:9: unknown role \"top\" in part R1; accepted: upper, lower, timing-cap, "
          "diode, timing-res, control-res, load-res, led, pull-up");
  }
  SECTION("parts that do not fit their roles") {
    CHECK(error_of(with("kind = \"metal-film\"", "kind = \"electrolytic\"")) ==
          "board.toml:9: kind \"electrolytic\" in part R1 is a capacitor, and role \"upper\" "
          "takes a resistor");
    CHECK(error_of(with(", role = \"upper\"", "")) ==
          "board.toml:9: part R1 has no role; accepted: upper, lower, timing-cap, diode, "
          "timing-res, control-res, load-res, led, pull-up");
    CHECK(error_of(with("value = \"47k\", ", "")) == "board.toml:10: part R2 has no value");
    CHECK(error_of(with("kind = \"metal-film\", role = \"upper\"",
                        "kind = \"metal-film\", rated_V = 50, role = \"upper\"")) ==
          "board.toml:9: rated_V in part R1 applies only to capacitors");
  }
  SECTION("roles against the circuit") {
    CHECK(error_of(with("R2 = { value = \"47k\", tolerance = \"1%\", kind = \"metal-film\", role = "
                        "\"lower\" }\n",
                        "")) ==
          "board.toml:8: [parts] has no part in role \"lower\", which an astable-two-resistor "
          "circuit needs");
    CHECK(error_of(with("role = \"lower\"", "role = \"upper\"")) ==
          "board.toml:10: role \"upper\" in part R2 is taken already by part R1 (line 9)");
    CHECK(error_of(with("C1 = {", "R3 = { value = \"100k\", role = \"timing-res\" }\nC1 = {")) ==
          "board.toml:11: role \"timing-res\" in part R3 is not used by an astable-two-resistor "
          "circuit; this circuit's roles: upper, lower, timing-cap, load-res, led");
    CHECK(error_of(with("C1 = {", "R5 = { value = \"10k\", role = \"control-res\" }\nC1 = {")) ==
          "board.toml:11: role \"control-res\" in part R5 is not used with control \"decoupled\"; "
          "this circuit's roles: upper, lower, timing-cap, load-res, led");
    CHECK(error_of(with("\"decoupled\"", "\"load-to-ground\"")) ==
          "board.toml:8: [parts] has no part in role \"control-res\", which control "
          "\"load-to-ground\" needs");
    CHECK(error_of(with("C1 = {", "R4 = { value = \"2k2\", role = \"pull-up\" }\nC1 = {")) ==
          "board.toml:11: role \"pull-up\" in part R4 needs a discharge pin outside the timing "
          "path, which only an astable-output-resistor circuit has; this is an "
          "astable-two-resistor circuit");
    CHECK(error_of(with("C1 = {", "D2 = { vf_V = 1.9, role = \"led\" }\nC1 = {")) ==
          "board.toml:11: role \"led\" in part D2 is in series with a load-res part, and the "
          "design has none");
    CHECK(error_of(small_design("astable-output-resistor", "feedback-from-discharge", "supply", "",
                                "R5 = { value = \"10k\", role = \"control-res\" }\n")) ==
          "board.toml:7: [parts] has no part in role \"pull-up\", which control "
          "\"feedback-from-discharge\" needs");
  }
  SECTION("the circuit's own checks") {
    CHECK(error_of(with("\"decoupled\"", "\"feedback-from-discharge\"")) ==
          "board.toml:6: control \"feedback-from-discharge\" in [circuit] needs the discharge pin "
          "free of the timing path, which only an astable-output-resistor circuit has; this is an "
          "astable-two-resistor circuit");
    CHECK(error_of(with("\"decoupled\"", "\"driven\"")) ==
          "board.toml:6: control \"driven\" in [circuit] needs control_V, the voltage on the pin");
    CHECK(error_of(with("reset = \"supply\"", "reset = \"supply\"\ncontrol_V = 2")) ==
          "board.toml:8: control_V in [circuit] applies only to control \"load-to-ground\" or "
          "\"driven\", and control is \"decoupled\"");
    CHECK(error_of(with("kind = \"astable-two-resistor\"", "")) ==
          "board.toml:4: [circuit] has no kind; accepted: astable-two-resistor, "
          "astable-output-resistor, astable-diode-steered, monostable");
  }
  SECTION("missing top-level values and tables") {
    CHECK(error_of(with("supply_V = 9.0\n", "")) ==
          "board.toml:1: missing supply_V, the supply voltage (such as supply_V = 9.0)");
    CHECK(error_of(with("family = \"bipolar\"", "")) ==
          "board.toml:1: missing family; accepted: bipolar, cmos");
    CHECK(error_of("supply_V = 5\nfamily = \"cmos\"\n") ==
          "board.toml:1: missing [circuit], with its kind: astable-two-resistor, "
          "astable-output-resistor, astable-diode-steered, monostable");
    CHECK(error_of("supply_V = 5\nfamily = \"cmos\"\n[circuit]\nkind = \"monostable\"\n") ==
          "board.toml:1: the design has no [parts]; a monostable circuit needs a part in role "
          "\"timing-res\"");
  }
  SECTION("diodes") {
    const std::string steered =
        small_design("astable-diode-steered", "decoupled", "supply", "", "");
    CHECK(error_of(with("D1 = { vf_V = 0.65, role = \"diode\" }",
                        "D1 = { kind = \"signal-diode\", role = \"diode\" }", steered)) ==
          "board.toml:10: part D1 is a diode and needs vf_V, its forward voltage (such as vf_V = "
          "0.6)");
    CHECK(error_of(with("D1 = { vf_V = 0.65,", "D1 = { value = \"1N\",", steered)) ==
          "board.toml:10: part D1 is a diode: give its forward voltage as vf_V, not value");
    CHECK(error_of(with("D1 = { vf_V = 0.65,", "D1 = { vf_V = 0.65, kind = \"film\",", steered)) ==
          "board.toml:10: kind \"film\" in part D1 is a capacitor, and role \"diode\" takes a "
          "diode");
    CHECK(
        error_of(with("kind = \"metal-film\", role = \"upper\"", "vf_V = 0.6, role = \"upper\"")) ==
        "board.toml:9: vf_V in part R1 applies only to diodes and LEDs");
  }
  SECTION("capture columns") {
    CHECK(error_of(with("out = \"out_V\"", "out = 0")) ==
          "board.toml:13: out in [capture] must be a column name or a column number from 1, "
          "found 0");
    CHECK(error_of(with("cap = \"cap_V\"", "cap = -2")) ==
          "board.toml:14: cap in [capture] must be a column name or a column number from 1, "
          "found -2");
    CHECK(error_of(with("cap = \"cap_V\"", "cap = 2.5")) ==
          "board.toml:14: cap in [capture] must be a column name or a column number from 1, "
          "found a floating-point number 2.5");
    CHECK(error_of(with("ctl = \"ctl_V\"", "ctl = \" \"")) ==
          "board.toml:15: ctl in [capture] is empty; give a column name or a column number from 1");
    CHECK(error_of(with("ctl = \"ctl_V\"", "ctl_input_ohm = \"10M\"")) ==
          "board.toml:15: ctl_input_ohm in [capture] is for the ctl column, which is not given");
    CHECK(error_of(with("cap = \"cap_V\"", "cap = \"cap_V\"\ncap_input_ohm = \"10 Meg\"")) ==
          "board.toml:15: cap_input_ohm \"10 Meg\" in [capture] is not a number in engineering "
          "notation (such as 4k7, 4.7u or 100n)");
  }
}

// Cut the example at every byte: each prefix reads, or gives one InputError
// whose line lies within the prefix; nothing else escapes.
TEST_CASE("every truncation of a design file reads or gives one located error") {
  const std::string full =
      std::string(kExample) +
      "out_input_ohm = \"10M\"  # 10 M\xCE\xA9 probe\n[timer]\ndivider_ohm = \"5k\"\n"
      "trigger_current_A = -0.5e-6\n";
  REQUIRE_NOTHROW(read(full));
  std::size_t read_whole = 0, errors = 0, other = 0;
  for (std::size_t n = 0; n <= full.size(); ++n) {
    const std::string prefix = full.substr(0, n);
    const std::size_t lines =
        static_cast<std::size_t>(std::count(prefix.begin(), prefix.end(), '\n')) + 1;
    try {
      read(prefix);
      ++read_whole;
    } catch (const InputError& e) {
      ++errors;
      CAPTURE(n, e.what());
      CHECK(e.file() == "board.toml");
      CHECK(e.line() >= 1);
      CHECK(e.line() <= lines);
      if (e.column() > 0) {  // a byte of its line, or just past its end
        std::size_t start = 0;
        for (std::size_t l = 1; l < e.line(); ++l) start = prefix.find('\n', start) + 1;
        const std::size_t end = std::min(prefix.find('\n', start), prefix.size());
        CHECK(e.column() <= end - start + 1);
      }
    } catch (...) {
      ++other;
    }
  }
  CHECK(other == 0);
  CHECK(errors > 0);
  CHECK(read_whole > 0);
}
