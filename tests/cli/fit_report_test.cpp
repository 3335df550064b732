// benchtau: the fit report, table and JSON, as exact text for hand-built diagnoses.
#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

#include "src/cli/fit_report.h"
#include "src/cli/json_writer.h"
#include "src/cli/measure_report.h"
#include "src/core/design_file.h"
#include "tests/cli/fitted_part_support.h"

namespace {

using namespace benchtau;
using benchtau::cli::fit_json;
using benchtau::cli::fit_table;
using benchtau::cli::FitReport;
using benchtau::cli::JsonWriter;
using benchtau::cli::summary_json;
using benchtau::test::part;

const double kNaN = std::nan("");

Design design() {
  return read_design_text(R"(name = "bench test: two-resistor astable"
supply_V = 9.0
family = "bipolar"
[circuit]
kind = "astable-two-resistor"
[parts]
R1 = { value = "4k7", tolerance = "1%", role = "upper" }
R2 = { value = "22k", tolerance = "1%", role = "lower" }
C1 = { value = "100n", tolerance = "20%", kind = "electrolytic", role = "timing-cap" }
)",
                          "board.toml");
}

// A capture with two channels, out and cap, and a measurement of its summary only.
Capture two_channels(const std::string& source) {
  Capture c;
  c.source = source;
  c.channels = {{"out (V)", "V", 2, {}, 0, 0}, {"cap (V)", "V", 3, {}, 0, 0}};
  return c;
}

BoardCapture board(const Capture& c, std::size_t cycles, double period_s) {
  BoardCapture b;
  b.label = c.source;
  b.capture = &c;
  b.nodes.out = 0;
  b.nodes.cap = 1;
  b.measurement.edge_node = "out";
  b.measurement.summary.cycles = cycles;
  b.measurement.summary.period_s.mean = period_s;
  return b;
}

Suspect suspect(const char* ref, SuspectKind kind, double p, const char* sentence,
                bool by_prior = false) {
  Suspect s;
  s.ref = ref;
  s.kind = kind;
  s.probability = p;
  s.sentence = sentence;
  s.ranked_by_prior = by_prior;
  return s;
}

Finding partial_cycles() {
  return {"partial_cycles", Severity::info, "the record starts and ends inside a cycle"};
}

}  // namespace

TEST_CASE("fit table: a pass, the healthy board ranked first among the explanations") {
  const Design d = design();
  const Capture c = two_channels("unit-7.csv");
  std::vector<BoardCapture> boards{board(c, 8, 3.38e-3)};
  boards[0].measurement.findings = {partial_cycles()};
  Diagnosis g;
  g.verdict = Verdict::pass;
  g.reason = "every part is within its tolerance";
  g.mode = "both-nodes";
  g.parts = {part("R1", "ohm", 4700, 0.01, 4700, 23.3, 0.01, PartStatus::in_spec),
             part("R2", "ohm", 22e3, 0.01, 22e3, 109, 0.01, PartStatus::in_spec),
             part("C1", "F", 100e-9, 0.2, 100.2e-9, 0.69e-9, 0.99, PartStatus::in_spec)};
  g.chi2_per_dof = 0.98;
  g.healthy_probability = 0.95;
  g.suspects = {
      suspect("C1", SuspectKind::value_high, 0.03, "C1 is a little above its value", true),
      suspect("C1-leakage", SuspectKind::leakage, 0.02, "C1 may leak a little")};
  g.fixed = {"the capture fixes (R1 + R2) C1 to +/- 0.53 %"};
  g.unseparated = {"the timing cannot tell R1 and R2 from C1 apart"};
  const std::vector<std::vector<std::string>> notes{{"time from column \"t\""}};
  const FitReport r{d, boards, notes, g};
  CHECK(fit_table(r, false) ==
        "bench test: two-resistor astable: pass - every part is within its tolerance\n"
        "  design board.toml; 1 capture, both-nodes\n"
        "  1  unit-7.csv: 8 steady cycles, period 3.38 ms\n"
        "     read as: time from column \"t\"\n"
        "\n"
        "parts under the leading explanation (chi-square per degree of freedom 0.98)\n"
        "  part    nominal  tolerance     fitted  +/- sigma  deviation  from data  status\n"
        "  R1    4.70 kohm    +/- 1 %  4.70 kohm   23.3 ohm      0.0 %        1 %  in spec\n"
        "  R2    22.0 kohm    +/- 1 %  22.0 kohm    109 ohm      0.0 %        1 %  in spec\n"
        "  C1       100 nF   +/- 20 %     100 nF     690 pF     +0.2 %       99 %  in spec\n"
        "\n"
        "explanations, most probable first\n"
        "  95.0 %   all parts   in tolerance\n"
        "   3.0 %*  C1          value high    C1 is a little above its value\n"
        "   2.0 %   C1-leakage  leakage       C1 may leak a little\n"
        "  * ranked above the next by the priors: the data does not tell them apart\n"
        "\n"
        "fixed by the data\n"
        "  the capture fixes (R1 + R2) C1 to +/- 0.53 %\n"
        "\n"
        "cannot be separated\n"
        "  the timing cannot tell R1 and R2 from C1 apart\n"
        "\n"
        "findings from unit-7.csv\n"
        "  info     partial_cycles: the record starts and ends inside a cycle\n");
}

