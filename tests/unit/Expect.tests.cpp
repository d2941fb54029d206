// Expect.tests.cpp - stage 11, both halves: checkExpectations (ExpectCheck.cpp) on its own, and
// runExpectations (ExpectMeasure.cpp) measuring and judging model and run measures.
#include "Expect.h"
#include "TestSupport.h"

using namespace saltpan;
using testing::compile;

namespace {

const char *cell = "temperature 20 degC\n"
                   "compartment c {\n  area 100 um2\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                   "  membrane { L 0.3 mS/cm2 }\n}\n"
                   "channel L { reversal -70 mV }\n"
                   "protocol p { duration 20 ms }\n";

} // namespace

TEST_CASE("checkExpectations reports into the engine it is given, and only the expectations' errors", "[expect]") {
  auto c = compile(std::string(cell) + "expect area(c) == 100 um2 within 1 um2\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  DiagnosticEngine again;
  CHECK(checkExpectations(*c, again));
  CHECK(again.all().empty());

  auto bad = compile(std::string(cell) + "expect area(c) == 100 mV within 1 mV\n");
  REQUIRE_FALSE(bad->checked);
  DiagnosticEngine fresh;
  CHECK_FALSE(checkExpectations(*bad, fresh));
  REQUIRE(fresh.all().size() == 2);
  CHECK(fresh.all()[0].message == "the expected value must be an area (um2), got a voltage (mV)");
  CHECK(fresh.all()[1].message == "the tolerance must be an area (um2), got a voltage (mV)");
}

TEST_CASE("runExpectations measures, shows and judges each expectation of the root file in order", "[expect]") {
  auto c = compile(std::string(cell) + "expect area(c) == 100 um2 within 1 um2\n"
                                       "expect p: final(c.V) == -70 mV within 0.5 mV\n"
                                       "expect p: final(c.V) > 0 mV\n"
                                       "expect p: spike_count(c.V) == 0\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  std::vector<ExpectResult> results = runExpectations(*c, {});
  REQUIRE(results.size() == 4);
  CHECK(results[0].passed);
  CHECK(results[0].measuredText == "100 um2");
  CHECK(results[0].expectedText == "100 um2 within 1 um2");
  // The leak relaxes V towards -70 mV with tau = C/g = 3.33 ms: after 20 ms it is within 0.2 mV.
  REQUIRE(results[1].measured.has_value());
  CHECK(*results[1].measured < -0.0698);
  CHECK(*results[1].measured > -0.0701);
  CHECK(results[1].passed);
  CHECK_FALSE(results[2].passed);
  CHECK(results[2].expectedText == "> 0 mV");
  CHECK(results[3].passed);
  CHECK(results[3].measuredText == "0");
}
