// PieceSplit.tests.cpp - a tree's kernel split by kind of piece computes what the model's one
// kernel computes: bit for bit when both are interpreted, to libmvec's rounding in SIMD lanes;
// alike pieces share one small kernel, and a kernel that couples compartments is not split.
#include "PieceSplit.h"
#include "Interpret.h"
#include "JIT.h"
#include "KernelPlan.h"
#include "TestSupport.h"

#include <cmath>
#include <cstring>
#include <random>

using namespace saltpan;

namespace {

// A soma and a gated cable of 12 pieces, with a current injected into one of them. Every
// number is invented.
ir::Model lowerTree(const std::string &method) {
  std::string text = "temperature 6.3 degC\n"
                     "channel L { reversal -54.4 mV }\n"
                     "channel K {\n  reversal -77 mV\n  gate n power 4 {\n"
                     "    opening = 0.01 /ms/mV * (V + 55 mV) / (1 - exp(-(V + 55 mV) / 10 mV))\n"
                     "    closing = 0.125 /ms * exp(-(V + 65 mV) / 80 mV)\n  }\n}\n"
                     "compartment soma {\n  sphere diameter 20 um\n  capacitance 1 uF/cm2\n"
                     "  initial V = -65 mV\n  membrane { L 0.3 mS/cm2  K 36 mS/cm2 }\n}\n"
                     "cable dend {\n  grows from soma\n  length 300 um\n  diameter 2 um\n"
                     "  axial resistivity 100 ohm*cm\n  pieces 12\n}\n"
                     "protocol p {\n  method ";
  text += method; // (one + chain of literals and a string trips GCC 12's -Wrestrict)
  text += "\n  duration 2 ms\n  inject dend at 50 % 0.05 nA from 0.5 ms to 1 ms\n"
          "  record soma.V, dend.V at 100 % every 0.1 ms\n}\n";
  auto c = testing::compile(text);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  REQUIRE(c->lowered.size() == 1);
  return c->lowered.begin()->second;
}

std::vector<double> randomState(const ir::Model &m, unsigned seed) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> volts(-0.09, 0.03), fraction(0, 1);
  std::vector<double> y = m.initialState;
  for (const ir::Compartment &c : m.compartments)
    y[c.voltageState] = volts(rng);
  for (const ir::Gate &g : m.gates)
    y[g.state] = fraction(rng);
  return y;
}

size_t memberCount(const std::vector<PieceClass> &classes) {
  size_t n = 0;
  for (const PieceClass &cls : classes)
    n += cls.members.size();
  return n;
}

// A split's kernels (and its rest) interpreted, behind one runner.
struct InterpretedSplit {
  std::vector<std::unique_ptr<Interpreter>> interpreters;
  PieceRunner runner;
  explicit InterpretedSplit(PieceSplit split) : runner(make(std::move(split))) {}

private:
  PieceRunner make(PieceSplit split) {
    auto shared = std::make_shared<const PieceSplit>(std::move(split));
    std::vector<std::vector<PieceRunner::ClassKernel>> kernels(kernelPartCount);
    for (int part = 0; part < kernelPartCount; ++part)
      for (const PieceClass &cls : shared->parts[part]) {
        interpreters.push_back(std::make_unique<Interpreter>(cls.kernel));
        kernels[part].push_back({KernelRef{nullptr, interpreters.back().get(), nullptr}, 1});
      }
    KernelRef rest;
    if (shared->rest) {
      interpreters.push_back(std::make_unique<Interpreter>(*shared->rest));
      rest.interpreter = interpreters.back().get();
    }
    return PieceRunner(shared, kernels, rest);
  }
};

} // namespace