TEST_CASE("fit table: a fail on a close call, two captures, what to measure next") {
  const Design d = design();
  const Capture c1 = two_channels("before.csv"), c2 = two_channels("after.csv");
  std::vector<BoardCapture> boards{board(c1, 11, 2.09e-3), board(c2, 1, 2.5e-3)};
  boards[1].change.supply_V = 12.0;
  boards[1].change.across_ref = "R2";
  boards[1].change.across_ohm = 100e3;
  Diagnosis g;
  g.verdict = Verdict::fail;
  g.reason = "C1 has lost about 38 % of its capacitance";
  g.mode = "output-only";
  g.parts = {part("R1", "ohm", 4700, 0.01, 4700, 47, 0.0, PartStatus::in_spec),
             part("R2", "ohm", 22e3, 0.01, 22e3, 220, 0.0, PartStatus::in_spec),
             part("C1", "F", 100e-9, 0.2, 61.7e-9, 0.412e-9, 1.0, PartStatus::low)};
  g.figures = {part("supply (capture 1)", "V", 9.0, kNaN, 9.02, 0.005, 1.0, PartStatus::in_spec),
               part("supply (capture 2)", "V", 12.0, kNaN, 12.1, 0.005, 1.0, PartStatus::in_spec),
               part("divider resistance", "ohm", 5e3, kNaN, 5e3, 900, 0.1, PartStatus::in_spec),
               part("output low level", "V", 0.1, kNaN, 0.35, 0.02, 0.9, PartStatus::undetermined)};
  g.healthy_probability = 0.0001;
  g.suspects = {suspect("C1", SuspectKind::value_low, 0.5499, "C1 has lost about 38 %"),
                suspect("C1-leakage", SuspectKind::leakage, 0.45, "C1 leaks 1.2 uA")};
  g.unseparated = {"from the output alone a leak and lost capacitance look alike"};
  g.next = {"capture the capacitor node as well"};
  Replacement p;
  p.ref = "C1";
  p.series = "E6";
  p.exact = 101.3e-9;
  p.preferred = 100e-9;
  p.period_s = 3.39e-3;
  p.design_period_s = 3.40e-3;
  g.replacement = p;
  const FitReport r{d, boards, {}, g};
  CHECK(fit_table(r, false) ==
        "bench test: two-resistor astable: fail - C1 has lost about 38 % of its capacitance\n"
        "  design board.toml; 2 captures, output-only\n"
        "  1  before.csv: 11 steady cycles, period 2.09 ms\n"
        "  2  after.csv (taken at 12.0 V; 100 kohm added across R2): 1 steady cycle, period "
        "2.50 ms\n"
        "\n"
        "parts under the leading explanation\n"
        "  part    nominal  tolerance     fitted  +/- sigma  deviation  from data  status\n"
        "  R1    4.70 kohm    +/- 1 %  4.70 kohm   47.0 ohm      0.0 %        0 %  in spec\n"
        "  R2    22.0 kohm    +/- 1 %  22.0 kohm    220 ohm      0.0 %        0 %  in spec\n"
        "  C1       100 nF   +/- 20 %    61.7 nF     412 pF    -38.3 %      100 %  low\n"
        "\n"
        "supply and timer figures as fitted\n"
        "  figure              nominal  fitted  +/- sigma  from data  status\n"
        "  supply (capture 1)   9.00 V  9.02 V    5.00 mV      100 %  as expected\n"
        "  supply (capture 2)   12.0 V  12.1 V    5.00 mV      100 %  as expected\n"
        "  output low level     100 mV  350 mV    20.0 mV       90 %  off its prior\n"
        "  1 more timer figure as expected: --json lists them\n"
        "\n"
        "explanations, most probable first\n"
        "   55.0 %   C1          value low     C1 has lost about 38 %\n"
        "   45.0 %   C1-leakage  leakage       C1 leaks 1.2 uA\n"
        "  < 0.1 %   all parts   in tolerance\n"
        "\n"
        "cannot be separated\n"
        "  from the output alone a leak and lost capacitance look alike\n"
        "\n"
        "measure next\n"
        "  capture the capacitor node as well\n"
        "\n"
        "replacement\n"
        "  C1 100 nF (E6; 101 nF would be exact): period 3.39 ms against the design's 3.40 ms\n"
        "\n"
        "Before you measure in circuit or lift a part: power off, unplug a mains-powered board, "
        "and discharge its capacitors (benchtau safety has the rest; local codes and licensed "
        "practice come first).\n");
  // The library's own sentence, when it gives one, replaces the numbers.
  g.replacement->sentence = "replacing C1 with 100 nF (E6) brings the period back";
  const std::string with_sentence = fit_table(r, false);
  CHECK(with_sentence.substr(with_sentence.rfind("replacement\n")) ==
        "replacement\n  replacing C1 with 100 nF (E6) brings the period back\n"
        "\n"
        "Before you measure in circuit or lift a part: power off, unplug a mains-powered board, "
        "and discharge its capacitors (benchtau safety has the rest; local codes and licensed "
        "practice come first).\n");
}

