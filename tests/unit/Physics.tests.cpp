// Physics.tests.cpp - constants, RT/F, Nernst and the GHK current and voltage equations.
#include "Physics.h"

#include <catch2/catch.hpp>

#include <cmath>

using namespace saltpan::physics;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;

namespace {
// CODATA 2018 exact constants (2019 SI): R = k_B N_A and F = e N_A, to double precision.
constexpr double R = 8.31446261815324;
constexpr double F = 96485.33212331001;
constexpr double body = 310.15; // 37 degC in kelvin (0 degC = 273.15 K exactly)
} // namespace

TEST_CASE("the 2019 SI constants", "[physics]") {
  // CODATA 2018 exact constants.
  CHECK(elementaryCharge == 1.602176634e-19);
  CHECK(avogadro == 6.02214076e23);
  CHECK(boltzmann == 1.380649e-23);
  CHECK_THAT(gasConstant, WithinRel(R, 1e-15));
  CHECK_THAT(faraday, WithinRel(F, 1e-15));
  CHECK(zeroCelsius == 273.15);
}

TEST_CASE("RT/F at 37 degC is 26.726659 mV", "[physics]") {
  // From the CODATA 2018 exact constants: 8.31446261815324 * 310.15 / 96485.33212331001.
  CHECK_THAT(thermalVoltage(body), WithinAbs(26.726659e-3, 1e-9));
  CHECK_THAT(thermalVoltage(body), WithinRel(R * body / F, 1e-14));
  // Linear in T.
  CHECK_THAT(thermalVoltage(2 * body), WithinRel(2 * thermalVoltage(body), 1e-15));
  // At 6.3 degC (279.45 K): CODATA 2018 exact constants.
  CHECK_THAT(thermalVoltage(279.45), WithinRel(R * 279.45 / F, 1e-14));
}

TEST_CASE("Nernst: value, sign and invariants", "[physics]") {
  // K+ with 4.5 mM outside and 138 mM inside at 37 degC; (RT/F) ln(4.5/138) from the
  // CODATA 2018 exact constants is -91.490 mV.
  double eK = nernst(1, 4.5, 138, body);
  CHECK_THAT(eK, WithinRel(R * body / F * std::log(4.5 / 138.0), 1e-14));
  CHECK_THAT(eK, WithinAbs(-91.490e-3, 1e-6));
  CHECK(eK < 0); // more inside than outside: a cation's reversal is negative
  // Na+ 145 out, 11 in: positive.
  CHECK(nernst(1, 145, 11, body) > 0);
  // Equal concentrations: zero.
  CHECK(nernst(1, 10, 10, body) == 0);
  CHECK(nernst(-1, 10, 10, body) == 0);
  // Swapping the sides flips the sign.
  CHECK_THAT(nernst(1, 138, 4.5, body), WithinRel(-eK, 1e-14));
  // An anion with the same gradient: the opposite sign.
  CHECK_THAT(nernst(-1, 4.5, 138, body), WithinRel(-eK, 1e-14));
  // A divalent ion: half the potential.
  CHECK_THAT(nernst(2, 4.5, 138, body), WithinRel(eK / 2, 1e-14));
  // Only the ratio matters.
  CHECK_THAT(nernst(1, 45, 1380, body), WithinRel(eK, 1e-13));
  // Ca2+ 2 mM outside, 100 nM inside: (RT/2F) ln(2e-3/1e-7) (CODATA 2018 exact constants).
  CHECK_THAT(nernst(2, 2.0, 1e-4, body), WithinRel(R * body / (2 * F) * std::log(2.0 / 1e-4), 1e-14));
}

TEST_CASE("GHK current at V = 0 is P z F (ci - co)", "[physics]") {
  // The V -> 0 limit of the GHK current equation (Goldman 1943; Hodgkin & Katz 1949).
  for (int z : {1, -1, 2, -2}) {
    INFO("z = " << z);
    PermeantIon ion{z, 1e-8, 140, 5};
    CHECK_THAT(ghkCurrent(ion, 0.0, body), WithinRel(1e-8 * z * F * (140 - 5), 1e-14));
    // Continuous through zero.
    CHECK_THAT(ghkCurrent(ion, 1e-7, body), WithinRel(ghkCurrent(ion, 0.0, body), 1e-4));
    CHECK_THAT(ghkCurrent(ion, -1e-7, body), WithinRel(ghkCurrent(ion, 0.0, body), 1e-4));
  }
}

TEST_CASE("GHK current: the closed form away from zero", "[physics]") {
  // I = P z^2 F^2 V/(RT) (ci - co e^(-zFV/RT)) / (1 - e^(-zFV/RT)) (Hodgkin & Katz 1949).
  PermeantIon ion{2, 2e-9, 1e-4, 2.0};
  for (double v : {-0.08, -0.01, 0.02, 0.06}) {
    INFO("V = " << v);
    double u = 2 * F * v / (R * body);
    double expected = 2e-9 * 2 * F * u * (1e-4 - 2.0 * std::exp(-u)) / (1 - std::exp(-u));
    CHECK_THAT(ghkCurrent(ion, v, body), WithinRel(expected, 1e-12));
  }
}

