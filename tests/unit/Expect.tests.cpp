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

namespace {

// Two recorded potentials (mV) sampled every 0.1 ms, each a triangle crossing 0 mV upwards
// halfway up its rise: at 1.05 ms in the first, `delay` later in the second.
Trace twoPlaces(double delay) {
  Trace t;
  t.names = {"a[1].V", "a[7].V"};
  t.units = {"mV", "mV"};
  auto spike = [](double time, double start) { return time < start ? -60.0 : -60 + 1200 * (time - start) * 1e3; };
  for (int i = 0; i <= 100; ++i) {
    double time = i * 1e-4;
    t.time.push_back(time);
    t.values.push_back(std::min(40.0, spike(time, 1e-3)));
    t.values.push_back(std::min(40.0, spike(time, 1e-3 + delay)));
  }
  return t;
}

ir::Model twoProbes() {
  ir::Model m;
  m.probes.push_back({"a[1].V", "mV", 1e3, 0, -1});
  m.probes.push_back({"a[7].V", "mV", 1e3, 1, -1});
  return m;
}

} // namespace

TEST_CASE("conduction_velocity: the path distance over the delay between the first crossings", "[expect]") {
  ast::ExpectDecl e({});
  e.measure = "conduction_velocity";
  MeasureArgs args;
  args.traces = {"a[1].V", "a[7].V"};
  args.distance = 3e-3; // m
  ir::Model m = twoProbes();
  std::string why;
  // 3 mm in 2 ms: 1.5 m/s; the crossings are interpolated between samples.
  auto v = traceMeasure(e, args, m, twoPlaces(2e-3), why);
  REQUIRE(v);
  CHECK_THAT(*v, Catch::Matchers::WithinRel(1.5, 1e-9));
  // A threshold moves both crossings alike: the same velocity.
  args.value = -30e-3;
  v = traceMeasure(e, args, m, twoPlaces(2e-3), why);
  REQUIRE(v);
  CHECK_THAT(*v, Catch::Matchers::WithinRel(1.5, 1e-9));
  // A spike that reaches the second place first travels the other way: negative.
  args.value = NAN;
  v = traceMeasure(e, args, m, twoPlaces(-0.5e-3), why);
  REQUIRE(v);
  CHECK_THAT(*v, Catch::Matchers::WithinRel(-6.0, 1e-9));
}

TEST_CASE("conduction_velocity fails clearly when no spike arrives or both arrive at once", "[expect]") {
  ast::ExpectDecl e({});
  e.measure = "conduction_velocity";
  MeasureArgs args;
  args.traces = {"a[1].V", "a[7].V"};
  args.distance = 3e-3;
  ir::Model m = twoProbes();
  std::string why;
  Trace late = twoPlaces(20e-3); // the second place never reaches 0 mV within the run
  CHECK_FALSE(traceMeasure(e, args, m, late, why));
  CHECK(why == "no spike arrives at 'a[7].V' (no spike)");
  CHECK_FALSE(traceMeasure(e, args, m, twoPlaces(0), why));
  CHECK(why == "the spike reaches both places at the same time");
}
