// KernelPlan.tests.cpp - the one choice of kernels (which are fused, which are plain, when lanes
// apply) and the shared fixed-step engine: the C library's step-by-step use of FixedRun gives
// the states a whole simulation records, bit for bit.
#include "KernelPlan.h"
#include "FixedStep.h"
#include "Run.h"
#include "TestSupport.h"

using namespace saltpan;

namespace {

struct Lowered {
  std::unique_ptr<Compilation> c;
  ir::Model model;
};

// A leaky cell with one gated channel and the given protocol body.
Lowered lowerCell(const std::string &protocol) {
  Lowered l;
  l.c = testing::compile("temperature 6.3 degC\n"
                         "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n"
                         "  membrane { L 0.3 mS/cm2  K 36 mS/cm2 }\n}\n"
                         "channel L { reversal -54.4 mV }\n"
                         "channel K {\n  reversal -77 mV\n  gate n power 4 {\n"
                         "    opening = 0.01 /ms/mV * (V + 55 mV) / (1 - exp(-(V + 55 mV) / 10 mV))\n"
                         "    closing = 0.125 /ms * exp(-(V + 65 mV) / 80 mV)\n  }\n}\n"
                         "protocol p {\n" +
                         protocol + "}\n");
  INFO(testing::allDiagnostics(*l.c));
  REQUIRE(l.c->checked);
  REQUIRE(l.c->lowered.size() == 1);
  l.model = l.c->lowered.begin()->second;
  return l;
}

std::vector<std::string> labels(const KernelPlan &plan) {
  std::vector<std::string> out;
  for (const KernelPlan::Entry &e : plan.entries())
    out.push_back(e.label);
  return out;
}

} // namespace

TEST_CASE("a run plans the fused step, its state-only form and the plain kernel only where needed", "[plan]") {
  Lowered sparse = lowerCell("  method exponential_euler step 10 us\n  duration 2 ms\n  record c.V every 0.1 ms\n");
  KernelPlan plan = planKernels(sparse.model, KernelUse::Run);
  CHECK(plan.lanes == 1);
  CHECK(plan.fused);
  CHECK(plan.stateOnly);   // most steps record nothing
  CHECK_FALSE(plan.plain); // no stimulus edge: every step is fused
  CHECK(labels(plan).size() == 2);

  Lowered dense = lowerCell("  method exponential_euler step 10 us\n  duration 2 ms\n"
                            "  inject c 1 uA/cm2 from 1 ms to 1.5 ms\n  record c.V every 10 us\n");
  plan = planKernels(dense.model, KernelUse::Run);
  CHECK(plan.fused);
  CHECK_FALSE(plan.stateOnly); // every step records
  REQUIRE(plan.plain);         // the steps that meet the pulse's edges
  CHECK(plan.plain->nodes().size() == dense.model.kernel.nodes().size());
  CHECK(labels(plan).back() == "model kernel (steps that meet a stimulus edge)");

  // A built model may be run longer and recorded sparsely: it carries every kernel.
  plan = planKernels(dense.model, KernelUse::Built);
  CHECK(plan.fused);
  CHECK(plan.stateOnly);
  CHECK(plan.plain);
}

TEST_CASE("RK4 and adaptive methods run the plain kernel; lanes fuse RK4 but not a clamp", "[plan]") {
  Lowered rk4 = lowerCell("  method rk4 step 10 us\n  duration 2 ms\n  record c.V every 0.1 ms\n");
  KernelPlan plan = planKernels(rk4.model, KernelUse::Run);
  CHECK_FALSE(plan.fused);
  CHECK(plan.plain);
  CHECK(labels(plan) == std::vector<std::string>{"model kernel"});
  KernelPlan lanes = planKernels(rk4.model, KernelUse::Lanes, 4);
  CHECK(lanes.lanes == 4);
  CHECK(lanes.fused);
  CHECK(lanes.stateOnly);
  CHECK_FALSE(lanes.plain);
  CHECK(labels(lanes).front() == "fused rk4 step for sweep lanes (next state, then every output)");
  CHECK(planKernels(rk4.model, KernelUse::Lanes, 1).lanes == 1); // one lane is a scalar run

  Lowered adaptive = lowerCell("  method dormand_prince step 10 us\n  duration 2 ms\n  record c.V every 0.1 ms\n");
  plan = planKernels(adaptive.model, KernelUse::Lanes, 4);
  CHECK(plan.lanes == 1);
  CHECK_FALSE(plan.fused);
  CHECK(plan.plain);

  Lowered clamped = lowerCell("  method exponential_euler step 10 us\n  duration 2 ms\n"
                              "  clamp c at -40 mV from 1 ms to 1.5 ms\n  record c.V every 0.1 ms\n");
  plan = planKernels(clamped.model, KernelUse::Lanes, 4);
  CHECK(plan.lanes == 1); // the fused step knows no clamp
  CHECK_FALSE(plan.fused);
  CHECK(plan.plain);
}