TEST_CASE("fit table: no oscillation has no parts table and no ranking") {
  const Design d = design();
  const Capture c = two_channels("stuck.csv");
  std::vector<BoardCapture> boards{board(c, 0, kNaN)};
  boards[0].measurement.edge_node.clear();
  boards[0].measurement.findings = {
      {"stuck_high", Severity::problem, "not oscillating: the output stays high at 7.30 V"}};
  Diagnosis g;
  g.verdict = Verdict::no_oscillation;
  g.reason = "the board does not oscillate: the output stays high";
  g.next = {"check for a short across C1"};
  const FitReport r{d, boards, {}, g};
  CHECK(fit_table(r, false) ==
        "bench test: two-resistor astable: no oscillation - the board does not oscillate: the "
        "output stays high\n"
        "  design board.toml; 1 capture\n"
        "  1  stuck.csv: no steady cycle\n"
        "\n"
        "findings from stuck.csv\n"
        "  problem  stuck_high: not oscillating: the output stays high at 7.30 V\n"
        "\n"
        "measure next\n"
        "  check for a short across C1\n"
        "\n"
        "Before you measure in circuit or lift a part: power off, unplug a mains-powered board, "
        "and discharge its capacitors (benchtau safety has the rest; local codes and licensed "
        "practice come first).\n");
}

