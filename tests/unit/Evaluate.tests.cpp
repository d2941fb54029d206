// Evaluate.tests.cpp - expression values through the whole pipeline (compileText).
#include "Physics.h"
#include "TestSupport.h"

#include <cmath>

using namespace saltpan;
using Catch::Matchers::WithinAbs;
using Catch::Matchers::WithinRel;
using testing::compile;
using testing::constantValue;

TEST_CASE("exprel is exactly 1 at 0 and (e^x - 1)/x elsewhere", "[evaluate]") {
  auto c = compile("use std.math\n"
                   "const z = exprel(0)\n"
                   "const one = exprel(1)\n"
                   "const neg = exprel(-2)\n"
                   "const tiny = exprel(1e-12)\n"
                   "const rate: 1/ms = 0.1 /ms / exprel(-(-40 mV + 40 mV) / 10 mV)\n");
  CHECK(constantValue(*c, "z") == 1.0);
  CHECK_THAT(constantValue(*c, "one"), WithinRel(std::exp(1.0) - 1, 1e-15));
  CHECK_THAT(constantValue(*c, "neg"), WithinRel((std::exp(-2.0) - 1) / -2, 1e-15));
  CHECK_THAT(constantValue(*c, "tiny"), WithinRel(1.0, 1e-11));
  // The removable singularity of a rate at V = -40 mV: 0.1 /ms = 100 /s.
  CHECK_THAT(constantValue(*c, "rate"), WithinRel(100.0, 1e-15));
}

TEST_CASE("hill: half occupancy at k, c^n / (c^n + k^n)", "[evaluate]") {
  auto c = compile("use std.math\n"
                   "const half = hill(2 mM, 2 mM, 3)\n"
                   "const h2 = hill(4 mM, 2 mM, 2)\n"
                   "const micro = hill(500 nM, 1 uM, 1)\n");
  CHECK_THAT(constantValue(*c, "half"), WithinRel(0.5, 1e-15));
  CHECK_THAT(constantValue(*c, "h2"), WithinRel(16.0 / 20.0, 1e-15));
  CHECK_THAT(constantValue(*c, "micro"), WithinRel(1.0 / 3.0, 1e-14));
}

TEST_CASE("logistic: 1/2 at 0, 1/(1+e^-x)", "[evaluate]") {
  auto c = compile("use std.math\n"
                   "const a = logistic(0)\n"
                   "const b = logistic(2)\n"
                   "const s = logistic(3) + logistic(-3)\n");
  CHECK(constantValue(*c, "a") == 0.5);
  CHECK_THAT(constantValue(*c, "b"), WithinRel(1 / (1 + std::exp(-2.0)), 1e-15));
  CHECK_THAT(constantValue(*c, "s"), WithinRel(1.0, 1e-15));
}

TEST_CASE("the Q10 factor: factor^((t - reference)/10 K)", "[evaluate]") {
  // 37 degC against 6.3 degC with Q10 = 3: 3^3.07 (0 degC = 273.15 K, common practice).
  auto c = compile("use std.math\n"
                   "const q: 1 = q10factor(3, 310.15 K, 279.45 K)\n"
                   "const same = q10factor(3, 300 K, 300 K)\n"
                   "const phi = q10factor(2, 310 K, 300 K)\n");
  CHECK_THAT(constantValue(*c, "q"), WithinRel(std::pow(3.0, 3.07), 1e-13));
  CHECK(constantValue(*c, "same") == 1.0);
  CHECK_THAT(constantValue(*c, "phi"), WithinRel(2.0, 1e-15));
}

TEST_CASE("if/then/else and the logical operators", "[evaluate]") {
  auto c = compile("const a = if 2 mV > 1 mV then 3 else 4\n"
                   "const b = if 2 mV < 1 mV then 3 else 4\n"
                   "const nested = if 1 > 2 then 1 else if 2 > 1 then 2 else 3\n"
                   "const both = if 1 < 2 and 2 < 3 then 1 else 0\n"
                   "const either = if 1 > 2 or 2 < 3 then 1 else 0\n"
                   "const negated = if not (1 > 2) then 1 else 0\n"
                   "const eq = if 1 mM == 1000 uM then 1 else 0\n"
                   "const ne = if 1 ms != 1 s then 1 else 0\n"
                   "const ge = if 1 V >= 1000 mV then 1 else 0\n"
                   "const le = if 1 V <= 999 mV then 1 else 0\n"
                   "const unit: mV = if 0 < 1 then -65 mV else 0 mV\n");
  CHECK(constantValue(*c, "a") == 3);
  CHECK(constantValue(*c, "b") == 4);
  CHECK(constantValue(*c, "nested") == 2);
  CHECK(constantValue(*c, "both") == 1);
  CHECK(constantValue(*c, "either") == 1);
  CHECK(constantValue(*c, "negated") == 1);
  CHECK(constantValue(*c, "eq") == 1);
  CHECK(constantValue(*c, "ne") == 1);
  CHECK(constantValue(*c, "ge") == 1);
  CHECK(constantValue(*c, "le") == 0);
  CHECK_THAT(constantValue(*c, "unit"), WithinRel(-0.065, 1e-15));
}

