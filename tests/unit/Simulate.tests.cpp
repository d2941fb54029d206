// Simulate.tests.cpp - the steppers against closed-form solutions, the voltage clamp,
// synaptic inputs, dynamic concentrations and their charge balance.
#include "Fuse.h"
#include "Interpret.h"
#include "Lower.h"
#include "Simulate.h"
#include "TestSupport.h"

#include <cmath>

using namespace saltpan;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {

struct Run {
  std::unique_ptr<Compilation> c;
  ir::Model model;
  Trace trace;
  SimulationStats stats;
  SimulationFailure failure;
};

// Checks, lowers for the spec's one protocol and simulates with the interpreter (fused
// exponential Euler when the method is exponential Euler and `fuse` is set).
// `sets` overrides parameters (SI) the way the C interface can, past the checks of `--set`.
Run simulateSpec(const std::string &text, bool fuse = true,
                 const std::vector<std::pair<std::string, double>> &sets = {}) {
  Run r;
  r.c = testing::compile(text);
  INFO(testing::allDiagnostics(*r.c));
  REQUIRE(r.c->checked);
  auto all = protocols(r.c->program);
  REQUIRE(all.size() == 1);
  REQUIRE(lowerModel(r.c->program, r.c->model, r.c->evaluator, all[0], r.c->diags, r.model));
  for (const auto &[name, value] : sets) {
    int index = r.model.findParam(name);
    REQUIRE(index >= 0);
    r.model.params[static_cast<size_t>(index)] = value;
  }
  Interpreter interpreter(r.model.kernel);
  KernelRef kernel{nullptr, &interpreter};
  std::optional<ir::Kernel> fused;
  if (fuse && r.model.protocol.method == ir::Method::ExponentialEuler)
    fused = fuseExponentialEuler(r.model, r.model.protocol.step);
  std::optional<Interpreter> fusedInterpreter;
  FusedStep step;
  if (fused) {
    fusedInterpreter.emplace(*fused);
    step = {KernelRef{nullptr, &*fusedInterpreter}, KernelRef{}, true, false};
  }
  r.trace = simulate(r.model, r.model.params, kernel, r.failure, &r.stats, step);
  return r;
}

// A passive patch: C dV/dt = -g (V - E), so V(t) = E + (V0 - E) e^(-t g / C) exactly
// (common practice: the RC membrane).
std::string passive(const std::string &method) {
  return "temperature 20 degC\n"
         "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -20 mV\n  membrane { L 1 mS/cm2 }\n}\n"
         "channel L { reversal -70 mV }\n"
         "protocol p {\n  method " + method + "\n  duration 5 ms\n  record c.V every 0.1 ms\n}\n";
}

double passiveExact(double tSeconds) { return -70 + 50 * std::exp(-tSeconds / 1e-3); } // tau = C/g = 1 ms

} // namespace

TEST_CASE("exponential Euler is exact for a passive membrane", "[simulate]") {
  for (bool fuse : {true, false}) {
    Run r = simulateSpec(passive("exponential_euler step 100 us"), fuse);
    REQUIRE_FALSE(r.failure.failed);
    REQUIRE(r.trace.time.size() == 51);
    for (size_t i = 0; i < r.trace.time.size(); ++i)
      CHECK_THAT(r.trace.at(i, 0), WithinAbs(passiveExact(r.trace.time[i]), 1e-9));
  }
}

// With only a leak of density g < 0, C V' = -g (V - E) still has the closed form
// V(t) = E + (V0 - E) e^(-t g / C) (common practice: a linear first-order ODE); exponential
// Euler must step the whole current, not only the part that relaxes towards E. With nothing
// to relax towards it is first order, so a step of 1 us lands within 0.01 mV over 5 ms.
TEST_CASE("exponential Euler follows a negative conductance", "[simulate]") {
  for (bool fuse : {true, false}) {
    Run r = simulateSpec(passive("exponential_euler step 1 us"), fuse, {{"c.L.density", -1.0}}); // -0.1 mS/cm2
    REQUIRE_FALSE(r.failure.failed);
    REQUIRE(r.trace.time.size() == 51);
    for (size_t i = 0; i < r.trace.time.size(); ++i) // tau = C/|g| = 10 ms
      CHECK_THAT(r.trace.at(i, 0), WithinAbs(-70 + 50 * std::exp(r.trace.time[i] / 10e-3), 0.01));
  }
}