TEST_CASE("fit table: inconclusive, a value the data did not fix, and a fault's own row") {
  const Design d = design();
  const Capture c = two_channels("short.csv");
  std::vector<BoardCapture> boards{board(c, 1, 3.4e-3)};
  Diagnosis g;
  g.verdict = Verdict::inconclusive;
  g.reason = "one cycle is too little to fit";
  g.mode = "both-nodes";
  FittedPart leak;
  leak.ref = "C1-leakage";
  leak.unit = "ohm";
  leak.fitted = 4.7e6;
  leak.sigma = 2.2e6;
  leak.data_share = 0.4;
  g.parts = {part("R1", "ohm", 4700, 0.01, 4650, kNaN, 0.0, PartStatus::undetermined), leak};
  g.healthy_probability = 0.5;
  g.suspects = {suspect("control-pin-load", SuspectKind::unexpected_load, 0.5,
                        "something loads the control pin", true)};
  const FitReport r{d, boards, {}, g};
  CHECK(fit_table(r, false) ==
        "bench test: two-resistor astable: inconclusive - one cycle is too little to fit\n"
        "  design board.toml; 1 capture, both-nodes\n"
        "  1  short.csv: 1 steady cycle, period 3.40 ms\n"
        "\n"
        "parts under the leading explanation\n"
        "  part          nominal  tolerance     fitted  +/- sigma  deviation  from data  status\n"
        "  R1          4.70 kohm    +/- 1 %  4.65 kohm          -     -1.1 %        0 %  "
        "undetermined\n"
        "  C1-leakage          -          -  4.70 Mohm  2.20 Mohm          -       40 %  "
        "undetermined\n"
        "\n"
        "explanations, most probable first\n"
        "  50.0 %   all parts         in tolerance\n"
        "  50.0 %*  control-pin-load  unexpected load  something loads the control pin\n"
        "  * ranked above the next by the priors: the data does not tell them apart\n");
}

TEST_CASE("fit table --cycles: one row per segment fit, then the phases fitted together") {
  const Design d = design();
  const Capture c = two_channels("unit-7.csv");
  std::vector<BoardCapture> boards{board(c, 1, 3.38e-3)};
  SegmentFitResult f;
  f.segments.resize(2);
  f.segments[0].window.phase = Phase::charging;
  f.segments[0].window.start_s = 1.04e-3;
  f.segments[0].status = FitStatus::ok;
  f.segments[0].tau_s = {2.61e-3, 50e-6};
  f.segments[0].vinf_V = {8.90, 0.2};
  f.segments[0].start_V = {2.99, 0.01};
  f.segments[0].end_V = {6.00, 0.01};
  f.segments[1].window.phase = Phase::discharging;
  f.segments[1].window.start_s = 2.89e-3;
  f.segments[1].status = FitStatus::flat;
  f.charging.status = FitStatus::ok;
  f.charging.segments = {0};
  f.charging.tau_s = {2.61e-3, 50e-6};
  f.charging.vinf_V = {8.90, 0.2};
  f.discharging.phase = Phase::discharging;
  f.discharging.status = FitStatus::too_few_samples;
  f.noise_sigma_V = 0.0189;
  boards[0].segments = f;
  Diagnosis g;
  g.verdict = Verdict::inconclusive;
  const FitReport r{d, boards, {}, g};
  const std::string text = fit_table(r, true);
  CHECK(text.substr(text.find("\nsegment fits")) ==
        "\nsegment fits, unit-7.csv\n"
        "  #  phase          start      tau  +/- sigma  toward    from      to  status\n"
        "  1  charging     1.04 ms  2.61 ms    50.0 us  8.90 V  2.99 V  6.00 V  ok\n"
        "  2  discharging  2.89 ms        -          -       -       -       -  flat\n"
        "  charging, 1 segment together: tau 2.61 ms +/- 50.0 us toward 8.90 V\n"
        "  discharging, all segments together: too_few_samples\n"
        "  noise 18.9 mV RMS\n");
  // A capture without the capacitor node has no segments to list.
  boards[0].segments.reset();
  const std::string none = fit_table(r, true);
  CHECK(none.substr(none.find("\nsegment fits")) ==
        "\nsegment fits, unit-7.csv\n  not fitted: the capacitor node was not captured\n");
}