TEST_CASE("'and' and 'or' do not evaluate their right side when the left decides", "[evaluate]") {
  // 1 / 0 on the right would fail; the left side decides first.
  auto c = compile("const a = if 1 > 2 and 1 / 0 > 0 then 1 else 2\n"
                   "const b = if 1 < 2 or 1 / 0 > 0 then 1 else 2\n");
  CHECK(constantValue(*c, "a") == 2);
  CHECK(constantValue(*c, "b") == 1);
}

TEST_CASE("constants fold through other constants and convert to SI", "[evaluate]") {
  auto c = compile("const a = 2 mV\n"
                   "const b = a * 3\n"
                   "const d: mV = b + 1 mV\n"
                   "const surface: um2 = 3 um * 4 um\n"
                   "const p = 2 ^ 10\n"
                   "const neg = -(3 - 5)\n"
                   "const r: 1/ms = 1 / (4 ms)\n"
                   "const mixed = 1 mM + 500 uM\n");
  CHECK_THAT(constantValue(*c, "a"), WithinRel(0.002, 1e-15));
  CHECK_THAT(constantValue(*c, "b"), WithinRel(0.006, 1e-15));
  CHECK_THAT(constantValue(*c, "d"), WithinRel(0.007, 1e-15));
  CHECK_THAT(constantValue(*c, "surface"), WithinRel(12e-12, 1e-14));
  CHECK(constantValue(*c, "p") == 1024);
  CHECK(constantValue(*c, "neg") == 2);
  CHECK_THAT(constantValue(*c, "r"), WithinRel(250.0, 1e-15));
  CHECK_THAT(constantValue(*c, "mixed"), WithinRel(1.5, 1e-15));
}

TEST_CASE("std.constants gives R and F of the 2019 SI", "[evaluate]") {
  auto c = compile("use std.constants\n"
                   "const vt: mV = R * 310.15 K / F\n");
  // CODATA 2018 exact constants: RT/F at 37 degC = 26.726659 mV.
  CHECK_THAT(constantValue(*c, "R"), WithinRel(8.31446261815324, 1e-15));
  CHECK_THAT(constantValue(*c, "F"), WithinRel(96485.33212331001, 1e-15));
  CHECK_THAT(constantValue(*c, "vt"), WithinAbs(26.726659e-3, 1e-9));
  CHECK_THAT(constantValue(*c, "vt"), WithinRel(physics::thermalVoltage(310.15), 1e-14));
}

TEST_CASE("math builtins", "[evaluate]") {
  auto c = compile("const e1 = exp(1)\n"
                   "const m1 = expm1(1e-10)\n"
                   "const l = log(100)\n"
                   "const l10 = log10(1000)\n"
                   "const s: mV = sqrt(4 mV * 9 mV)\n"
                   "const pw = pow(2, 0.5)\n"
                   "const ab: mV = abs(-5 mV)\n"
                   "const mn: ms = min(2 ms, 3 ms)\n"
                   "const mx: ms = max(2 ms, 3 ms)\n"
                   "const th = tanh(0.5)\n");
  CHECK_THAT(constantValue(*c, "e1"), WithinRel(std::exp(1.0), 1e-15));
  CHECK_THAT(constantValue(*c, "m1"), WithinRel(1e-10, 1e-9));
  CHECK_THAT(constantValue(*c, "l"), WithinRel(std::log(100.0), 1e-15));
  CHECK_THAT(constantValue(*c, "l10"), WithinRel(3.0, 1e-15));
  CHECK_THAT(constantValue(*c, "s"), WithinRel(0.006, 1e-15));
  CHECK_THAT(constantValue(*c, "pw"), WithinRel(std::sqrt(2.0), 1e-15));
  CHECK_THAT(constantValue(*c, "ab"), WithinRel(0.005, 1e-15));
  CHECK_THAT(constantValue(*c, "mn"), WithinRel(0.002, 1e-15));
  CHECK_THAT(constantValue(*c, "mx"), WithinRel(0.003, 1e-15));
  CHECK_THAT(constantValue(*c, "th"), WithinRel(std::tanh(0.5), 1e-15));
}

