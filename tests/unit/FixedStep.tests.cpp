// FixedStep.tests.cpp - stimulus edges are exact break points of every method: the step grid,
// the passive charge of a current pulse, a clamp step that acts at its edge, and SIMD lanes.
#include "FixedStep.h"
#include "Fuse.h"
#include "Interpret.h"
#include "JIT.h"
#include "LaneSimulate.h"
#include "Lower.h"
#include "Simulate.h"
#include "TestSupport.h"

#include <cmath>
#include <fstream>
#include <sstream>

using namespace saltpan;
using Catch::Matchers::WithinAbs;

namespace {

struct Lowered {
  std::unique_ptr<Compilation> c;
  ir::Model model;
};

Lowered lowerOne(const std::string &text) {
  Lowered l;
  l.c = testing::compile(text);
  INFO(testing::allDiagnostics(*l.c));
  REQUIRE(l.c->checked);
  auto all = protocols(l.c->program);
  REQUIRE(all.size() == 1);
  l.model = l.c->lowered.at(all[0]);
  return l;
}

// Simulates with the interpreter; exponential Euler through its fused kernel when `fuse`.
Trace run(const ir::Model &m, bool fuse, SimulationFailure &failure) {
  Interpreter plain(m.kernel);
  std::optional<ir::Kernel> fused;
  if (fuse && m.protocol.method == ir::Method::ExponentialEuler)
    fused = fuseExponentialEuler(m, m.protocol.step);
  std::optional<Interpreter> fusedInterpreter;
  FusedStep step;
  if (fused) {
    fusedInterpreter.emplace(*fused);
    step = {KernelRef{nullptr, &*fusedInterpreter}, KernelRef{}, true, false};
  }
  return simulate(m, m.params, KernelRef{nullptr, &plain}, failure, nullptr, step);
}

// A bare capacitor (no membrane entries) charged by a current pulse: V rises by I t / C while
// the pulse is on, exactly, since the current is constant between the edges (common practice).
std::string capacitor(const std::string &method, const std::string &window) {
  return "temperature 20 degC\n"
         "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n}\n"
         "protocol p {\n  method " +
         method + "\n  duration 4 ms\n  inject c 10 uA/cm2 from " + window + "\n  record c.V every 0.01 ms\n}\n";
}

// V (mV) of the capacitor at t (s) for a 10 uA/cm2 pulse from a to b: 10 mV per ms on.
double charged(double t, double a, double b) { return -65 + 1e4 * std::clamp(t - a, 0.0, b - a); }

} // namespace

TEST_CASE("the step grid finds the edges and lands on them exactly", "[simulate][grid]") {
  Lowered l = lowerOne("temperature 20 degC\n"
                       "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n  membrane { L 1 mS/cm2 }\n}\n"
                       "channel L { reversal -70 mV }\n"
                       "protocol p {\n  method rk4 step 10 us\n  duration 5 ms\n"
                       "  inject c 1 uA/cm2 from 3 ms to 3.505 ms\n"
                       "  clamp c at -60 mV from 4 ms to 4.5 ms\n"
                       "  synapse c 1 mS/cm2 reversal 0 mV decay 1 ms at 1.5 ms\n"
                       "  record c.V every 0.01 ms\n}\n");
  std::vector<double> events = eventTimes(l.model.kernel);
  std::vector<double> expected = {1.5e-3, 3e-3, 3.505e-3, 4e-3, 4.5e-3};
  REQUIRE(events.size() == expected.size());
  for (size_t i = 0; i < events.size(); ++i) // as the unit conversion rounds them
    CHECK_THAT(events[i], Catch::Matchers::WithinRel(expected[i], 1e-14));
  StepGrid grid(l.model);
  REQUIRE(grid.steps() == 500);
  // 10 us is not a double, and 300 times the stored step is not the stored 3 ms: the grid
  // time is the edge itself, so the step that follows starts on it.
  CHECK(grid.time(300) == events[1]);
  CHECK(300 * grid.step() != events[1]);
  CHECK(grid.time(400) == events[3]);
  CHECK(grid.time(123) == 123 * grid.step());
  CHECK(grid.smooth(0));
  CHECK_FALSE(grid.smooth(299)); // ends on the pulse's start
  CHECK(grid.smooth(300));
  CHECK_FALSE(grid.smooth(350)); // the pulse ends inside it
  REQUIRE(grid.cuts(350).size() == 1);
  CHECK(grid.cuts(350)[0] == events[2]);
  CHECK(grid.cuts(299).empty());
  CHECK(grid.meetsEvents());
  CHECK(grid.nextBreak(0, 1e-3) == 1e-3);
  CHECK(grid.nextBreak(1e-3, 5e-3) == events[0]);
  CHECK(grid.nextBreak(events[0], 5e-3) == events[1]);
}

TEST_CASE("a pulse charges a capacitor by exactly I t / C under every method", "[simulate][grid]") {
  // On the grid (3 ms is not 300 stored steps) and off it (1/3 of a step past the grid).
  for (const char *window : {"2 ms to 3 ms", "0.3333 ms to 1.3333 ms"}) {
    double a = std::string(window)[0] == '2' ? 2e-3 : 0.3333e-3, b = a + 1e-3;
    for (const char *method : {"exponential_euler step 10 us", "rk4 step 10 us",
                               "dormand_prince step 10 us tolerance 1e-8", "rosenbrock step 10 us tolerance 1e-6"}) {
      for (bool fuse : {true, false}) {
        Lowered l = lowerOne(capacitor(method, window));
        SimulationFailure failure;
        Trace t = run(l.model, fuse, failure);
        INFO(method << ", pulse from " << window << (fuse ? ", fused" : ""));
        REQUIRE_FALSE(failure.failed);
        REQUIRE(t.time.size() == 401);
        CHECK_THAT(t.at(400, 0) - t.at(0, 0), WithinAbs(10, 1e-10));
        double worst = 0;
        for (size_t i = 0; i < t.time.size(); ++i)
          worst = std::max(worst, std::fabs(t.at(i, 0) - charged(t.time[i], a, b)));
        CHECK(worst < 1e-10); // mV: rounding only
      }
    }
  }
}