TEST_CASE("planned kernels are interpreted without a compiler, and a copy has its own interpreters", "[plan]") {
  Lowered l = lowerCell("  method exponential_euler step 10 us\n  duration 2 ms\n"
                        "  inject c 10 uA/cm2 from 0.5 ms to 1 ms\n  record c.V every 0.1 ms\n");
  PlannedKernels kernels(planKernels(l.model, KernelUse::Run), KernelCompiler());
  CHECK_FALSE(kernels.native());
  REQUIRE(kernels.plain().interpreter);
  REQUIRE(kernels.fusedStep().available);
  PlannedKernels copy(kernels);
  CHECK(copy.plain().interpreter != kernels.plain().interpreter);
  CHECK(copy.fusedStep().kernel.interpreter != kernels.fusedStep().kernel.interpreter);
  SimulationFailure failure, failureCopy;
  Trace a = simulatePlanned(l.model, l.model.params, kernels, failure);
  Trace b = simulatePlanned(l.model, l.model.params, copy, failureCopy);
  REQUIRE_FALSE(failure.failed);
  CHECK(a.values == b.values);
  CHECK(a.values.back() != a.values.front()); // the pulse moved V

  // A compiler that fails leaves every kernel interpreted, and says why.
  KernelCompiler refuses = [](const ir::Kernel &, int, std::string &error) -> KernelFn {
    error = "no native code today";
    return nullptr;
  };
  PlannedKernels fallback(planKernels(l.model, KernelUse::Run), refuses);
  CHECK_FALSE(fallback.native());
  CHECK(fallback.compileError() == "no native code today");
  Trace c = simulatePlanned(l.model, l.model.params, fallback, failure);
  CHECK(c.values == a.values);
}

TEST_CASE("stepping FixedRun one step at a time gives what a whole simulation records", "[plan][engine]") {
  // Fused (with the state-only form) for exponential Euler; RK4 with a clamp steps the plain kernel.
  for (const char *stimuli : {"  method exponential_euler step 10 us\n  inject c 10 uA/cm2 from 0.505 ms to 1.2 ms\n",
                              "  method rk4 step 10 us\n  inject c 10 uA/cm2 from 0.505 ms to 1.2 ms\n"
                              "  clamp c at -50 mV from 2 ms to 2.5 ms\n"}) {
    Lowered l = lowerCell(std::string(stimuli) + "  duration 3 ms\n  record c.V every 10 us\n");
    INFO(stimuli);
    // Built kernels, as the C library uses them: the state-only fused step where it can.
    PlannedKernels kernels(planKernels(l.model, KernelUse::Built), KernelCompiler());
    CHECK(kernels.fusedStep().hasStateOnly == (l.model.protocol.method == ir::Method::ExponentialEuler));
    SimulationFailure failure;
    Trace whole = simulatePlanned(l.model, l.model.params, kernels, failure);
    REQUIRE_FALSE(failure.failed);
    FixedRun run(l.model, l.model.params.data(), kernels.plain(), kernels.fusedStep());
    std::vector<double> y = l.model.initialState;
    size_t v = static_cast<size_t>(l.model.compartments.at(0).voltageState);
    long steps = run.grid().steps();
    REQUIRE(whole.time.size() == static_cast<size_t>(steps + 1));
    for (long i = 0; i < steps; ++i) {
      run.begin(i, y.data(), false);
      REQUIRE(y[v] * 1e3 == whole.at(static_cast<size_t>(i), 0)); // V, recorded in mV
      run.finish(y.data(), nullptr);
    }
    run.end(y.data());
    CHECK(y[v] * 1e3 == whole.at(static_cast<size_t>(steps), 0));
  }
}
