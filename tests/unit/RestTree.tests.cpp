// RestTree.tests.cpp - steady states of joined compartments (cables) solved as one tree, against
// the closed forms of passive cable theory, and the tree's Jacobian against a dense one.
#include "Derivative.h"
#include "FixedStep.h"
#include "Interpret.h"
#include "Rest.h"
#include "TestSupport.h"

#include <algorithm>
#include <cmath>
#include <complex>

using namespace saltpan;

namespace {

constexpr double pi = 3.14159265358979323846;

// The model `saltpan rest` analyses: lowered without a protocol.
const ir::Model &restModel(Compilation &c) {
  INFO(testing::allDiagnostics(c));
  REQUIRE(c.checked);
  const ir::Model *m = c.unstimulated();
  REQUIRE(m);
  return *m;
}

// The one tree of a model and its one steady state.
const rest::TreeSteadyState &onlyState(const std::vector<rest::TreeRest> &trees) {
  REQUIRE(trees.size() == 1);
  REQUIRE(trees[0].lost.empty());
  REQUIRE(trees[0].steadyStates.size() == 1);
  return trees[0].steadyStates[0];
}

const rest::PieceRest &piece(const rest::TreeSteadyState &s, const std::string &name) {
  for (const rest::PieceRest &p : s.pieces)
    if (p.name == name)
      return p;
  FAIL("no piece " << name);
  return s.pieces[0];
}

// A soma with leak reversal `somaE` and a sealed cable of `pieces` pieces with leak reversal
// -60 mV: lambda = sqrt(d Rm / (4 Ri)) = sqrt(2 um * 20 kOhm cm2 / (4 * 100 Ohm cm)) = 1 mm,
// length 500 um (L / lambda = 0.5); the soma a 20 um sphere with 0.5 mS/cm2.
std::string somaAndCable(int pieces, const char *somaE) {
  return std::string("model SomaCable \"invented for the tree rest tests\"\n"
                     "temperature 20 degC\n"
                     "channel SomaLeak { reversal ") +
         somaE +
         " }\n"
         "channel DendLeak { reversal -60 mV }\n"
         "compartment soma {\n  sphere diameter 20 um\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n"
         "  membrane { SomaLeak 0.5 mS/cm2 }\n}\n"
         "cable dend {\n  grows from soma\n  length 500 um\n  diameter 2 um\n  axial resistivity 100 ohm*cm\n"
         "  pieces " +
         std::to_string(pieces) + "\n  membrane { DendLeak 0.05 mS/cm2 }\n}\n";
}

// The largest error of the discretised tree against the closed form of a finite cable with a
// sealed end on a lumped soma (Rall 1959/1969; Jack, Noble & Tsien 1975, from memory): along the
// cable V(x) = Ed + (V0 - Ed) cosh((L - x)/lambda) / cosh(L/lambda), and the soma balances its
// leak against the cable's input conductance G_c = tanh(L/lambda) / (r_a lambda), r_a = 4 Ri /
// (pi d^2): V0 = (Gs Es + Gc Ed) / (Gs + Gc). Also returns the soma's input resistance.
struct CableCheck {
  double maxError = 0; // V
  double inputResistance = 0, expectedResistance = 0;
};

CableCheck checkSomaAndCable(int pieces) {
  auto c = testing::compile(somaAndCable(pieces, "-70 mV"));
  auto trees = rest::findTreeSteadyStates(restModel(*c), &c->model);
  const rest::TreeSteadyState &s = onlyState(trees);
  const double es = -0.070, ed = -0.060, d = 2e-6, ri = 1.0, gd = 0.5, length = 500e-6;
  const double lambda = std::sqrt(d / (4 * ri * gd)), ra = 4 * ri / (pi * d * d);
  const double gs = 5.0 * pi * 20e-6 * 20e-6, gc = std::tanh(length / lambda) / (ra * lambda);
  const double v0 = (gs * es + gc * ed) / (gs + gc);
  CableCheck out;
  out.maxError = std::fabs(piece(s, "soma").v - v0);
  const double h = length / pieces;
  for (int k = 0; k < pieces; ++k) {
    double x = (k + 0.5) * h;
    double want = ed + (v0 - ed) * std::cosh((length - x) / lambda) / std::cosh(length / lambda);
    out.maxError = std::max(out.maxError, std::fabs(piece(s, "dend[" + std::to_string(k) + "]").v - want));
  }
  REQUIRE(piece(s, "soma").inputResistance.has_value());
  out.inputResistance = *piece(s, "soma").inputResistance;
  out.expectedResistance = 1 / (gs + gc);
  return out;
}

} // namespace

