// benchtau: what the reader records about each channel: its file column and SI unit.
#include <catch2/catch.hpp>

#include "drivers/csv_reader.h"

using namespace benchtau;

TEST_CASE("each channel records its 1-based column in the file") {
  const CsvResult r = read_csv_text("t,out_V,cap_V\n0,1,2\n1e-3,1,2\n2e-3,1,2\n", "cols.csv");
  REQUIRE(r.capture.channels.size() == 2);
  CHECK(r.capture.channels[0].column == 2);
  CHECK(r.capture.channels[1].column == 3);
  const CsvResult mid = read_csv_text("out_V,t,cap_V\n1,0,2\n1,1e-3,2\n1,2e-3,2\n", "mid.csv");
  REQUIRE(mid.capture.channels.size() == 2);
  CHECK(mid.capture.channels[0].column == 1);
  CHECK(mid.capture.channels[1].column == 3);
}

TEST_CASE("a circuit simulator's probe names are volts and amps") {
  // ngspice's wrdata header names vectors v(node) and i(branch) (ngspice
  // manual, output commands; from memory).
  const CsvResult r = read_csv_text(
      "time v(out) v(cap) i(vdd)\n0 7.3 3 -0.001\n1e-6 7.3 3.1 -0.001\n"
      "2e-6 7.3 3.2 -0.001\n",
      "spice.txt");
  REQUIRE(r.capture.channels.size() == 3);
  CHECK(r.capture.channels[0].name == "v(out)");
  CHECK(r.capture.channels[0].unit == "V");
  CHECK(r.capture.channels[2].unit == "A");
  for (const std::string& note : r.notes) CHECK(note.find("does not know") == std::string::npos);
}
