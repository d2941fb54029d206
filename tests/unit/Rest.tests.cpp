// Rest.tests.cpp - steady states and their stability (`saltpan rest`), and the eigenvalue
// routine behind it.
#include "Analyze.h"
#include "Lower.h"
#include "Rest.h"
#include "TestSupport.h"

#include <algorithm>
#include <cmath>
#include <complex>

using namespace saltpan;

namespace {

// Lowers a compilation without a protocol (no injected current), as `saltpan rest` does.
ir::Model lowerForRest(Compilation &c) {
  INFO(testing::allDiagnostics(c));
  REQUIRE(c.checked);
  ir::Model model;
  REQUIRE(lowerModel(c.program, c.model, c.evaluator, nullptr, c.diags, model));
  return model;
}

double gate(const rest::SteadyState &s, const std::string &name) {
  for (const rest::Named &g : s.gates)
    if (g.name == name)
      return g.value;
  FAIL("no gate " << name);
  return NAN;
}

} // namespace

TEST_CASE("eigenvalues of small real matrices", "[rest]") {
  using C = std::complex<double>;
  SECTION("1 x 1 and diagonal") {
    CHECK(testing::sameSpectrum(rest::eigenvalues({-3}, 1), {C(-3)}, 1e-14));
    CHECK(testing::sameSpectrum(rest::eigenvalues({2, 0, 0, 0, -5, 0, 0, 0, 7}, 3), {C(2), C(-5), C(7)}, 1e-12));
  }
  SECTION("a rotation: a complex pair") {
    CHECK(testing::sameSpectrum(rest::eigenvalues({0, -1, 1, 0}, 2), {C(0, 1), C(0, -1)}, 1e-14));
  }
  SECTION("a companion matrix with known roots, real and complex") {
    // (x - 1)(x - 2)(x - 3)(x + 4)(x^2 + 2x + 5): roots 1, 2, 3, -4, -1 +- 2i.
    // Coefficients of x^6 + c5 x^5 + ... + c0, multiplied out by hand and checked at x = 1.
    // (x-1)(x-2)(x-3)(x+4) = x^4 - 2x^3 - 13x^2 + 38x - 24
    // times (x^2 + 2x + 5) = x^6 + 0x^5 - 12x^4 + 2x^3 - 13x^2 + 142x - 120
    std::vector<double> c = {-120, 142, -13, 2, -12, 0}; // c0..c5
    int n = 6;
    std::vector<double> a(n * n, 0.0);
    for (int i = 1; i < n; ++i)
      a[i * n + (i - 1)] = 1; // subdiagonal
    for (int i = 0; i < n; ++i)
      a[i * n + (n - 1)] = -c[i]; // last column
    CHECK(testing::sameSpectrum(rest::eigenvalues(a, n), {C(1), C(2), C(3), C(-4), C(-1, 2), C(-1, -2)}, 1e-9));
  }
  SECTION("badly scaled entries, as in a Jacobian in SI units") {
    // diag(1e-3, 1e3) similarity of [[-1, 2], [-3, -4]]: eigenvalues -2.5 +- i sqrt(15)/2.
    std::vector<double> a = {-1, 2e-6, -3e6, -4};
    double im = std::sqrt(15.0) / 2;
    CHECK(testing::sameSpectrum(rest::eigenvalues(a, 2), {C(-2.5, im), C(-2.5, -im)}, 1e-9));
  }
}

TEST_CASE("the HH 1952 squid axon has one stable steady state", "[rest]") {
  Compilation c;
  compileFile(SALTPAN_SOURCE_DIR "/specs/reference/squid_axon_1952.saltpan", c);
  ir::Model model = lowerForRest(c);
  auto result = rest::findSteadyStates(model, &c.model);
  REQUIRE(result.size() == 1);
  const rest::CompartmentRest &axon = result[0];
  CHECK(axon.name == "axon");
  CHECK_FALSE(axon.passivePermeability);
  CHECK_FALSE(axon.ghkRest.has_value());
  REQUIRE(axon.steadyStates.size() == 1);
  const rest::SteadyState &s = axon.steadyStates[0];
  // Rest at I = 0: -64.996379 mV (computed, docs/references.md), within 1e-5 mV.
  CHECK(s.v * 1e3 == Approx(-64.996379).margin(1e-5));
  CHECK(s.stable);
  CHECK(s.maxRealEigenvalue < 0);
  REQUIRE(s.eigenvalues.size() == 4); // V, m, h, n
  // m, h, n at -65 mV: 0.052932, 0.596121, 0.317677 (computed, docs/references.md). The rest is
  // 3.6 uV away from -65 mV, which moves them by less than 2e-4.
  CHECK(gate(s, "SquidSodium1952.m") == Approx(0.052932).margin(2e-4));
  CHECK(gate(s, "SquidSodium1952.h") == Approx(0.596121).margin(2e-4));
  CHECK(gate(s, "SquidPotassium1952.n") == Approx(0.317677).margin(2e-4));
  // The membrane entries' currents sum to the total, which is zero at a steady state.
  double sum = 0;
  for (const rest::Named &i : s.currents)
    sum += i.value;
  CHECK(s.currents.size() == 3);
  CHECK(sum == Approx(s.totalCurrent).margin(1e-9));
  CHECK(std::fabs(s.totalCurrent) < 1e-8); // uA/cm2
}

