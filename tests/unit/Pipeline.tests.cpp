// Pipeline.tests.cpp - compileText end to end: what a clean spec yields, where errors stop.
#include "Lower.h"
#include "ModelHash.h"
#include "Physics.h"
#include "TestSupport.h"

#include <cmath>

using namespace saltpan;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;
using testing::compile;

namespace {

const char *cleanSpec = R"(model Pond "a charge-balanced test cell"
use std.ions
use std.math
temperature 37 degC
outside bath {
  [Na] = 145 mM
  [K] = 4.5 mM
  [Cl] = 116 mM
  impermeant 33.5 mM valence -1
}
compartment soma {
  sphere diameter 20 um
  capacitance 1 uF/cm2
  initial V = -65 mV
  outside bath
  inside { [Na] = 11 mM  [K] = 138 mM  [Cl] = 9 mM  impermeant 140 mM valence -1 }
  membrane {
    KLeak 1e-6 cm/s
    NaLeak 4e-8 cm/s
    ClLeak 4.5e-7 cm/s
    KGated 36 mS/cm2
  }
}
channel KLeak { carries K }
channel NaLeak { carries Na }
channel ClLeak { carries Cl }
channel KGated {
  carries K
  gate n power 4 {
    opening = 0.1 /ms / exprel(-(V + 55 mV) / 10 mV)
    closing = 0.125 /ms * exp(-(V + 65 mV) / 80 mV)
  }
  q10 3 at 6.3 degC
}
)";

constexpr double body = 310.15; // 37 degC, 0 degC = 273.15 K exactly (common practice)
constexpr double pi = 3.14159265358979323846;

const ast::IonDecl *ionNamed(const CompartmentValues &c, const std::string &name) {
  for (const ast::IonDecl *ion : c.ions)
    if (ion->name == name)
      return ion;
  return nullptr;
}

} // namespace

TEST_CASE("a clean spec passes every stage", "[pipeline]") {
  auto c = compile(cleanSpec);
  INFO(testing::allDiagnostics(*c));
  CHECK(c->checked);
  CHECK(c->diags.errorCount() == 0);
  CHECK(c->diags.warningCount() == 0);
  REQUIRE(c->program.root);
  CHECK(c->program.root->name == "test.saltpan");
  // std.ions and std.math are loaded before the root.
  CHECK(c->program.modules.size() == 3);
  CHECK(c->program.modules.back().get() == c->program.root);
}

TEST_CASE("the analysed model of a clean spec", "[pipeline]") {
  auto c = compile(cleanSpec);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  const AnalyzedModel &m = c->model;
  REQUIRE(m.header);
  CHECK(m.header->name == "Pond");
  REQUIRE(m.temperature);
  CHECK_THAT(*m.temperature, WithinRel(body, 1e-15));
  REQUIRE(m.compartments.size() == 1);
  const CompartmentValues &soma = m.compartments[0];
  // Sphere of diameter d: area pi d^2 (common practice).
  REQUIRE(soma.area);
  CHECK_THAT(*soma.area, WithinRel(pi * 20e-6 * 20e-6, 1e-14));
  // 1 uF/cm2 = 0.01 F/m2 (common practice).
  REQUIRE(soma.capacitance);
  CHECK_THAT(*soma.capacitance, WithinRel(0.01, 1e-14));
  REQUIRE(soma.initialV);
  CHECK_THAT(*soma.initialV, WithinRel(-0.065, 1e-15));

  // Every ion with a concentration, by name.
  REQUIRE(soma.ions.size() == 3);
  CHECK(soma.ions[0]->name == "Cl");
  CHECK(soma.ions[1]->name == "K");
  CHECK(soma.ions[2]->name == "Na");
  const ast::IonDecl *k = ionNamed(soma, "K");
  REQUIRE(k);
  CHECK(soma.concentration(k, ast::Side::Inside) == 138.0);
  CHECK(soma.concentration(k, ast::Side::Outside) == 4.5);
  auto eK = soma.nernst(k, body);
  REQUIRE(eK);
  CHECK_THAT(*eK, WithinRel(physics::nernst(1, 4.5, 138, body), 1e-15));
  const ast::IonDecl *cl = ionNamed(soma, "Cl");
  REQUIRE(cl);
  auto eCl = soma.nernst(cl, body);
  REQUIRE(eCl);
  // (RT/(-F)) ln(116/9) at 37 degC, CODATA 2018 exact constants: -68.323 mV.
  CHECK_THAT(*eCl, WithinAbs(-68.323e-3, 1e-6));

  // Densities in SI: 1e-6 cm/s = 1e-8 m/s; 36 mS/cm2 = 360 S/m2 (common practice).
  REQUIRE(soma.placements.size() == 4);
  CHECK(soma.placements[0].densityKind == DensityKind::Permeability);
  REQUIRE(soma.placements[0].density);
  CHECK_THAT(*soma.placements[0].density, WithinRel(1e-8, 1e-14));
  CHECK(soma.placements[3].densityKind == DensityKind::Conductance);
  REQUIRE(soma.placements[3].density);
  CHECK_THAT(*soma.placements[3].density, WithinRel(360.0, 1e-14));
  REQUIRE(soma.placements[3].reversal);
  CHECK_THAT(*soma.placements[3].reversal, WithinRel(*eK, 1e-15));
}