TEST_CASE("RK4 and Dormand-Prince follow the passive membrane to their accuracy", "[simulate]") {
  Run rk4 = simulateSpec(passive("rk4 step 10 us"));
  Run dp = simulateSpec(passive("dormand_prince step 10 us tolerance 1e-10"));
  for (Run *r : {&rk4, &dp}) {
    REQUIRE_FALSE(r->failure.failed);
    REQUIRE(r->trace.time.size() == 51);
    for (size_t i = 0; i < r->trace.time.size(); ++i)
      CHECK_THAT(r->trace.at(i, 0), WithinAbs(passiveExact(r->trace.time[i]), 1e-6));
  }
  CHECK(dp.stats.rejected >= 0);
}

TEST_CASE("a voltage clamp holds V at its command and reports the ionic current", "[simulate]") {
  Run r = simulateSpec("temperature 20 degC\n"
                       "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
                       "  membrane { L 2 mS/cm2 }\n}\n"
                       "channel L { reversal -70 mV }\n"
                       "protocol p {\n  method exponential_euler step 10 us\n  duration 4 ms\n"
                       "  clamp c at -70 mV\n  clamp c at -20 mV from 1 ms to 3 ms\n"
                       "  record c.V, c.clamp_current every 0.5 ms\n}\n");
  REQUIRE_FALSE(r.failure.failed);
  for (size_t i = 0; i < r.trace.time.size(); ++i) {
    double t = r.trace.time[i];
    bool stepped = t >= 1e-3 && t < 3e-3;
    double command = stepped ? -20 : -70;
    CHECK_THAT(r.trace.at(i, 0), WithinAbs(command, 1e-12));
    // I = g (V - E) = 2 mS/cm2 * 50 mV = 100 uA/cm2 during the step, 0 at holding.
    CHECK_THAT(r.trace.at(i, 1), WithinAbs(stepped ? 100 : 0, 1e-9));
  }
}

TEST_CASE("a synaptic conductance follows its time course", "[simulate]") {
  // A single-exponential synapse clamped at -70 mV: I = g e^(-(t - t0)/tau) (V - E).
  Run r = simulateSpec("temperature 20 degC\n"
                       "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
                       "  membrane { L 0.1 mS/cm2 }\n}\n"
                       "channel L { reversal -70 mV }\n"
                       "protocol p {\n  method exponential_euler step 10 us\n  duration 10 ms\n"
                       "  clamp c at -70 mV\n"
                       "  synapse c 1 mS/cm2 reversal 0 mV decay 2 ms at 2 ms\n"
                       "  record c.synapse1.conductance, c.synapse1.current every 1 ms\n}\n");
  REQUIRE_FALSE(r.failure.failed);
  for (size_t i = 0; i < r.trace.time.size(); ++i) {
    double t = r.trace.time[i];
    double g = t >= 2e-3 ? std::exp(-(t - 2e-3) / 2e-3) : 0; // mS/cm2
    CHECK_THAT(r.trace.at(i, 0), WithinAbs(g, 1e-12));
    CHECK_THAT(r.trace.at(i, 1), WithinAbs(g * -70, 1e-9)); // mS/cm2 * mV = uA/cm2
  }
}

