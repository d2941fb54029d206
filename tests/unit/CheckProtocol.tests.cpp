// CheckProtocol.tests.cpp - stage 8a: the method as an enum from the AST builder to the lowered
// protocol, and each check of a protocol's settings, in the order they are reported.
#include "Lower.h"
#include "TestSupport.h"

using namespace saltpan;
using testing::compile;

namespace {

const char *cell = "temperature 20 degC\n"
                   "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n  membrane { L 0.3 mS/cm2 }\n}\n"
                   "channel L { reversal -60 mV }\n";

std::string withProtocol(const std::string &body) { return std::string(cell) + "protocol p {\n" + body + "}\n"; }

std::vector<std::string> errors(const Compilation &c) {
  std::vector<std::string> out;
  for (const Diagnostic &d : c.diags.all())
    if (d.severity == Severity::Error)
      out.push_back(d.message);
  return out;
}

} // namespace

TEST_CASE("every method name becomes its enum and lowers to its ir method", "[protocol]") {
  struct Case {
    const char *name;
    ast::IntegrationMethod method;
    ir::Method lowered;
  };
  const Case cases[] = {{"exponential_euler", ast::IntegrationMethod::ExponentialEuler, ir::Method::ExponentialEuler},
                        {"rk4", ast::IntegrationMethod::RungeKutta4, ir::Method::RungeKutta4},
                        {"dormand_prince", ast::IntegrationMethod::DormandPrince, ir::Method::DormandPrince},
                        {"rosenbrock", ast::IntegrationMethod::Rosenbrock, ir::Method::Rosenbrock},
                        {"backward_euler", ast::IntegrationMethod::BackwardEuler, ir::Method::BackwardEuler},
                        {"crank_nicolson", ast::IntegrationMethod::CrankNicolson, ir::Method::CrankNicolson}};
  for (const Case &k : cases) {
    INFO(k.name);
    CHECK(ast::integrationMethodNamed(k.name) == k.method);
    auto c = compile(withProtocol(std::string("  method ") + k.name + " step 10 us\n  duration 1 ms\n"));
    INFO(testing::allDiagnostics(*c));
    REQUIRE(c->checked);
    const auto *p = protocols(c->program).at(0);
    CHECK(p->method == k.method);
    CHECK(p->methodText == k.name);
    CHECK(c->lowered.at(p).protocol.method == k.lowered);
    CHECK(ast::dump(*c->program.root).find(std::string("method ") + k.name) != std::string::npos);
  }
  CHECK(ast::integrationMethodNamed("euler") == ast::IntegrationMethod::Unknown);
  CHECK(ast::integrationMethodNamed("") == ast::IntegrationMethod::Unknown);
  CHECK(ast::integrationMethodNames() ==
        "exponential_euler, rk4, dormand_prince, rosenbrock, backward_euler and crank_nicolson");
}

TEST_CASE("a protocol without a method steps by exponential Euler", "[protocol]") {
  auto c = compile(withProtocol("  duration 1 ms\n"));
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  const auto *p = protocols(c->program).at(0);
  CHECK(p->method == ast::IntegrationMethod::Default);
  CHECK(c->lowered.at(p).protocol.method == ir::Method::ExponentialEuler);
}

TEST_CASE("an unknown method is reported where it is written, with the methods there are", "[protocol]") {
  auto c = compile(withProtocol("  method euler step 10 us\n  duration 10 ms\n"));
  REQUIRE_FALSE(c->checked);
  REQUIRE(errors(*c) == std::vector<std::string>{"unknown method 'euler'"});
  const Diagnostic &d = c->diags.all().at(0);
  CHECK(d.range.begin.line == 9);
  CHECK(d.range.begin.column == 10);
  REQUIRE(d.notes.size() == 1);
  CHECK(d.notes[0].message ==
        "the methods are exponential_euler, rk4, dormand_prince, rosenbrock, backward_euler and crank_nicolson");
  CHECK(c->lowered.empty());
}

TEST_CASE("each setting of a protocol is checked, and the timing only when they are sound", "[protocol]") {
  auto bad = compile(withProtocol("  method rk4 step -1 us tolerance 2\n  duration 0 ms\n  record c.V every 0 ms\n"));
  CHECK(errors(*bad) == std::vector<std::string>{"the step must be positive", "the tolerance must lie between 0 and 1",
                                                 "the duration must be positive",
                                                 "the recording interval must be positive"});
  auto none = compile(withProtocol("  method rk4 step 10 us\n"));
  CHECK(errors(*none) == std::vector<std::string>{"protocol 'p' has no duration"});
  auto uneven = compile(withProtocol("  method rk4 step 30 us\n  duration 1 ms\n"));
  REQUIRE(errors(*uneven).size() == 1);
  CHECK(errors(*uneven)[0].find("whole number of steps") != std::string::npos);
}

TEST_CASE("protocol checks follow the lowering errors of their protocol, protocol by protocol", "[protocol]") {
  // The injection is refused while lowering; the step after it, when the protocol is checked.
  // Protocol b has no bad setting: lowering reports its injection and its record.
  auto c = compile(std::string(cell) +
                   "protocol a {\n  method rk4 step 0 us\n  duration 10 ms\n  inject c 1 uA/cm2 from 5 ms to 2 ms\n}\n"
                   "protocol b {\n  duration 10 ms\n  inject c 1 uA/cm2 from 5 ms to 2 ms\n"
                   "  record c.X every 0.1 ms\n}\n");
  CHECK(errors(*c) == std::vector<std::string>{"an injection must end after it starts", "the step must be positive",
                                               "an injection must end after it starts",
                                               "there is nothing called 'c.X' to record"});
}

TEST_CASE("a model that cannot be lowered at all gets no protocol checks", "[protocol]") {
  auto c = compile("temperature 20 degC\nprotocol p {\n  method euler\n  duration 1 ms\n}\n");
  CHECK(errors(*c) == std::vector<std::string>{"the model has no compartment to simulate"});
}

TEST_CASE("exponential Euler is refused for joined compartments, also when the method name is unknown", "[protocol]") {
  std::string joined = "temperature 20 degC\n"
                       "compartment c {\n  sphere diameter 20 um\n  capacitance 1 uF/cm2\n  initial V = -60 mV\n"
                       "  membrane { L 0.3 mS/cm2 }\n}\n"
                       "cable d {\n  grows from c\n  length 100 um\n  diameter 1 um\n"
                       "  axial resistivity 100 ohm*cm\n  pieces 4\n}\n"
                       "channel L { reversal -60 mV }\n";
  const char *refused = "exponential_euler steps each compartment alone; this cell's compartments are joined";
  auto written = compile(joined + "protocol p {\n  method exponential_euler step 10 us\n  duration 1 ms\n}\n");
  CHECK(errors(*written) == std::vector<std::string>{refused});
  // An unknown name leaves exponential Euler, so both are reported, as before the stage existed.
  auto unknown = compile(joined + "protocol p {\n  method nonsense\n  duration 1 ms\n}\n");
  CHECK(errors(*unknown) == std::vector<std::string>{"unknown method 'nonsense'", refused});
  auto fallback = compile(joined + "protocol p {\n  duration 1 ms\n}\n");
  INFO(testing::allDiagnostics(*fallback));
  REQUIRE(fallback->checked);
  CHECK(fallback->lowered.begin()->second.protocol.method == ir::Method::CrankNicolson);
}