TEST_CASE("fit JSON: no oscillation, with the measurement as measure --json writes it") {
  const Design d = design();
  const Capture c = two_channels("stuck.csv");
  std::vector<BoardCapture> boards{board(c, 0, kNaN)};
  boards[0].measurement.edge_node.clear();
  boards[0].measurement.summary.out_low_V = kNaN;
  boards[0].measurement.summary.out_high_V = 7.3;
  boards[0].measurement.findings = {
      {"stuck_high", Severity::problem, "not oscillating: the output stays high at 7.30 V"}};
  Diagnosis g;
  g.verdict = Verdict::no_oscillation;
  g.reason = "the board does not oscillate";
  g.next = {"check for a short across C1"};
  const std::vector<std::vector<std::string>> notes{{"time from column \"t\""}};
  const FitReport r{d, boards, notes, g};
  const std::string json = fit_json(r, false);
  const auto summary = json.find("      \"summary\"");
  CHECK(json.substr(0, summary) ==
        "{\n"
        "  \"schema\": \"benchtau-fit-1\",\n"
        "  \"design\": {\n"
        "    \"source\": \"board.toml\",\n"
        "    \"name\": \"bench test: two-resistor astable\"\n"
        "  },\n"
        "  \"verdict\": \"no-oscillation\",\n"
        "  \"reason\": \"the board does not oscillate\",\n"
        "  \"mode\": null,\n"
        "  \"healthy_probability\": 0,\n"
        "  \"chi2_per_dof\": null,\n"
        "  \"parts\": [],\n"
        "  \"figures\": [],\n"
        "  \"suspects\": [],\n"
        "  \"fixed\": [],\n"
        "  \"unseparated\": [],\n"
        "  \"next\": [\n"
        "    \"check for a short across C1\"\n"
        "  ],\n"
        "  \"replacement\": null,\n"
        "  \"measurements\": [\n"
        "    {\n"
        "      \"label\": \"stuck.csv\",\n"
        "      \"change\": {\n"
        "        \"supply_V\": null,\n"
        "        \"across_ref\": null,\n"
        "        \"across_ohm\": null\n"
        "      },\n"
        "      \"nodes\": {\n"
        "        \"out\": \"out (V)\",\n"
        "        \"cap\": \"cap (V)\",\n"
        "        \"ctl\": null\n"
        "      },\n"
        "      \"edge_node\": null,\n");
  const auto findings = json.find("      \"findings\"");
  CHECK(json.substr(findings) ==
        "      \"findings\": [\n"
        "        {\n"
        "          \"code\": \"stuck_high\",\n"
        "          \"severity\": \"problem\",\n"
        "          \"message\": \"not oscillating: the output stays high at 7.30 V\"\n"
        "        }\n"
        "      ],\n"
        "      \"notes\": [\n"
        "        \"time from column \\\"t\\\"\"\n"
        "      ],\n"
        "      \"segments\": null\n"
        "    }\n"
        "  ]\n"
        "}\n");
  // The summary is measure --json's own, nested three levels deeper.
  JsonWriter j;
  summary_json(j, boards[0].measurement);
  auto squeeze = [](std::string t) {
    std::erase_if(t, [](char ch) { return ch == ' ' || ch == '\n'; });
    return t;
  };
  CHECK(squeeze(json.substr(summary, findings - summary)) ==
        "\"summary\":" + squeeze(j.str()) + ",");
  CHECK(j.str().find("\"out_high_V\": 7.3,\n") != std::string::npos);
}

