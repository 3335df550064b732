// benchtau: which channel is which node: "none" keeps a node from being guessed.
#include <catch2/catch.hpp>

#include "src/core/nodes.h"
#include "src/core/synth.h"

using namespace benchtau;

namespace {

// A textbook astable's output and capacitor node, under names that say nothing.
Capture anonymous_astable() {
  SynthOptions o;
  o.with_ctl = false;
  Capture c = synth_astable(two_resistor_astable(9.0, 10e3, 47e3, 100e-9), o).capture;
  c.channels[0].name = "a";
  c.channels[1].name = "b";
  return c;
}

}  // namespace

TEST_CASE("nodes: both guessed from their shapes when nothing is asked") {
  const NodeMap m = map_nodes(anonymous_astable(), {});
  CHECK(m.out == 0u);
  CHECK(m.cap == 1u);
}

TEST_CASE("nodes: a node asked as none is neither looked up nor guessed") {
  NodeRequest r;
  r.cap = "none";
  r.ctl = "none";  // else the sawtooth left over would be taken for the control pin
  const NodeMap m = map_nodes(anonymous_astable(), r);
  CHECK(m.out == 0u);
  CHECK_FALSE(m.cap.has_value());
  CHECK_FALSE(m.ctl.has_value());
  CHECK(m.notes ==
        std::vector<std::string>{"output pin: \"a\", guessed from its shape (two levels)"});
  r.cap.clear();
  r.out = "NONE";
  const NodeMap n = map_nodes(anonymous_astable(), r);
  CHECK_FALSE(n.out.has_value());
  CHECK(n.cap == 1u);
}