TEST_CASE("a passive uniform tree rests at its leak reversal everywhere", "[rest][cables]") {
  Compilation c;
  compileFile(SALTPAN_SOURCE_DIR "/tests/golden/cables/branched_cell.saltpan", c);
  const ir::Model &model = restModel(c);
  auto trees = rest::findTreeSteadyStates(model, &c.model);
  const rest::TreeSteadyState &s = onlyState(trees);
  const rest::TreeRest &tree = trees[0];
  REQUIRE(s.pieces.size() == model.compartments.size()); // soma, 50 + 10 pieces
  CHECK(tree.states == 61);                              // V only: the leak has no gates
  for (const rest::PieceRest &p : s.pieces) {
    CHECK(p.v == Approx(-0.065).margin(1e-12));
    CHECK(std::fabs(p.membraneCurrent) < 1e-9);
  }
  REQUIRE(tree.cables.size() == 2);
  CHECK(tree.cables[0].name == "dend");
  CHECK(tree.cables[0].growsFrom == "soma");
  CHECK(tree.cables[0].pieces == 50);
  CHECK(tree.cables[1].name == "branch");
  CHECK(tree.cables[1].growsFrom == "dend");
  // The uniform mode relaxes with the membrane's time constant C / g = 20 ms exactly; every
  // other mode is faster (the axial current adds to the leak).
  REQUIRE(s.stabilityAssessed);
  CHECK(s.stable);
  REQUIRE(s.eigenvalues.size() == 61);
  CHECK(s.maxRealEigenvalue == Approx(-50).epsilon(1e-6));
  CHECK(s.eigenvalues[1].real() < -51);
  CHECK(s.maxResidual < 1e-12); // A/m2
}

TEST_CASE("a soma on a sealed cable rests where cable theory puts it", "[rest][cables]") {
  CableCheck coarse = checkSomaAndCable(50), fine = checkSomaAndCable(100);
  // Second order in the piece length: with 5 um pieces (L/100) the error is about the ~7 mV
  // deviation from Ed times (h / lambda)^2 / 12 = 2e-6, and halving the pieces quarters it.
  CHECK(fine.maxError < 1e-7);
  CHECK(coarse.maxError / fine.maxError == Approx(4).epsilon(0.1));
  CHECK(fine.inputResistance == Approx(fine.expectedResistance).epsilon(1e-5));
}

TEST_CASE("a passive free cable's eigenvalues are its sealed-end modes", "[rest][cables]") {
  // tau_n = tau_m / (1 + (n pi lambda / L)^2) for a cable sealed at both ends (Rall 1969, from
  // memory); lambda = 1 mm = L, tau_m = 20 ms. 100 pieces resolve the slowest modes to 1e-3.
  auto c = testing::compile("model FreeCable \"invented for the tree rest tests\"\n"
                            "temperature 20 degC\n"
                            "channel Leak { reversal -65 mV }\n"
                            "cable axon {\n  length 1000 um\n  diameter 2 um\n  axial resistivity 100 ohm*cm\n"
                            "  pieces 100\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
                            "  membrane { Leak 0.05 mS/cm2 }\n}\n");
  auto trees = rest::findTreeSteadyStates(restModel(*c), &c->model);
  const rest::TreeSteadyState &s = onlyState(trees);
  CHECK(piece(s, "axon[37]").v == Approx(-0.065).margin(1e-12));
  REQUIRE(s.eigenvalues.size() == 100);
  for (int n = 0; n < 4; ++n) {
    double tau = 0.020 / (1 + n * n * pi * pi);
    CHECK(s.eigenvalues[static_cast<size_t>(n)].real() == Approx(-1 / tau).epsilon(1e-3));
    CHECK(s.eigenvalues[static_cast<size_t>(n)].imag() == 0);
  }
  CHECK(s.maxRealEigenvalue == Approx(-50).epsilon(1e-9));
}

