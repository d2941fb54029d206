// Sweep.tests.cpp - stage 12, both halves: checkSweeps and planSweep (SweepCheck.cpp) on a
// declaration, and SweepEvaluator (Sweep.cpp) computing its points with the interpreter.
#include "Sweep.h"
#include "TestSupport.h"

#include <cmath>

using namespace saltpan;
using testing::compile;

namespace {

const char *cell = "temperature 20 degC\n"
                   "compartment c {\n  area 100 um2\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                   "  membrane { L 0.3 mS/cm2 }\n}\n"
                   "channel L { reversal -70 mV }\n"
                   "protocol p { duration 2 ms }\n";

} // namespace

TEST_CASE("checkSweeps reports into the engine it is given", "[sweep]") {
  auto c = compile(std::string(cell) + "sweep s {\n  vary c.L.density from 0.1 mS/cm2 to 0.3 mS/cm2 points 3\n"
                                       "  measure p: final(c.V)\n}\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  DiagnosticEngine again;
  CHECK(checkSweeps(*c, again));
  CHECK(again.all().empty());

  auto bad = compile(std::string(cell) + "sweep s {\n  vary c.L.density from 0.1 mS/cm2 to 0.3 mS/cm2 points 3\n}\n");
  REQUIRE_FALSE(bad->checked);
  DiagnosticEngine fresh;
  CHECK_FALSE(checkSweeps(*bad, fresh));
  REQUIRE(fresh.all().size() == 1);
  CHECK(fresh.all()[0].message.find("measures nothing") != std::string::npos);
}

TEST_CASE("a planned grid is computed point by point: more leak, closer to its reversal", "[sweep]") {
  auto c = compile(std::string(cell) + "sweep s {\n  vary c.L.density from 0.1 mS/cm2 to 0.3 mS/cm2 points 3\n"
                                       "  measure p: final(c.V)\n}\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  SweepPlan plan = planSweep(*c, *rootSweeps(c->program).at(0));
  REQUIRE(plan.parameters == std::vector<std::string>{"c.L.density"});
  REQUIRE(plan.points.size() == 3);
  CHECK(plan.points[0][0] == Approx(1.0)); // 0.1 mS/cm2 in S/m2
  CHECK(plan.points[2][0] == Approx(3.0));
  REQUIRE(plan.measures.size() == 1);
  SweepEvaluator evaluator(*c, plan, SweepEngine::Interpreter, {}, 1, 1);
  std::string error;
  REQUIRE(evaluator.ready(error));
  std::vector<sweep::PointResult> out(3);
  for (auto &r : out)
    r.measures.assign(1, NAN);
  evaluator.evaluate({0, 1, 2}, out, 0);
  // V relaxes from -60 mV to -70 mV with tau = C/g: 10, 5 and 3.3 ms.
  for (size_t i = 0; i < 3; ++i) {
    double tau = 1e-2 / plan.points[i][0]; // C = 1e-2 F/m2
    CHECK(out[i].measures[0] == Approx(-70 + 10 * std::exp(-2e-3 / tau)).epsilon(1e-3));
  }
  CHECK(out[0].measures[0] > out[1].measures[0]);
  CHECK(out[1].measures[0] > out[2].measures[0]);
}