namespace {

const char *gatedSpec = R"(use std.ions
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
  outside bath
  inside { [Na] = 11 mM  [K] = 138 mM  [Cl] = 9 mM  impermeant 140 mM valence -1 }
  membrane { KSlow 36 mS/cm2 }
}
channel KSlow {
  carries K
  gate n power 4 {
    opening = 0.1 /ms / exprel(-(V - E(K)) / 10 mV)
    closing = 0.125 /ms * exp(-(V - E(K)) / 80 mV) * [K]out / 4.5 mM
  }
}
)";

} // namespace

TEST_CASE("E(K) and [K]out inside a gate take their values from the surroundings", "[evaluate]") {
  auto c = compile(gatedSpec);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  auto *channel = testing::find<ast::ChannelDecl>(*c, "KSlow");
  REQUIRE(channel);
  REQUIRE(channel->gates.size() == 1);
  const ast::Gate &n = channel->gates[0];
  REQUIRE(n.opening);
  REQUIRE(n.closing);

  double eK = -0.09;
  EvalEnv env;
  env.T = 310.15;
  env.reversal = [&](const ast::IonDecl *ion) -> std::optional<double> {
    if (ion && ion->name == "K")
      return eK;
    return std::nullopt;
  };
  env.concentration = [](const ast::IonDecl *ion, ast::Side side) -> std::optional<double> {
    if (ion && ion->name == "K")
      return side == ast::Side::Outside ? 9.0 : 138.0;
    return std::nullopt;
  };
  // At V = E(K) the opening rate sits on exprel's removable singularity: 0.1 /ms.
  env.V = eK;
  EvalFailure failure;
  auto opening = c->evaluator.evaluate(*n.opening, env, &failure);
  INFO(failure.reason);
  REQUIRE(opening);
  CHECK_THAT(*opening, WithinRel(100.0, 1e-15));
  // 10 mV above E(K): 0.1 /ms / exprel(-1).
  env.V = eK + 0.010;
  opening = c->evaluator.evaluate(*n.opening, env);
  REQUIRE(opening);
  CHECK_THAT(*opening, WithinRel(100.0 / (std::expm1(-1.0) / -1.0), 1e-14));
  // closing = 0.125 /ms * e^(-1/8) * 9/4.5 at 10 mV above E(K).
  auto closing = c->evaluator.evaluate(*n.closing, env);
  REQUIRE(closing);
  CHECK_THAT(*closing, WithinRel(125.0 * std::exp(-0.125) * 2.0, 1e-14));

  // Without a membrane potential, or without E(K), evaluation fails and says why.
  EvalEnv noV = env;
  noV.V.reset();
  CHECK_FALSE(c->evaluator.evaluate(*n.opening, noV, &failure));
  CHECK(failure.reason.find("membrane potential") != std::string::npos);
  EvalEnv noE = env;
  noE.reversal = nullptr;
  CHECK_FALSE(c->evaluator.evaluate(*n.opening, noE, &failure));
  CHECK(failure.reason.find("reversal potential") != std::string::npos);
  CHECK(failure.range.valid());
}

TEST_CASE("the model's E(K) is the Nernst potential at the model temperature", "[evaluate]") {
  auto c = compile(gatedSpec);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  REQUIRE(c->model.compartments.size() == 1);
  const CompartmentValues &soma = c->model.compartments[0];
  REQUIRE(soma.placements.size() == 1);
  REQUIRE(soma.placements[0].reversal);
  // (RT/F) ln(4.5/138) at 37 degC from the CODATA 2018 exact constants: -91.490 mV.
  CHECK_THAT(*soma.placements[0].reversal, WithinAbs(-91.490e-3, 1e-6));
  CHECK(soma.placements[0].reversalKind == ReversalKind::Nernst);
}

TEST_CASE("evaluation failures: division by zero, log of a non-positive number", "[evaluate]") {
  auto d = compile("const q = 1 / (2 - 2)\n"
                   "const l = log(1 - 1)\n"
                   "const s = sqrt(0 - 4)\n"
                   "const ok = 1 + 1\n"
                   "const user = q + 1\n");
  for (const char *name : {"q", "l", "s", "user"}) {
    INFO(name);
    auto *decl = testing::find<ast::ConstDecl>(*d, name);
    REQUIRE(decl);
    EvalFailure failure;
    CHECK_FALSE(d->evaluator.constant(*decl, &failure));
    CHECK_FALSE(failure.reason.empty());
    CHECK(failure.range.valid());
  }
  auto *ok = testing::find<ast::ConstDecl>(*d, "ok");
  REQUIRE(ok);
  CHECK(d->evaluator.constant(*ok) == 2.0);
}