TEST_CASE("alike pieces share one kernel; the stimulated piece has its own", "[pieces]") {
  ir::Model m = lowerTree("crank_nicolson step 25 us");
  auto split = splitByPiece(m, {KernelPart::Rates, KernelPart::Currents});
  REQUIRE(split);
  for (KernelPart part : {KernelPart::All, KernelPart::Rates, KernelPart::Currents}) {
    INFO(kernelPartName(part));
    CHECK(split->prepared[static_cast<int>(part)]);
    CHECK(memberCount(split->classes(part)) == m.compartments.size());
  }
  CHECK_FALSE(split->prepared[static_cast<int>(KernelPart::Dynamics)]);
  // The soma is a sphere and the pieces are cylinders, but their kernels are per unit area.
  const std::vector<PieceClass> &all = split->classes(KernelPart::All);
  REQUIRE(all.size() == 2);
  CHECK(all[0].members.size() == 12);
  CHECK(all[1].members.size() == 1);
  // The membrane currents hold no stimulus window: the stimulated piece's currents differ only
  // in the injected term, which is in iOther, so it keeps a class of its own there too.
  CHECK(split->classes(KernelPart::Currents).size() == 2);
  // The small kernels are far smaller than the model's.
  CHECK(all[0].kernel.nodes().size() * 5 < m.kernel.nodes().size());
}

TEST_CASE("interpreted piece kernels compute what the model's kernel computes, bit for bit", "[pieces]") {
  for (const char *method : {"crank_nicolson step 25 us", "rk4 step 10 us"}) {
    INFO(method);
    ir::Model m = lowerTree(method);
    auto split = splitByPiece(m, {KernelPart::Dynamics, KernelPart::Rates, KernelPart::Currents});
    REQUIRE(split);
    InterpretedSplit interpreted(std::move(*split));
    PieceRunner &runner = interpreted.runner;
    Interpreter whole(m.kernel);
    size_t n = m.kernel.outputs.size();
    for (unsigned seed = 1; seed <= 5; ++seed) {
      std::vector<double> y = randomState(m, seed), expected(n), got(n, NAN);
      for (double t : {0.0, 0.7e-3}) { // outside and inside the injection
        whole.run(y.data(), m.params.data(), t, expected.data());
        runner.run(y.data(), m.params.data(), t, got.data(), KernelPart::All);
        for (size_t o = 0; o < n; ++o) {
          INFO("output " << o << " at t = " << t);
          CHECK(std::memcmp(&got[o], &expected[o], sizeof(double)) == 0);
        }
        // A part writes its own outputs exactly and leaves the others alone.
        for (KernelPart part : {KernelPart::Dynamics, KernelPart::Rates, KernelPart::Currents}) {
          std::vector<double> partial(n, NAN);
          runner.run(y.data(), m.params.data(), t, partial.data(), part);
          size_t written = 0;
          for (size_t o = 0; o < n; ++o)
            if (!std::isnan(partial[o])) {
              ++written;
              CHECK(partial[o] == expected[o]);
            }
          CHECK(written > 0);
          CHECK(written < n);
        }
        for (const ir::Compartment &c : m.compartments) { // what an implicit step reads
          std::vector<double> rates(n, NAN), currents(n, NAN);
          runner.run(y.data(), m.params.data(), t, rates.data(), KernelPart::Rates);
          runner.run(y.data(), m.params.data(), t, currents.data(), KernelPart::Currents);
          CHECK(currents[c.gOutput] == expected[c.gOutput]);
          CHECK(currents[c.iOtherOutput] == expected[c.iOtherOutput]);
          CHECK(rates[c.injectedOutput] == expected[c.injectedOutput]);
        }
      }
    }
  }
}

