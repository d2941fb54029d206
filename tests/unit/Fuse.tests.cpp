// Fuse.tests.cpp - stage 9a: the fused exponential Euler kernels. The state-only form computes
// exactly the next state of the full one, and a clamped model is left to the general stepper.
#include "Fuse.h"
#include "Interpret.h"
#include "TestSupport.h"

#include <random>

using namespace saltpan;

namespace {

const ir::Model &firstLowered(Compilation &c) {
  INFO(testing::allDiagnostics(c));
  REQUIRE(c.checked);
  REQUIRE_FALSE(c.lowered.empty());
  return c.lowered.begin()->second;
}

} // namespace

TEST_CASE("the state-only fused kernel computes the full fused kernel's next state bit for bit", "[fuse]") {
  Compilation c;
  compileFile(std::string(SALTPAN_SOURCE_DIR) + "/specs/reference/squid_axon_1952_sweeps.saltpan", c);
  const ir::Model &model = firstLowered(c);
  auto full = fuseExponentialEuler(model, model.protocol.step);
  auto stateOnly = fuseExponentialEuler(model, model.protocol.step, false);
  REQUIRE(full);
  REQUIRE(stateOnly);
  size_t states = model.stateNames.size();
  REQUIRE(stateOnly->outputs.size() == states);
  REQUIRE(full->outputs.size() == states + model.kernel.outputs.size());

  Interpreter fullRun(*full), stateRun(*stateOnly);
  std::mt19937_64 random(20261203);
  std::uniform_real_distribution<double> voltage(-0.1, 0.05), gate(0, 1);
  std::vector<double> fullOut(full->outputs.size()), stateOut(states);
  for (int trial = 0; trial < 200; ++trial) {
    std::vector<double> y(states);
    for (size_t i = 0; i < states; ++i)
      y[i] = model.stateNames[i].ends_with(".V") ? voltage(random) : gate(random);
    double t = 1e-4 * trial;
    fullRun.run(y.data(), model.params.data(), t, fullOut.data());
    stateRun.run(y.data(), model.params.data(), t, stateOut.data());
    for (size_t i = 0; i < states; ++i)
      REQUIRE(stateOut[i] == fullOut[i]);
  }
}

TEST_CASE("the fused kernel's outputs after the next state are the model kernel's", "[fuse]") {
  Compilation c;
  compileFile(std::string(SALTPAN_SOURCE_DIR) + "/specs/reference/squid_axon_1952_sweeps.saltpan", c);
  const ir::Model &model = firstLowered(c);
  auto full = fuseExponentialEuler(model, model.protocol.step);
  REQUIRE(full);
  Interpreter fused(*full), plain(model.kernel);
  size_t states = model.stateNames.size();
  std::vector<double> fusedOut(full->outputs.size()), plainOut(model.kernel.outputs.size());
  fused.run(model.initialState.data(), model.params.data(), 0, fusedOut.data());
  plain.run(model.initialState.data(), model.params.data(), 0, plainOut.data());
  for (size_t i = 0; i < plainOut.size(); ++i)
    CHECK(fusedOut[states + i] == plainOut[i]);
  // And the next state moved: the step is not the identity.
  bool moved = false;
  for (size_t i = 0; i < states; ++i)
    moved |= fusedOut[i] != model.initialState[i];
  CHECK(moved);
}

TEST_CASE("a voltage clamp is not fused into exponential Euler", "[fuse]") {
  auto c =
      testing::compile("temperature 20 degC\n"
                       "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n  membrane { L 1 mS/cm2 }\n}\n"
                       "channel L { reversal -70 mV }\n"
                       "protocol p {\n  duration 5 ms\n  clamp c at -20 mV\n  record c.V every 0.1 ms\n}\n");
  const ir::Model &model = firstLowered(*c);
  REQUIRE(model.protocol.method == ir::Method::ExponentialEuler);
  CHECK_FALSE(fuseExponentialEuler(model, model.protocol.step));
  CHECK_FALSE(fuseExponentialEuler(model, model.protocol.step, false));
}