TEST_CASE("a uniform bistable cable has the steady states of one of its patches", "[rest][cables]") {
  // The invented bistable membrane of Rest.tests.cpp on a soma and a cable: uniform trees.
  const std::string membrane =
      "  membrane {\n    InventedLeak 0.3 mS/cm2\n    InventedPersistentInward 1 mS/cm2\n  }\n";
  auto c = testing::compile("model InventedBistable \"invented: leak plus persistent inward current\"\n"
                            "use std.math\ntemperature 20 degC\n"
                            "compartment cell {\n  sphere diameter 20 um\n  capacitance 1 uF/cm2\n"
                            "  initial V = -70 mV\n" +
                            membrane +
                            "}\n"
                            "cable dend { grows from cell length 300 um diameter 2 um axial resistivity 100 ohm*cm "
                            "pieces 12 }\n"
                            "channel InventedLeak { reversal -70 mV }\n"
                            "channel InventedPersistentInward {\n  reversal 50 mV\n"
                            "  gate p { steady = logistic((V + 45 mV) / 4 mV); tau = 1 ms }\n}\n");
  const ir::Model &model = restModel(*c);
  auto trees = rest::findTreeSteadyStates(model, &c->model);
  REQUIRE(trees.size() == 1);
  const auto &states = trees[0].steadyStates;
  REQUIRE(states.size() == 3);
  CHECK(trees[0].lost.empty());
  CHECK(states[0].stable);
  CHECK_FALSE(states[1].stable);
  CHECK(states[2].stable);
  CHECK(states[2].pieces[0].v * 1e3 == Approx(29.0 / 1.3).margin(1e-4));
  for (const auto &s : states)
    for (const rest::PieceRest &p : s.pieces)
      CHECK(p.v == Approx(s.pieces[0].v).margin(1e-12));
}

TEST_CASE("an HH cable's Jacobian is the dense one of all its states", "[rest][cables]") {
  // The HH 1952 membrane on a soma and a cable: uniform, so every piece rests at the patch's
  // -64.996379 mV (docs/references.md); the tree's spectrum equals that of a Jacobian taken
  // column by column over every state of the model, axial currents included.
  auto c = testing::compile("model HHCable \"invented geometry, HH 1952 membrane\"\n"
                            "use std.ions\nuse std.math\nuse std.hh1952\ntemperature 6.3 degC\n"
                            "compartment soma {\n  sphere diameter 30 um\n  capacitance 1 uF/cm2\n"
                            "  initial V = -65 mV\n  membrane {\n"
                            "    SquidSodium1952 120 mS/cm2 reversal 50 mV\n"
                            "    SquidPotassium1952 36 mS/cm2 reversal -77 mV\n"
                            "    SquidLeak1952 0.3 mS/cm2 reversal -54.387 mV\n  }\n}\n"
                            "cable axon { grows from soma length 200 um diameter 2 um axial resistivity 35.4 ohm*cm "
                            "pieces 5 }\n");
  const ir::Model &model = restModel(*c);
  auto trees = rest::findTreeSteadyStates(model, &c->model);
  const rest::TreeSteadyState &s = onlyState(trees);
  REQUIRE(trees[0].states == 24);
  for (const rest::PieceRest &p : s.pieces)
    CHECK(p.v * 1e3 == Approx(-64.996379).margin(1e-5));

  std::vector<double> y = model.initialState;
  for (const rest::PieceRest &p : s.pieces) {
    for (const ir::Compartment &comp : model.compartments)
      if (comp.name == p.name)
        y[static_cast<size_t>(comp.voltageState)] = p.v;
    for (const rest::Named &g : p.gates)
      for (const ir::Gate &gate : model.gates)
        if (gate.name == p.name + "." + g.name)
          y[static_cast<size_t>(gate.state)] = g.value;
  }
  const size_t n = y.size();
  REQUIRE(n == 24);
  Interpreter interpreter(model.kernel);
  std::vector<double> out(model.kernel.outputs.size()), plus(n), minus(n), jac(n * n);
  for (size_t j = 0; j < n; ++j) {
    for (double sign : {1.0, -1.0}) {
      std::vector<double> x = y;
      x[j] += sign * 1e-7;
      interpreter.run(x.data(), model.params.data(), 0, out.data());
      stateDerivative(model, model.params.data(), x.data(), out.data(), sign > 0 ? plus.data() : minus.data());
    }
    for (size_t i = 0; i < n; ++i)
      jac[i * n + j] = (plus[i] - minus[i]) / 2e-7;
  }
  auto dense = rest::eigenvalues(jac, static_cast<int>(n));
  double scale = 0;
  for (auto e : dense)
    scale = std::max(scale, std::abs(e));
  CHECK(testing::sameSpectrum(s.eigenvalues, dense, 1e-6 * scale));
  CHECK(s.stable);
}