TEST_CASE("GHK current: outward positive, zero at the Nernst potential", "[physics]") {
  PermeantIon k{1, 1e-8, 138, 4.5};
  CHECK(ghkCurrent(k, 0.0, body) > 0);   // K+ leaves at rest potential 0
  CHECK(ghkCurrent(k, -0.15, body) < 0); // below E_K it enters
  double eK = nernst(1, 4.5, 138, body);
  double scale = std::fabs(ghkCurrent(k, 0.0, body));
  CHECK(std::fabs(ghkCurrent(k, eK, body)) < 1e-12 * scale);
  // An anion: Cl- (9 in, 116 out) at V = 0 carries outward current by moving inward.
  PermeantIon cl{-1, 1e-8, 9, 116};
  CHECK(ghkCurrent(cl, 0.0, body) > 0);
  // Finite at the ends of any plausible range.
  CHECK(std::isfinite(ghkCurrent(k, -1.0, body)));
  CHECK(std::isfinite(ghkCurrent(k, 1.0, body)));
}

TEST_CASE("GHK voltage equation for monovalent ions, to 1e-12 V", "[physics]") {
  // Relative permeabilities PK:PNa:PCl = 1:0.04:0.45 (Hodgkin & Katz 1949, squid axon;
  // from memory) with mammalian concentrations (common practice).
  double pK = 1e-8, pNa = 0.04e-8, pCl = 0.45e-8;
  double Ki = 138, Ko = 4.5, Nai = 11, Nao = 145, Cli = 9, Clo = 116;
  std::vector<PermeantIon> ions{{1, pK, Ki, Ko}, {1, pNa, Nai, Nao}, {-1, pCl, Cli, Clo}};
  auto v = ghkZeroCurrentPotential(ions, body);
  REQUIRE(v);
  // Goldman 1943 / Hodgkin & Katz 1949 voltage equation.
  double expected = R * body / F * std::log((pK * Ko + pNa * Nao + pCl * Cli) / (pK * Ki + pNa * Nai + pCl * Clo));
  CHECK_THAT(*v, WithinAbs(expected, 1e-12));

  // Without chloride, at 6.3 degC.
  std::vector<PermeantIon> two{{1, pK, Ki, Ko}, {1, pNa, Nai, Nao}};
  auto w = ghkZeroCurrentPotential(two, 279.45);
  REQUIRE(w);
  CHECK_THAT(*w, WithinAbs(R * 279.45 / F * std::log((pK * Ko + pNa * Nao) / (pK * Ki + pNa * Nai)), 1e-12));
  // Only the ratios of the permeabilities matter.
  std::vector<PermeantIon> scaled{{1, pK * 1e3, Ki, Ko}, {1, pNa * 1e3, Nai, Nao}, {-1, pCl * 1e3, Cli, Clo}};
  auto s = ghkZeroCurrentPotential(scaled, body);
  REQUIRE(s);
  CHECK_THAT(*s, WithinAbs(*v, 1e-12));
}

TEST_CASE("GHK voltage of a single ion is its Nernst potential", "[physics]") {
  for (int z : {1, -1, 2}) {
    INFO("z = " << z);
    std::vector<PermeantIon> one{{z, 1e-8, 138, 4.5}};
    auto v = ghkZeroCurrentPotential(one, body);
    REQUIRE(v);
    CHECK_THAT(*v, WithinAbs(nernst(z, 4.5, 138, body), 1e-12));
  }
}

TEST_CASE("GHK voltage with mixed valences makes the total current vanish", "[physics]") {
  std::vector<PermeantIon> ions{{1, 1e-8, 138, 4.5}, {2, 1e-7, 1e-4, 2.0}};
  auto v = ghkZeroCurrentPotential(ions, body);
  REQUIRE(v);
  double total = ghkCurrent(ions[0], *v, body) + ghkCurrent(ions[1], *v, body);
  double scale = std::fabs(ghkCurrent(ions[0], *v, body));
  CHECK(std::fabs(total) < 1e-9 * scale);
  // Between the two Nernst potentials.
  CHECK(*v > nernst(1, 4.5, 138, body));
  CHECK(*v < nernst(2, 2.0, 1e-4, body));
}

TEST_CASE("GHK voltage: nullopt when no potential makes the current vanish", "[physics]") {
  CHECK_FALSE(ghkZeroCurrentPotential({}, body));
  // One ion, on one side only: the current never changes sign.
  CHECK_FALSE(ghkZeroCurrentPotential({{1, 1e-8, 0, 4.5}}, body));
  CHECK_FALSE(ghkZeroCurrentPotential({{1, 1e-8, 138, 0}}, body));
  // Nothing permeates.
  CHECK_FALSE(ghkZeroCurrentPotential({{1, 0, 138, 4.5}, {1, 0, 11, 145}}, body));
}