TEST_CASE("a clamp step acts at its edge", "[simulate][grid]") {
  // The Hodgkin & Huxley 1952 axon held at -80 mV, stepped to -65 mV at 2 ms. Under a clamp
  // the gate h relaxes exponentially with the rates at the command, alpha_h = 0.07 e^(-(V+65)/20)
  // and beta_h = 1/(1 + e^(-(V+35)/10)) per ms (Hodgkin & Huxley 1952, modern convention).
  std::ifstream file(std::string(SALTPAN_SOURCE_DIR) + "/specs/reference/squid_axon_1952.saltpan");
  std::stringstream text;
  text << file.rdbuf();
  std::string model = text.str().substr(0, text.str().find("\nprotocol "));
  auto rates = [](double v, double &inf, double &tau) { // v in mV, tau in s
    double a = 0.07 * std::exp(-(v + 65) / 20), b = 1 / (1 + std::exp(-(v + 35) / 10));
    inf = a / (a + b);
    tau = 1e-3 / (a + b);
  };
  double h0Inf, h0Tau, hInf, hTau, hStart;
  rates(-65, hInf, hTau);
  rates(-80, h0Inf, h0Tau);
  hStart = hInf; // initial V -65 mV, gates at steady state
  double hAtStep = h0Inf + (hStart - h0Inf) * std::exp(-2e-3 / h0Tau);
  auto exact = [&](double t) {
    return t < 2e-3 ? h0Inf + (hStart - h0Inf) * std::exp(-t / h0Tau)
                    : hInf + (hAtStep - hInf) * std::exp(-(t - 2e-3) / hTau);
  };
  for (const char *method : {"exponential_euler", "rk4"}) {
    Lowered l = lowerOne(model + "\nprotocol p {\n  method " + method +
                         " step 10 us\n  duration 6 ms\n  clamp axon at -80 mV\n"
                         "  clamp axon at -65 mV from 2 ms to 10 ms\n"
                         "  record axon.V, axon.SquidSodium1952.h every 0.01 ms\n}\n");
    SimulationFailure failure;
    Trace t = run(l.model, false, failure);
    INFO(method);
    REQUIRE_FALSE(failure.failed);
    REQUIRE(t.time.size() == 601);
    CHECK(t.at(199, 0) == -80);
    CHECK(t.at(200, 0) == -65); // the sample at the edge belongs to what follows it
    double worst = 0;
    for (size_t i = 0; i < t.time.size(); ++i)
      worst = std::max(worst, std::fabs(t.at(i, 1) - exact(t.time[i])));
    // Under a clamp Rush-Larsen is exact and RK4 all but exact; a step taken late would be
    // off by about dh/dt * 10 us = 4e-4.
    CHECK(worst < 1e-11);
  }
}

TEST_CASE("SIMD lanes split their steps at the edges as a scalar run does", "[simulate][grid]") {
  std::string error;
  std::unique_ptr<JIT> jit = JIT::create(error);
  INFO(error);
  REQUIRE(jit);
  for (const char *method : {"exponential_euler step 10 us", "rk4 step 10 us"}) {
    Lowered l = lowerOne(capacitor(method, "0.3333 ms to 1.3333 ms"));
    const ir::Model &m = l.model;
    bool euler = m.protocol.method == ir::Method::ExponentialEuler;
    auto full = euler ? fuseExponentialEuler(m, m.protocol.step) : fuseRungeKutta4(m, m.protocol.step);
    auto stateOnly =
        euler ? fuseExponentialEuler(m, m.protocol.step, false) : fuseRungeKutta4(m, m.protocol.step, false);
    REQUIRE(full);
    REQUIRE(stateOnly);
    LaneKernels kernels;
    kernels.lanes = 2;
    kernels.full = jit->compileLanes(*full, 2, error);
    kernels.stateOnly = jit->compileLanes(*stateOnly, 2, error);
    kernels.plain = jit->compile(m.kernel, error);
    REQUIRE(kernels.full);
    REQUIRE(kernels.stateOnly);
    REQUIRE(kernels.plain);
    // A second lane with twice the capacitance rises half as far.
    std::vector<std::vector<double>> params = {m.params, m.params};
    params[1][static_cast<size_t>(m.findParam("c.capacitance"))] *= 2;
    LaneRun lanes = simulateLanes(m, params, kernels);
    INFO(method);
    for (size_t lane = 0; lane < 2; ++lane) {
      REQUIRE_FALSE(lanes.failures[lane].failed);
      const Trace &t = lanes.traces[lane];
      REQUIRE(t.time.size() == 401);
      CHECK_THAT(t.at(400, 0) - t.at(0, 0), WithinAbs(lane == 0 ? 10 : 5, 1e-10));
      // The same numbers as one scalar run with the same native kernels.
      SimulationFailure failure;
      FusedStep step{KernelRef{jit->compile(*full, error), nullptr}, KernelRef{}, true, false};
      Trace scalar =
          simulate(m, params[lane], KernelRef{kernels.plain, nullptr}, failure, nullptr, euler ? step : FusedStep{});
      REQUIRE_FALSE(failure.failed);
      REQUIRE(scalar.values.size() == t.values.size());
      for (size_t i = 0; i < t.values.size(); ++i)
        CHECK(scalar.values[i] == t.values[i]);
    }
  }
}