TEST_CASE("a lone compartment analysed as a tree of one agrees with the lone analysis", "[rest][cables]") {
  Compilation c;
  compileFile(SALTPAN_SOURCE_DIR "/specs/reference/squid_axon_1952.saltpan", c);
  const ir::Model &model = restModel(c);
  auto lone = rest::findSteadyStates(model, &c.model);
  auto trees = rest::findTreeSteadyStates(model, &c.model);
  const rest::TreeSteadyState &s = onlyState(trees);
  REQUIRE(lone.size() == 1);
  REQUIRE(lone[0].steadyStates.size() == 1);
  const rest::SteadyState &l = lone[0].steadyStates[0];
  CHECK(s.pieces[0].v == Approx(l.v).margin(1e-12));
  CHECK(testing::sameSpectrum(s.eigenvalues, l.eigenvalues, 1e-6));
  REQUIRE(s.pieces[0].inputResistance.has_value());
  CHECK(*s.pieces[0].inputResistance == Approx(*l.inputResistance).epsilon(1e-6));
  CHECK(s.pieces[0].slopeConductance == Approx(l.slopeConductance).epsilon(1e-6));
}

TEST_CASE("a tree above the eigenvalue limit is solved but its stability is not assessed", "[rest][cables]") {
  auto c = testing::compile("model LongCable \"invented for the tree rest tests\"\n"
                            "temperature 20 degC\n"
                            "channel Leak { reversal -65 mV }\n"
                            "cable axon {\n  length 10 mm\n  diameter 2 um\n  axial resistivity 100 ohm*cm\n"
                            "  pieces " +
                            std::to_string(rest::maxStatesForEigenvalues + 1) +
                            "\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
                            "  membrane { Leak 0.05 mS/cm2 }\n}\n");
  auto trees = rest::findTreeSteadyStates(restModel(*c), &c->model);
  const rest::TreeSteadyState &s = onlyState(trees);
  CHECK_FALSE(s.stabilityAssessed);
  CHECK(s.eigenvalues.empty());
  CHECK(s.pieces.back().v == Approx(-0.065).margin(1e-12));
}

TEST_CASE("a continuation that meets a fold is reported as not followed", "[rest][cables]") {
  // Invented: the bistable membrane, with a stronger inward current, on a soma with a passive
  // dendrite. Made isopotential the cell has three steady states; joined through the real axial
  // resistance of a 220 um dendrite only the depolarised one is left: the low state and the
  // saddle merge on the way (a fold), so both searches stop. With 260 um all three survive.
  auto spec = [](int length) {
    return "model Fold \"invented: a bistable soma on a passive dendrite\"\n"
           "use std.math\ntemperature 20 degC\n"
           "compartment cell {\n  sphere diameter 20 um\n  capacitance 1 uF/cm2\n  initial V = -70 mV\n"
           "  membrane {\n    InventedLeak 0.3 mS/cm2\n    InventedPersistentInward 3 mS/cm2\n  }\n}\n"
           "channel InventedLeak { reversal -70 mV }\n"
           "channel DendLeak { reversal -70 mV }\n"
           "channel InventedPersistentInward {\n  reversal 50 mV\n"
           "  gate p { steady = logistic((V + 45 mV) / 4 mV); tau = 1 ms }\n}\n"
           "cable dend { grows from cell length " +
           std::to_string(length) +
           " um diameter 1 um axial resistivity 100 ohm*cm pieces 40 membrane { DendLeak 0.3 mS/cm2 } }\n";
  };
  auto shortCell = testing::compile(spec(220));
  auto folded = rest::findTreeSteadyStates(restModel(*shortCell), &shortCell->model);
  REQUIRE(folded.size() == 1);
  REQUIRE(folded[0].steadyStates.size() == 1);
  CHECK(folded[0].steadyStates[0].pieces[0].v > 0.030);
  CHECK(folded[0].steadyStates[0].stable);
  REQUIRE(folded[0].lost.size() == 2);
  for (const rest::LostState &l : folded[0].lost) {
    CHECK(l.isopotentialV < -0.060);
    CHECK(l.why.find("fold") != std::string::npos);
  }

  auto longerCell = testing::compile(spec(260));
  auto all = rest::findTreeSteadyStates(restModel(*longerCell), &longerCell->model);
  REQUIRE(all.size() == 1);
  CHECK(all[0].lost.empty());
  REQUIRE(all[0].steadyStates.size() == 3);
  CHECK(all[0].steadyStates[0].stable);
  CHECK_FALSE(all[0].steadyStates[1].stable);
  CHECK(all[0].steadyStates[2].stable);
}