TEST_CASE("the GHK rest of a compartment is the GHK voltage equation of its leaks", "[pipeline]") {
  auto c = compile(cleanSpec);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  const CompartmentValues &soma = c->model.compartments.at(0);
  CHECK(soma.ghkChannels == 3);
  REQUIRE(soma.ghkRest);
  // Goldman 1943 / Hodgkin & Katz 1949 for K, Na, Cl with PK:PNa:PCl = 1:0.04:0.45;
  // R and F are the CODATA 2018 exact constants.
  double pK = 1e-8, pNa = 4e-10, pCl = 4.5e-9;
  double expected = 8.31446261815324 * body / 96485.33212331001 *
                    std::log((pK * 4.5 + pNa * 145 + pCl * 9) / (pK * 138 + pNa * 11 + pCl * 116));
  CHECK_THAT(*soma.ghkRest, WithinAbs(expected, 1e-12));
}

TEST_CASE("warnings do not stop the pipeline", "[pipeline]") {
  // The same cell without the impermeant anions: both solutions carry net charge.
  std::string text = cleanSpec;
  for (std::string cut : {"  impermeant 33.5 mM valence -1\n", "  impermeant 140 mM valence -1"}) {
    auto at = text.find(cut);
    REQUIRE(at != std::string::npos);
    text.erase(at, cut.size());
  }
  auto c = compile(text);
  INFO(testing::allDiagnostics(*c));
  CHECK(c->checked);
  CHECK(c->diags.errorCount() == 0);
  CHECK(c->diags.warningCount() == 2);
}

TEST_CASE("a unit error is located and stops before analysis", "[pipeline]") {
  auto c = compile("use std.ions\n"
                   "temperature 37 degC\n"
                   "const a = 1 mV + 2 ms\n");
  CHECK_FALSE(c->checked);
  REQUIRE(c->diags.errorCount() == 1);
  const Diagnostic &d = c->diags.all().at(0);
  CHECK(d.message.find("cannot add a voltage (mV) with a time (ms)") != std::string::npos);
  REQUIRE(d.range.valid());
  CHECK(d.range.begin.file->path() == "test.saltpan");
  CHECK(d.range.begin.line == 3);
  CHECK(d.range.begin.column == 16);
  // Analysis did not run.
  CHECK_FALSE(c->model.temperature);
}

TEST_CASE("a syntax error is located in the file that has it", "[pipeline]") {
  auto c = compile("const a = (1 mV\n", "broken.saltpan");
  CHECK_FALSE(c->checked);
  REQUIRE(c->diags.errorCount() >= 1);
  const Diagnostic &d = c->diags.all().at(0);
  REQUIRE(d.range.valid());
  CHECK(d.range.begin.file->path() == "broken.saltpan");
  CHECK(d.range.begin.line >= 1);
}

TEST_CASE("unknown names and modules are errors", "[pipeline]") {
  auto unknownModule = compile("use std.nothing\n");
  CHECK_FALSE(unknownModule->checked);
  CHECK(unknownModule->diags.errorCount() == 1);
  auto unknownName = compile("const a = b + 1\n");
  CHECK_FALSE(unknownName->checked);
  CHECK(unknownName->diags.errorCount() == 1);
  auto unknownUnit = compile("const a = 1 parsec\n");
  CHECK(testing::hasError(*unknownUnit, "unknown unit 'parsec'"));
}

TEST_CASE("a compilation with any error is not 'checked'", "[pipeline]") {
  // Compilation::checked means every stage ran without errors. The parser reports some
  // slips (an unknown unit) and still returns a module; later stages must not then
  // declare the compilation checked.
  for (const char *text : {"const a = 1 parsec\n", "const a: parsec = 1\n"}) {
    INFO(text);
    auto c = compile(text);
    REQUIRE(c->diags.errorCount() >= 1);
    CHECK_FALSE(c->checked);
  }
}