TEST_CASE("a synapse given in nS is recorded in nS", "[simulate]") {
  // 100 um2 of membrane: 2 nS over it is 2 mS/cm2 (common practice: 1 nS / 100 um2 = 1 mS/cm2).
  Run r = simulateSpec("temperature 20 degC\n"
                       "compartment c {\n  area 100 um2\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
                       "  membrane { L 0.1 mS/cm2 }\n}\n"
                       "channel L { reversal -70 mV }\n"
                       "protocol p {\n  method exponential_euler step 10 us\n  duration 6 ms\n"
                       "  clamp c at -70 mV\n"
                       "  synapse c 2 nS reversal 0 mV decay 2 ms at 2 ms\n"
                       "  record c.synapse1.conductance, c.synapse1.current every 1 ms\n}\n");
  REQUIRE_FALSE(r.failure.failed);
  CHECK(r.trace.units[0] == "nS");
  CHECK(r.trace.units[1] == "uA/cm2");
  for (size_t i = 0; i < r.trace.time.size(); ++i) {
    double t = r.trace.time[i];
    double g = t >= 2e-3 ? 2 * std::exp(-(t - 2e-3) / 2e-3) : 0; // nS
    CHECK_THAT(r.trace.at(i, 0), WithinAbs(g, 1e-12));
    CHECK_THAT(r.trace.at(i, 1), WithinAbs(g * -70, 1e-9)); // 1 nS over 100 um2 is 1 mS/cm2: uA/cm2
  }
}

TEST_CASE("a train's end time is not one of its events, even within rounding", "[simulate]") {
  // 1 ms + 9 ms is 0.009999999999999998 s in binary, just before the 10 ms end: still not an event.
  Run r = simulateSpec("temperature 20 degC\n"
                       "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
                       "  membrane { L 0.1 mS/cm2 }\n}\n"
                       "channel L { reversal -70 mV }\n"
                       "protocol p {\n  method exponential_euler step 10 us\n  duration 12 ms\n"
                       "  clamp c at -70 mV\n"
                       "  synapse c 1 mS/cm2 reversal 0 mV decay 2 ms every 9 ms from 1 ms to 10 ms\n"
                       "  record c.synapse1.conductance every 1 ms\n}\n");
  REQUIRE_FALSE(r.failure.failed);
  REQUIRE(r.trace.time.size() == 13);
  CHECK_THAT(r.trace.at(11, 0), WithinAbs(std::exp(-10.0 / 2), 1e-12)); // only the event at 1 ms
}

TEST_CASE("the double-exponential and alpha time courses peak at 1", "[simulate]") {
  for (std::string shape : {"rise 0.5 ms decay 3 ms", "peak 1 ms"}) {
    Run r = simulateSpec("temperature 20 degC\n"
                         "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
                         "  membrane { L 0.1 mS/cm2 }\n}\n"
                         "channel L { reversal -70 mV }\n"
                         "protocol p {\n  method exponential_euler step 1 us\n  duration 8 ms\n"
                         "  synapse c 1 mS/cm2 reversal 0 mV " + shape + " at 1 ms\n"
                         "  record c.synapse1.conductance every 1 us\n}\n");
    REQUIRE_FALSE(r.failure.failed);
    double peak = 0;
    for (size_t i = 0; i < r.trace.time.size(); ++i)
      peak = std::max(peak, r.trace.at(i, 0));
    INFO(shape);
    CHECK_THAT(peak, WithinAbs(1.0, 1e-6));
  }
}