TEST_CASE("a passive GHK membrane rests at its GHK potential", "[rest]") {
  // Two ungated permeability leaks; the GHK voltage equation (Goldman 1943; Hodgkin & Katz
  // 1949) gives the zero-current potential, which the analysis computes independently.
  auto c = testing::compile(R"(model PassiveGhk "two permeability leaks, test only"
use std.ions
temperature 37 degC
outside bath {
  [Na] = 145 mM
  [K] = 4.5 mM
  [Cl] = 116 mM
  impermeant 33.5 mM valence -1
}
compartment soma {
  sphere diameter 20 µm
  capacitance 1 uF/cm2
  initial V = -65 mV
  outside bath
  inside { [Na] = 11 mM  [K] = 138 mM  [Cl] = 9 mM  impermeant 140 mM valence -1 }
  membrane {
    KLeak 1e-6 cm/s
    NaLeak 4e-8 cm/s
  }
}
channel KLeak { carries K }
channel NaLeak { carries Na }
)");
  ir::Model model = lowerForRest(*c);
  auto result = rest::findSteadyStates(model, &c->model);
  REQUIRE(result.size() == 1);
  const rest::CompartmentRest &soma = result[0];
  CHECK(soma.passivePermeability);
  REQUIRE(soma.ghkRest.has_value());
  REQUIRE(soma.steadyStates.size() == 1);
  const rest::SteadyState &s = soma.steadyStates[0];
  CHECK(s.stable);
  CHECK(s.gates.empty());
  CHECK(s.v * 1e3 == Approx(*soma.ghkRest * 1e3).margin(1e-6));
  // And both agree with the formula written out: RT/F ln((pK Ko + pNa Nao) / (pK Ki + pNa Nai)).
  double rtf = 8.31446261815324 * 310.15 / 96485.33212331001;
  double want = rtf * std::log((1e-6 * 4.5 + 4e-8 * 145) / (1e-6 * 138 + 4e-8 * 11));
  CHECK(s.v == Approx(want).margin(1e-9));
}

TEST_CASE("a persistent inward current makes the I-V curve bistable", "[rest]") {
  // Invented for this test (not a published model). With p at steady state the current is
  // I = 0.3 mS/cm2 (V + 70 mV) + 1 mS/cm2 p(V) (V - 50 mV), p = logistic((V + 45 mV)/4 mV):
  // zero near -69 mV (stable), near -59 mV (a saddle: unstable) and where p ~ 1 at
  // V = (50 - 21) / 1.3 mV = 22.3077 mV (stable).
  auto c = testing::compile(R"(model InventedBistable "invented: leak plus persistent inward current"
use std.math
temperature 20 degC
compartment cell {
  area 1 cm2
  capacitance 1 uF/cm2
  initial V = -70 mV
  membrane {
    InventedLeak 0.3 mS/cm2
    InventedPersistentInward 1 mS/cm2
  }
}
channel InventedLeak { reversal -70 mV }
channel InventedPersistentInward {
  reversal 50 mV
  gate p { steady = logistic((V + 45 mV) / 4 mV); tau = 1 ms }
}
)");
  ir::Model model = lowerForRest(*c);
  auto result = rest::findSteadyStates(model, &c->model);
  REQUIRE(result.size() == 1);
  const auto &states = result[0].steadyStates;
  REQUIRE(states.size() == 3);
  CHECK(states[0].v < states[1].v);
  CHECK(states[1].v < states[2].v);
  CHECK(states[0].v * 1e3 == Approx(-69).margin(1));
  CHECK(states[1].v * 1e3 == Approx(-59).margin(1));
  CHECK(states[0].stable);
  CHECK_FALSE(states[1].stable);
  CHECK(states[1].maxRealEigenvalue > 0);
  CHECK(states[2].stable);
  // logistic(67.3 / 4) = 1 - 5e-8: the root is 22.3077 mV to about 3e-6 mV.
  CHECK(states[2].v * 1e3 == Approx(29.0 / 1.3).margin(1e-4));
  // At the top state p ~ 1, so the eigenvalues are -1/tau = -1 /ms and -G/C = -1.3 /ms.
  REQUIRE(states[2].eigenvalues.size() == 2);
  CHECK(testing::sameSpectrum(states[2].eigenvalues, {std::complex<double>(-1000), std::complex<double>(-1300)}, 1.0));
  for (const auto &s : states)
    CHECK(std::fabs(s.totalCurrent) < 1e-8);
}

TEST_CASE("the scanned range limits the steady states found", "[rest]") {
  Compilation c;
  compileFile(SALTPAN_SOURCE_DIR "/specs/reference/squid_axon_1952.saltpan", c);
  ir::Model model = lowerForRest(c);
  rest::Options o;
  o.from = -0.060;
  o.to = 0.0;
  auto result = rest::findSteadyStates(model, &c.model, o);
  REQUIRE(result.size() == 1);
  CHECK(result[0].steadyStates.empty());
}

TEST_CASE("the input resistance of a passive patch is 1 / (g area)", "[rest]") {
  // A 0.5 mS/cm2 leak over 1000 um2: R_in = 1 / (0.5 mS/cm2 * 1e-5 cm2) = 200 Mohm
  // (common practice: Ohm's law for a passive membrane).
  auto c = testing::compile("temperature 20 degC\n"
                            "compartment c {\n  area 1000 um2\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                            "  membrane { L 0.5 mS/cm2 }\n}\n"
                            "channel L { reversal -60 mV }\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  ir::Model m = lowerForRest(*c);
  auto found = rest::findSteadyStates(m, &c->model);
  REQUIRE(found.size() == 1);
  REQUIRE(found[0].steadyStates.size() == 1);
  const rest::SteadyState &s = found[0].steadyStates[0];
  CHECK_THAT(s.v, Catch::Matchers::WithinAbs(-0.060, 1e-12));
  CHECK_THAT(s.slopeConductance, Catch::Matchers::WithinRel(5.0, 1e-6)); // S/m2
  REQUIRE(s.inputResistance.has_value());
  CHECK_THAT(*s.inputResistance, Catch::Matchers::WithinRel(200e6, 1e-6));
}