TEST_CASE("input beyond the parser's limits is an error, not a crash", "[pipeline]") {
  std::string deep = "const a = " + std::string(10000, '(') + "1" + std::string(10000, ')') + "\n";
  auto c = compile(deep);
  CHECK_FALSE(c->checked);
  CHECK(c->diags.errorCount() >= 1);
  std::string longSum = "const a = 1";
  for (int i = 0; i < 100000; ++i)
    longSum += " + 1";
  auto l = compile(longSum + "\n");
  CHECK_FALSE(l->checked);
  CHECK(l->diags.errorCount() >= 1);
  std::string negations = "const a = " + std::string(5000, '-') + "1\n";
  auto n = compile(negations);
  CHECK_FALSE(n->checked);
  CHECK(n->diags.errorCount() >= 1);
}

TEST_CASE("a constant may not use the temperature T", "[pipeline]") {
  // Constants are model-independent (stdlib modules have no temperature), so T is an
  // error in a constant; kinetics and reversal expressions may use it.
  std::string text = cleanSpec;
  text += "const warmth = T / 310.15 K\n";
  auto c = compile(text);
  CHECK_FALSE(c->checked);
  CHECK(testing::hasError(*c, "the temperature 'T' is not available in a constant"));
}

TEST_CASE("a constant whose value cannot be computed is an error even when unused", "[pipeline]") {
  // 1 / 0 has no value; a checked spec must not contain it silently.
  auto c = compile("const broken = 1 / 0\n");
  CHECK_FALSE(c->checked);
  CHECK(testing::hasError(*c, "division by zero"));
}

TEST_CASE("the model hash is computed once and equals a fresh one", "[pipeline]") {
  auto c = compile(cleanSpec);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  DiagnosticEngine diags;
  auto fresh = hashProgram(c->program, c->program.root->file->path(), diags);
  REQUIRE(fresh);
  const std::string &first = c->modelHash();
  CHECK(first == fresh->hash);
  // Kept: without its root the program would now hash as "unknown".
  c->program.root = nullptr;
  CHECK(&c->modelHash() == &first);
  CHECK(c->modelHash() == fresh->hash);
}

TEST_CASE("a compilation that loaded nothing has the model hash 'unknown'", "[pipeline]") {
  Compilation c;
  CHECK(c.modelHash() == "unknown");
}

TEST_CASE("every protocol is lowered by the pipeline as a fresh lowering would", "[pipeline]") {
  std::string text = std::string(cleanSpec) +
                     "protocol kick {\n  duration 3 ms\n  inject soma 10 uA/cm2 from 1 ms to 2 ms\n"
                     "  record soma.V every 0.1 ms\n}\n"
                     "protocol quiet {\n  duration 2 ms\n  record soma.V every 0.5 ms\n}\n";
  auto c = compile(text);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  auto all = protocols(c->program);
  REQUIRE(all.size() == 2);
  REQUIRE(c->lowered.size() == 2);
  for (const ast::ProtocolDecl *p : all) {
    INFO("protocol " << p->name);
    ir::Model fresh;
    DiagnosticEngine diags;
    REQUIRE(lowerModel(c->program, c->model, c->evaluator, p, diags, fresh));
    REQUIRE(c->lowered.count(p) == 1);
    CHECK(ir::dump(c->lowered.at(p)) == ir::dump(fresh));
  }
  CHECK(ir::dump(c->lowered.at(all[0])) != ir::dump(c->lowered.at(all[1])));
}

TEST_CASE("the stimulus-free lowering is computed once and equals a fresh one", "[pipeline]") {
  auto c = compile(cleanSpec);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  ir::Model fresh;
  DiagnosticEngine diags;
  REQUIRE(lowerModel(c->program, c->model, c->evaluator, nullptr, diags, fresh));
  const ir::Model *first = c->unstimulated();
  REQUIRE(first);
  CHECK(ir::dump(*first) == ir::dump(fresh));
  CHECK(c->unstimulatedDiagnostics().all().empty());
  // Kept: without compartments a fresh lowering would now fail.
  c->model.compartments.clear();
  CHECK(c->unstimulated() == first);
  CHECK(ir::dump(*c->unstimulated()) == ir::dump(fresh));
}

TEST_CASE("a stimulus-free lowering that fails keeps its diagnostics apart", "[pipeline]") {
  auto c = compile("model Empty \"no compartment\"\ntemperature 20 degC\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  size_t before = c->diags.all().size();
  CHECK(c->unstimulated() == nullptr);
  CHECK(c->unstimulated() == nullptr);
  REQUIRE(c->unstimulatedDiagnostics().all().size() == 1);
  CHECK(c->unstimulatedDiagnostics().all()[0].message == "the model has no compartment to simulate");
  CHECK(c->diags.all().size() == before);
}
