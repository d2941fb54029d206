// FuseRk4.tests.cpp - the fused RK4 step (the step sweeps run in SIMD lanes) computes exactly
// what the C++ RK4 loop of Simulate.cpp computes.
#include "Fuse.h"
#include "Interpret.h"
#include "Lower.h"
#include "Pipeline.h"
#include "Simulate.h"
#include "TestSupport.h"

using namespace saltpan;

TEST_CASE("the fused RK4 step equals Simulate's RK4 bit for bit", "[simulate][fuse]") {
  Compilation c;
  compileFile(std::string(SALTPAN_SOURCE_DIR) + "/specs/reference/squid_axon_1952.saltpan", c);
  INFO(testing::allDiagnostics(c));
  REQUIRE(c.checked);
  auto all = protocols(c.program);
  REQUIRE(all.size() == 1);
  ir::Model model = c.lowered.at(all[0]);
  REQUIRE(model.protocol.method == ir::Method::RungeKutta4);
  model.protocol.duration = 0.03; // a spike and a half at 10 uA/cm2
  // A point away from the published one, so the check is not of one parameter set only.
  std::vector<double> params = model.params;
  params[static_cast<size_t>(model.findParam("axon.SquidPotassium1952.density"))] *= 0.8;

  Interpreter plain(model.kernel);
  SimulationFailure looseFailure;
  Trace loose = simulate(model, params, KernelRef{nullptr, &plain}, looseFailure);
  REQUIRE_FALSE(looseFailure.failed);

  std::optional<ir::Kernel> fused = fuseRungeKutta4(model, model.protocol.step);
  REQUIRE(fused);
  Interpreter fusedInterpreter(*fused);
  // The fused loop of Simulate.cpp calls a fused kernel once per step whatever it contains.
  ir::Model asFused = model;
  asFused.protocol.method = ir::Method::ExponentialEuler;
  FusedStep step{KernelRef{nullptr, &fusedInterpreter}, KernelRef{}, true, false};
  SimulationFailure fusedFailure;
  Trace tight = simulate(asFused, params, KernelRef{nullptr, &plain}, fusedFailure, nullptr, step);
  REQUIRE_FALSE(fusedFailure.failed);

  REQUIRE(tight.values.size() == loose.values.size());
  REQUIRE(loose.values.size() > 1000);
  size_t differing = 0;
  for (size_t i = 0; i < loose.values.size(); ++i)
    differing += tight.values[i] != loose.values[i];
  CHECK(differing == 0);
  // And it spiked: the comparison covers the fast part of the trajectory.
  double peak = *std::max_element(loose.values.begin(), loose.values.end());
  CHECK(peak > 20);
}

TEST_CASE("a voltage clamp is not fused into RK4", "[simulate][fuse]") {
  auto c = testing::compile(
      "temperature 20 degC\n"
      "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n  membrane { L 1 mS/cm2 }\n}\n"
      "channel L { reversal -70 mV }\n"
      "protocol p {\n  method rk4 step 10 us\n  duration 5 ms\n  clamp c at -20 mV\n  record c.V every 0.1 ms\n}\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  const ir::Model &m = c->lowered.begin()->second;
  CHECK_FALSE(fuseRungeKutta4(m, 1e-5).has_value());
}