TEST_CASE("dynamic concentrations conserve charge with the membrane", "[simulate]") {
  // Every current is carried by a dynamic ion (GHK leaks and a 3 Na : 2 K pump), so the
  // membrane charge C V changes exactly as the ions' charge z F c V/A does (common practice:
  // charge conservation). RK4 keeps this linear invariant up to rounding.
  std::string spec = "use std.ions\nuse std.math\ntemperature 37 degC\n"
                     "outside bath { [Na] = 145 mM  [K] = 5 mM  impermeant 150 mM valence -1 }\n"
                     "compartment cell {\n  sphere diameter 10 um\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                     "  inside { [Na] = 20 mM dynamic  [K] = 130 mM dynamic  impermeant 150 mM valence -1 }\n"
                     "  membrane { NaLeak 2e-7 cm/s  KLeak 5e-6 cm/s  Pump 20 uA/cm2 }\n}\n"
                     "channel NaLeak { carries Na }\nchannel KLeak { carries K }\n"
                     "pump Pump { cycle 3 Na out, 2 K in  activity = hill([Na]in, 10 mM, 1.5) }\n"
                     "protocol relax {\n  method rk4 step 20 us\n  duration 200 ms\n"
                     "  record cell.V, cell.Na, cell.K every 10 ms\n}\n";
  Run r = simulateSpec(spec);
  REQUIRE_FALSE(r.failure.failed);
  REQUIRE_FALSE(std::isnan(r.stats.chargeBalanceError));
  CHECK(r.stats.chargeBalanceError < 1e-7);
  // The pump moves Na out: the inside Na falls.
  CHECK(r.trace.at(r.trace.time.size() - 1, 1) < 20);
  // Without the K pool, K currents are carried by nothing dynamic: no balance to report.
  std::string fixedK = spec;
  fixedK.replace(fixedK.find("[K] = 130 mM dynamic"), 20, "[K] = 130 mM");
  fixedK.replace(fixedK.find(", cell.K every"), 8, "");
  Run partial = simulateSpec(fixedK);
  REQUIRE_FALSE(partial.failure.failed);
  CHECK(std::isnan(partial.stats.chargeBalanceError));
}

TEST_CASE("a tree conserves charge as a whole, not piece by piece", "[simulate][cable]") {
  // A soma and a cable of five pieces, every current carried by dynamic Na and K, a current
  // injected into the last piece. Axial currents carry charge along the cable, so one piece's
  // membrane and ions do not balance; summed over the tree (weighed by area) the injected charge
  // is the capacitive charge plus the ionic charge that left. RK4 keeps this linear invariant.
  std::string record = "soma.V, soma.Na, soma.K";
  for (const char *place : {"10 %", "30 %", "50 %", "70 %", "90 %"})
    for (const char *q : {"V", "Na", "K"})
      record += std::string(", dend.") + q + " at " + place;
  std::string spec = "use std.ions\nuse std.math\ntemperature 37 degC\n"
                     "outside bath { [Na] = 145 mM  [K] = 5 mM  impermeant 150 mM valence -1 }\n"
                     "compartment soma {\n  sphere diameter 10 um\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                     "  inside { [Na] = 20 mM dynamic  [K] = 130 mM dynamic  impermeant 150 mM valence -1 }\n"
                     "  membrane { NaLeak 2e-7 cm/s  KLeak 5e-6 cm/s  Pump 20 uA/cm2 }\n}\n"
                     "cable dend {\n  grows from soma\n  length 100 um\n  diameter 1 um\n"
                     "  axial resistivity 100 ohm*cm\n  pieces 5\n}\n"
                     "channel NaLeak { carries Na }\nchannel KLeak { carries K }\n"
                     "pump Pump { cycle 3 Na out, 2 K in  activity = hill([Na]in, 10 mM, 1.5) }\n"
                     "protocol feed {\n  method rk4 step 10 us\n  duration 20 ms\n"
                     "  inject dend at 90 % 0.02 nA from 1 ms to 15 ms\n"
                     "  record " +
                     record + " every 20 ms\n}\n";
  Run r = simulateSpec(spec);
  REQUIRE_FALSE(r.failure.failed);
  REQUIRE(r.trace.time.size() == 2);
  REQUIRE_FALSE(std::isnan(r.stats.chargeBalanceError));
  CHECK(r.stats.chargeBalanceError < 1e-9);

  // The same balance from the test side, from the spec's geometry: charges in coulombs.
  const double faraday = 96485.33212, pi = 3.14159265358979323846, capacitance = 0.01; // F/m2
  const double somaD = 10e-6, pieceD = 1e-6, pieceL = 20e-6;
  double injected = 0.02e-9 * 14e-3, capacitive = 0, ionicOut = 0, lastPiece[3] = {0, 0, 0};
  for (size_t k = 0; k < 6; ++k) {
    double area = k == 0 ? pi * somaD * somaD : pi * pieceD * pieceL;
    double volume = k == 0 ? pi * somaD * somaD * somaD / 6 : pi * pieceD * pieceD / 4 * pieceL;
    auto change = [&](size_t q) { return r.trace.at(1, 3 * k + q) - r.trace.at(0, 3 * k + q); };
    double membrane = area * capacitance * change(0) * 1e-3;  // mV to V
    double ions = faraday * (change(1) + change(2)) * volume; // mM = mol/m3; Na and K are +1
    capacitive += membrane;
    ionicOut -= ions;
    if (k == 5)
      lastPiece[0] = membrane, lastPiece[1] = ions, lastPiece[2] = injected;
  }
  CHECK_THAT(capacitive + ionicOut, WithinRel(injected, 1e-9));
  // Piece by piece the balance is far off where the current enters: the axial current took it.
  double pieceError = std::fabs(lastPiece[0] - lastPiece[1] - lastPiece[2]) /
                      (std::fabs(lastPiece[0]) + std::fabs(lastPiece[1]) + std::fabs(lastPiece[2]));
  CHECK(pieceError > 0.1);

  // A membrane current carried by no dynamic ion anywhere in the tree: no balance to report.
  std::string fixedLeak = spec;
  fixedLeak.replace(fixedLeak.find("Pump 20 uA/cm2 }"), 16, "Pump 20 uA/cm2  Fixed 0.01 mS/cm2 }");
  fixedLeak += "channel Fixed { reversal -70 mV }\n";
  Run partial = simulateSpec(fixedLeak);
  REQUIRE_FALSE(partial.failure.failed);
  CHECK(std::isnan(partial.stats.chargeBalanceError));
}

