// benchtau: the fit command's --change option: what it accepts and its errors, as exact text.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "src/cli/fit_changes.h"
#include "src/core/design_file.h"
#include "src/core/input_error.h"

namespace {

using benchtau::BoardChange;
using benchtau::InputError;
using benchtau::cli::change_text;
using benchtau::cli::parse_changes;

benchtau::Design design() {
  return benchtau::read_design_text(R"(name = "bench test: two-resistor astable"
supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
[parts]
R1 = { value = "10k", tolerance = "1%", role = "upper" }
R2 = { value = "47k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "5%", kind = "film", role = "timing-cap" }
)",
                                    "test.toml");
}

// The message parse_changes throws for these options and three captures.
std::string error_of(std::vector<std::string> texts) {
  try {
    parse_changes(texts, 3, design());
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

}  // namespace

TEST_CASE(
    "fit option --change: takes a supply and a resistor across a part, for capture 2 or later") {
  const std::vector<std::string> texts{"2:supply=12", "3:R2||100k", "3:supply=4.5V"};
  const std::vector<BoardChange> c = parse_changes(texts, 3, design());
  REQUIRE(c.size() == 3);
  CHECK_FALSE(c[0].supply_V);
  CHECK(c[0].across_ref.empty());
  REQUIRE(c[1].supply_V);
  CHECK(*c[1].supply_V == 12.0);
  CHECK(c[1].across_ref.empty());
  REQUIRE(c[2].supply_V);
  CHECK(*c[2].supply_V == 4.5);
  CHECK(c[2].across_ref == "R2");
  CHECK(c[2].across_ohm == 100e3);
  CHECK(change_text(c[0]).empty());
  CHECK(change_text(c[1]) == "taken at 12.0 V");
  CHECK(change_text(c[2]) == "taken at 4.50 V; 100 kohm added across R2");
}

TEST_CASE("fit option --change: the first capture may carry a change too") {
  // One capture taken at another supply than the design's.
  const std::vector<std::string> texts = {"1:supply=12"};
  const std::vector<BoardChange> c = parse_changes(texts, 1, design());
  REQUIRE(c.size() == 1);
  CHECK(*c[0].supply_V == 12.0);
}

TEST_CASE("fit option --change: reads engineering notation for the added resistor") {
  const std::vector<std::string> texts{"2:R1||4k7"};
  const std::vector<BoardChange> c = parse_changes(texts, 2, design());
  CHECK(c[1].across_ref == "R1");
  CHECK(c[1].across_ohm == Approx(4700.0).epsilon(1e-12));
}

TEST_CASE("fit option --change: errors name the option, the text and what was expected") {
  CHECK(error_of({"supply=12"}) ==
        "--change: \"supply=12\": expected CAPTURE:CHANGE, such as 2:supply=12 (capture 2 taken "
        "at 12 V) or 2:R2||100k (capture 2 with 100k added across R2)");
  CHECK(error_of({"two:supply=12"}) ==
        "--change: \"two:supply=12\": \"two\" is not a capture number: captures count from 1 in "
        "the order given");
  CHECK(error_of({"4:supply=12"}) ==
        "--change: \"4:supply=12\": there is no capture 4: 3 captures were given");
  CHECK(error_of({"0:supply=12"}) ==
        "--change: \"0:supply=12\": there is no capture 0: 3 captures were given");
  CHECK(error_of({"2:supply=high"}) ==
        "--change: \"2:supply=high\": expected a supply voltage such as 12 or 4.5V, found "
        "\"high\"");
  CHECK(error_of({"2:supply=-5"}) ==
        "--change: \"2:supply=-5\": expected a supply voltage such as 12 or 4.5V, found \"-5\"");
  CHECK(error_of({"2:R2=100k"}) ==
        "--change: \"2:R2=100k\": expected supply=VOLTS or PART||OHMS after the colon");
  CHECK(error_of({"2:R9||100k"}) ==
        "--change: \"2:R9||100k\": the design has no part \"R9\"; its parts are R1, R2, C1");
  CHECK(error_of({"2:R2||lots"}) ==
        "--change: \"2:R2||lots\": expected a resistance such as 100k or 4k7, found \"lots\"");
  CHECK(error_of({"2:supply=12", "2:supply=10"}) ==
        "--change: \"2:supply=10\": capture 2 already has a supply");
  CHECK(error_of({"2:R1||10k", "2:R2||10k"}) ==
        "--change: \"2:R2||10k\": capture 2 already has a resistor added across R1");
}

TEST_CASE("fit option --change: with one capture says so in the singular") {
  const std::vector<std::string> texts{"2:supply=12"};
  try {
    parse_changes(texts, 1, design());
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(std::string(e.what()) ==
          "--change: \"2:supply=12\": there is no capture 2: 1 capture was given");
  }
}