TEST_CASE("fit JSON: parts, suspects and the replacement of a fail") {
  const Design d = design();
  const Capture c1 = two_channels("before.csv"), c2 = two_channels("after.csv");
  std::vector<BoardCapture> boards{board(c1, 11, 2.09e-3), board(c2, 1, 2.5e-3)};
  boards[1].change.across_ref = "R2";
  boards[1].change.across_ohm = 100e3;
  Diagnosis g;
  g.verdict = Verdict::fail;
  g.reason = "C1 has lost about 38 % of its capacitance";
  g.mode = "both-nodes";
  g.parts = {part("C1", "F", 100e-9, 0.25, 50e-9, 0.5e-9, 1.0, PartStatus::low)};
  FittedPart supply = part("supply", "V", 9.0, kNaN, 9.0, 0.25, 0.75, PartStatus::in_spec);
  g.figures = {supply};
  g.healthy_probability = 0.125;
  Suspect s = suspect("C1", SuspectKind::value_low, 0.875, "C1 has lost about half");
  s.fitted = 50e-9;
  s.sigma = 0.5e-9;
  s.unit = "F";
  g.suspects = {s};
  g.fixed = {"R2 C1"};
  Replacement p;
  p.ref = "C1";
  p.series = "E6";
  p.exact = 101.5e-9;
  p.preferred = 100e-9;
  p.period_s = 3.375e-3;
  p.design_period_s = 3.5e-3;
  p.sentence = "fit 100 nF";
  g.replacement = p;
  g.chi2_per_dof = 1.5;
  const FitReport r{d, boards, {}, g};
  const std::string json = fit_json(r, false);
  const auto from = json.find("  \"verdict\""), to = json.find("  \"measurements\"");
  CHECK(json.substr(from, to - from) ==
        "  \"verdict\": \"fail\",\n"
        "  \"reason\": \"C1 has lost about 38 % of its capacitance\",\n"
        "  \"mode\": \"both-nodes\",\n"
        "  \"healthy_probability\": 0.125,\n"
        "  \"chi2_per_dof\": 1.5,\n"
        "  \"parts\": [\n"
        "    {\n"
        "      \"ref\": \"C1\",\n"
        "      \"unit\": \"F\",\n"
        "      \"nominal\": 1e-07,\n"
        "      \"tolerance\": 0.25,\n"
        "      \"fitted\": 5e-08,\n"
        "      \"sigma\": 5e-10,\n"
        "      \"deviation\": -0.5,\n"
        "      \"data_share\": 1,\n"
        "      \"status\": \"low\"\n"
        "    }\n"
        "  ],\n"
        "  \"figures\": [\n"
        "    {\n"
        "      \"ref\": \"supply\",\n"
        "      \"unit\": \"V\",\n"
        "      \"nominal\": 9,\n"
        "      \"tolerance\": null,\n"
        "      \"fitted\": 9,\n"
        "      \"sigma\": 0.25,\n"
        "      \"deviation\": 0,\n"
        "      \"data_share\": 0.75,\n"
        "      \"status\": \"in-spec\"\n"
        "    }\n"
        "  ],\n"
        "  \"suspects\": [\n"
        "    {\n"
        "      \"ref\": \"C1\",\n"
        "      \"kind\": \"value-low\",\n"
        "      \"probability\": 0.875,\n"
        "      \"sentence\": \"C1 has lost about half\",\n"
        "      \"fitted\": 5e-08,\n"
        "      \"sigma\": 5e-10,\n"
        "      \"unit\": \"F\",\n"
        "      \"ranked_by_prior\": false\n"
        "    }\n"
        "  ],\n"
        "  \"fixed\": [\n"
        "    \"R2 C1\"\n"
        "  ],\n"
        "  \"unseparated\": [],\n"
        "  \"next\": [],\n"
        "  \"replacement\": {\n"
        "    \"ref\": \"C1\",\n"
        "    \"series\": \"E6\",\n"
        "    \"exact\": 1.015e-07,\n"
        "    \"preferred\": 1e-07,\n"
        "    \"period_s\": 0.003375,\n"
        "    \"design_period_s\": 0.0035,\n"
        "    \"sentence\": \"fit 100 nF\"\n"
        "  },\n");
  const auto change = json.find("\"change\"", json.find("\"label\": \"after.csv\""));
  CHECK(json.substr(change, json.find('}', change) + 1 - change) ==
        "\"change\": {\n"
        "        \"supply_V\": null,\n"
        "        \"across_ref\": \"R2\",\n"
        "        \"across_ohm\": 100000\n"
        "      }");
}
