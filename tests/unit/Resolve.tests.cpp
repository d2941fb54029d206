// Resolve.tests.cpp - stage 3: what name resolution binds outside expressions (the names
// that expectations and sweep measures take as arguments), and that it adds no diagnostics.
#include "Lower.h"
#include "TestSupport.h"

using namespace saltpan;
using testing::compile;

namespace {

const char *cell = "use std.ions\n"
                   "temperature 20 degC\n"
                   "outside bath { [K] = 5 mM  [Na] = 140 mM  impermeant 145 mM valence -1 }\n"
                   "compartment c {\n  area 100 um2\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                   "  outside bath\n"
                   "  inside { [K] = 140 mM  [Na] = 10 mM  impermeant 150 mM valence -1 }\n"
                   "  membrane { L 0.3 mS/cm2 }\n}\n"
                   "channel L { carries K }\n"
                   "exchanger X { cycle 3 Na in, 2 K out  activity = 1 }\n"
                   "protocol p { duration 5 ms }\n";

std::vector<const ast::ExpectDecl *> rootExpectations(const Compilation &c) {
  std::vector<const ast::ExpectDecl *> out;
  for (auto &d : c.program.root->decls)
    if (auto *e = ast::dyn_cast<ast::ExpectDecl>(d.get()))
      out.push_back(e);
  return out;
}

} // namespace

TEST_CASE("resolve binds expectation arguments to the ion, compartment or pump they name", "[resolve]") {
  auto c = compile(std::string(cell) + "expect reversal(K, c) < 0 mV\n"
                                       "expect ghk_rest(c) < 0 mV\n"
                                       "expect net_charge(X) == 1\n"
                                       "expect p: peak(c.V) < 100 mV\n"
                                       "sweep s {\n  vary c.L.density from 0.1 mS/cm2 to 0.3 mS/cm2 points 2\n"
                                       "  measure p: final(c.V)\n  measure rest(c)\n}\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  const auto *k = testing::find<ast::IonDecl>(*c, "K");
  const auto *comp = testing::find<ast::CompartmentDecl>(*c, "c");
  const auto *pump = testing::find<ast::PumpDecl>(*c, "X");
  REQUIRE((k && comp && pump));
  auto all = rootExpectations(*c);
  REQUIRE(all.size() == 4);
  CHECK(all[0]->args[0].target == k);
  CHECK(all[0]->args[1].target == comp);
  CHECK(all[1]->args[0].target == comp);
  CHECK(all[2]->args[0].target == pump);
  // A recorded quantity is a probe of the lowered model, not a declaration.
  CHECK(all[3]->args[0].target == nullptr);
  const auto *sweep = testing::find<ast::SweepDecl>(*c, "s");
  REQUIRE(sweep);
  REQUIRE(sweep->measures.size() == 2);
  CHECK(sweep->measures[0]->args[0].target == nullptr);
  CHECK(sweep->measures[1]->args[0].target == comp);
}

TEST_CASE("an argument of the wrong kind is bound, and reported once, by the expectation check", "[resolve]") {
  auto c = compile(std::string(cell) + "expect reversal(L, c) < 0 mV\nexpect ghk_rest(nowhere) < 0 mV\n"
                                       "expect net_charge(K) == 1\n");
  auto all = rootExpectations(*c);
  REQUIRE(all.size() == 3);
  CHECK(all[0]->args[0].target == testing::find<ast::ChannelDecl>(*c, "L"));
  CHECK(all[1]->args[0].target == nullptr);
  CHECK(all[2]->args[0].target == testing::find<ast::IonDecl>(*c, "K"));
  std::vector<std::string> errors;
  for (const Diagnostic &d : c->diags.all())
    if (d.severity == Severity::Error)
      errors.push_back(d.message);
  CHECK(errors == std::vector<std::string>{"'L' is not an ion", "there is no compartment 'nowhere'",
                                           "'K' is not a pump or exchanger"});
}

TEST_CASE("resolve binds a record target to the compartment or cable its path starts with", "[resolve]") {
  std::string text = "temperature 20 degC\n"
                     "compartment c {\n  sphere diameter 20 um\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                     "  membrane { L 0.3 mS/cm2 }\n}\n"
                     "cable d {\n  grows from c\n  length 100 um\n  diameter 1 um\n"
                     "  axial resistivity 100 ohm*cm\n  pieces 4\n}\n"
                     "channel L { reversal -60 mV }\n"
                     "protocol p {\n  duration 1 ms\n  record c.V, d.V at 50 %, L.x\n}\n";
  auto c = compile(text);
  auto all = protocols(c->program);
  REQUIRE(all.size() == 1);
  const auto &records = all[0]->records;
  REQUIRE(records.size() == 3);
  CHECK(records[0].compartment == testing::find<ast::CompartmentDecl>(*c, "c"));
  CHECK(records[1].compartment == testing::find<ast::CompartmentDecl>(*c, "d"));
  CHECK(records[2].compartment == nullptr); // a channel: Lower finds no such probe
  std::vector<std::string> errors;
  for (const Diagnostic &d : c->diags.all())
    if (d.severity == Severity::Error)
      errors.push_back(d.message);
  CHECK(errors == std::vector<std::string>{"there is nothing called 'L.x' to record"});
}