TEST_CASE("a run that goes numerically wrong stops with the time and the variable", "[simulate]") {
  // A channel with an absurd density makes V explode with forward-stepping RK4.
  Run r = simulateSpec("temperature 20 degC\n"
                       "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -20 mV\n"
                       "  membrane { L 1e7 mS/cm2 }\n}\n"
                       "channel L { reversal -70 mV }\n"
                       "protocol p {\n  method rk4 step 100 us\n  duration 5 ms\n}\n");
  REQUIRE(r.failure.failed);
  CHECK(r.failure.variable == "c.V");
  CHECK(r.failure.time > 0);
  CHECK(r.failure.time <= 5e-3);
}

TEST_CASE("the Rosenbrock method takes large steps through a stiff gate", "[simulate]") {
  // A gate with a 1 us time constant following V: explicit RK4 at 100 us is unstable
  // (|1 + z + z^2/2 + z^3/6 + z^4/24| > 1 for z = -100); the L-stable ROS2 starting from the
  // same step is stable and agrees with Dormand-Prince at a tight tolerance.
  std::string base =
      "use std.math\ntemperature 20 degC\n"
      "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -20 mV\n  membrane { L 1 mS/cm2 }\n}\n"
      "channel L {\n  reversal -70 mV\n  gate x { steady = logistic((V + 40 mV) / 10 mV); tau = 1 us }\n}\n";
  auto protocol = [](const std::string &method) {
    return "protocol p {\n  method " + method + "\n  duration 5 ms\n  record c.V every 0.1 ms\n}\n";
  };
  Run rk4 = simulateSpec(base + protocol("rk4 step 100 us"));
  CHECK(rk4.failure.failed);
  Run ros = simulateSpec(base + protocol("rosenbrock step 100 us tolerance 1e-6"));
  Run dp = simulateSpec(base + protocol("dormand_prince step 1 us tolerance 1e-11"));
  REQUIRE_FALSE(ros.failure.failed);
  REQUIRE_FALSE(dp.failure.failed);
  REQUIRE(ros.trace.time.size() == dp.trace.time.size());
  for (size_t i = 0; i < ros.trace.time.size(); ++i)
    CHECK_THAT(ros.trace.at(i, 0), WithinAbs(dp.trace.at(i, 0), 1e-2));
}