TEST_CASE("an implicit step's fused piece part moves gates and reads currents as the stepper does, bit for bit",
          "[pieces]") {
  ir::Model m = lowerTree("crank_nicolson step 25 us");
  double dt = 25e-6;
  CHECK_FALSE(splitByPiece(m, {KernelPart::Step})->prepared[static_cast<int>(KernelPart::Step)]); // no step given
  auto split = splitByPiece(m, {KernelPart::Step}, dt);
  REQUIRE(split);
  REQUIRE(split->prepared[static_cast<int>(KernelPart::Step)]);
  CHECK(memberCount(split->classes(KernelPart::Step)) == m.compartments.size());
  InterpretedSplit interpreted(std::move(*split));
  PieceRunner &runner = interpreted.runner;
  Interpreter whole(m.kernel);
  size_t n = m.kernel.outputs.size(), states = m.stateNames.size();
  for (unsigned seed = 1; seed <= 3; ++seed)
    for (double t : {0.0, 0.49e-3}) { // the second starts before the injection, its middle is inside
      INFO("seed " << seed << ", t = " << t);
      std::vector<double> y = randomState(m, seed), start(n), middle(n), got(states + n, NAN);
      whole.run(y.data(), m.params.data(), t, start.data());
      std::vector<double> moved = y; // FixedStepper::gatesAndPools, written out
      for (const ir::Gate &g : m.gates)
        moved[g.state] = start[g.infOutput] + (y[g.state] - start[g.infOutput]) * std::exp(-dt / start[g.tauOutput]);
      whole.run(moved.data(), m.params.data(), t + 0.5 * dt, middle.data());
      runner.run(y.data(), m.params.data(), t, got.data(), KernelPart::Step);
      for (const ir::Gate &g : m.gates)
        CHECK(std::memcmp(&got[g.state], &moved[g.state], sizeof(double)) == 0);
      for (const ir::Compartment &c : m.compartments) {
        for (int o : {c.gOutput, c.geOutput, c.iOtherOutput})
          CHECK(std::memcmp(&got[states + o], &middle[o], sizeof(double)) == 0);
        CHECK(got[states + c.injectedOutput] == start[c.injectedOutput]);
        CHECK(std::isnan(got[c.voltageState])); // V is the tree solve's, not the pieces'
      }
    }
}

TEST_CASE("native piece kernels in SIMD lanes agree with the model's kernel to rounding", "[pieces][jit]") {
  std::string error;
  std::unique_ptr<JIT> jit = JIT::create(error);
  INFO(error);
  REQUIRE(jit);
  ir::Model m = lowerTree("crank_nicolson step 25 us");
  KernelPlan plan = planKernels(m, KernelUse::Run);
  REQUIRE(plan.pieces);
  CHECK(plan.pieceLanes == hostVectorLanes());
  PlannedKernels kernels(plan,
                         [&](const ir::Kernel &k, int lanes, std::string &why) { return jit->compile(k, lanes, why); });
  INFO(kernels.compileError());
  REQUIRE(kernels.native());
  KernelFn whole = jit->compile(m.kernel, error);
  REQUIRE(whole);
  size_t n = m.kernel.outputs.size();
  std::vector<double> y = randomState(m, 7), expected(n), got(n);
  whole(y.data(), m.params.data(), 0.7e-3, expected.data());
  kernels.plain()(y.data(), m.params.data(), 0.7e-3, got.data());
  for (size_t o = 0; o < n; ++o) {
    INFO("output " << o);
    CHECK(std::fabs(got[o] - expected[o]) <= 1e-13 * std::max(1.0, std::fabs(expected[o])));
  }
}

TEST_CASE("a kernel whose outputs read another compartment's state is not split", "[pieces]") {
  ir::Model m;
  m.stateNames = {"a.V", "b.V"};
  m.initialState = {0, 0};
  m.paramNames = {"a.capacitance", "b.capacitance"};
  m.params = {0.01, 0.01};
  ir::Kernel &k = m.kernel;
  ir::NodeId va = k.state(0), vb = k.state(1), zero = k.constant(0);
  const std::string names[2] = {"a", "b"};
  for (int i = 0; i < 2; ++i) {
    ir::Compartment c;
    c.name = names[i];
    c.voltageState = i;
    c.capacitanceParam = i;
    c.gOutput = k.addOutput(k.constant(1));
    c.geOutput = k.addOutput(i == 0 ? vb : va); // each reads the other's potential
    c.iOtherOutput = k.addOutput(zero);
    c.injectedOutput = k.addOutput(zero);
    m.compartments.push_back(c);
  }
  m.junctions.push_back({0, 1, 1e-9});
  CHECK_FALSE(splitByPiece(m, {KernelPart::Currents}));
  m.kernel.outputs[1] = va; // now each reads its own
  m.kernel.outputs[5] = vb;
  CHECK(splitByPiece(m, {KernelPart::Currents}));
}
