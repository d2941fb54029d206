// Lower.tests.cpp - stage 8: what the lowered kernel computes (conductances, Q10, stimuli as
// windows of time) and the invariants every kernel keeps (shared nodes, folded constants).
#include "Lower.h"
#include "FixedStep.h"
#include "Interpret.h"
#include "TestSupport.h"

#include <cmath>
#include <set>
#include <tuple>

using namespace saltpan;

namespace {

const char *cell = "temperature 16.3 degC\n"
                   "compartment c {\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n"
                   "  membrane {\n    L 0.3 mS/cm2\n    Slow 2 mS/cm2\n  }\n}\n"
                   "channel L { reversal -54 mV }\n"
                   "channel Slow {\n  reversal -77 mV\n"
                   "  gate n power 2 {\n    steady = 1 / (1 + exp(-(V + 30 mV) / 8 mV))\n    tau = 4 ms\n  }\n"
                   "  q10 3 at 6.3 degC\n}\n";

// The model of protocol `name`, or without stimuli when `name` is empty.
ir::Model lowered(const std::string &text, const std::string &name) {
  auto c = testing::compile(text);
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  const ast::ProtocolDecl *wanted = nullptr;
  for (const ast::ProtocolDecl *p : protocols(c->program))
    if (p->name == name)
      wanted = p;
  REQUIRE((name.empty() || wanted));
  ir::Model model;
  DiagnosticEngine diags;
  REQUIRE(lowerModel(c->program, c->model, c->evaluator, wanted, diags, model));
  return model;
}

std::vector<double> outputs(const ir::Model &m, const std::vector<double> &y, double t) {
  Interpreter interpreter(m.kernel);
  std::vector<double> out(m.kernel.outputs.size());
  interpreter.run(y.data(), m.params.data(), t, out.data());
  return out;
}

} // namespace

TEST_CASE("the lowered kernel gives G, GE and each gate's steady value and Q10-scaled tau", "[lower]") {
  ir::Model m = lowered(cell, "");
  REQUIRE(m.compartments.size() == 1);
  REQUIRE(m.gates.size() == 1);
  const ir::Compartment &c = m.compartments[0];
  const ir::Gate &g = m.gates[0];
  std::vector<double> y = m.initialState;
  y[static_cast<size_t>(c.voltageState)] = -0.040;
  y[static_cast<size_t>(g.state)] = 0.25;
  std::vector<double> out = outputs(m, y, 0);
  // By hand, in SI: 0.3 mS/cm2 = 3 S/m2, 2 mS/cm2 = 20 S/m2; the gate enters squared.
  double gSlow = 20 * 0.25 * 0.25;
  CHECK(out[static_cast<size_t>(c.gOutput)] == Approx(3 + gSlow).epsilon(1e-14));
  CHECK(out[static_cast<size_t>(c.geOutput)] == Approx(3 * -0.054 + gSlow * -0.077).epsilon(1e-14));
  CHECK(out[static_cast<size_t>(g.infOutput)] == Approx(1 / (1 + std::exp(-(-0.040 + 0.030) / 0.008))).epsilon(1e-14));
  // Ten degrees above the reference temperature with Q10 = 3: the gate is three times faster.
  CHECK(out[static_cast<size_t>(g.tauOutput)] == Approx(0.004 / 3).epsilon(1e-12));
}

TEST_CASE("a stimulus is a window of time in the kernel; the model without one has no edges", "[lower]") {
  std::string text = std::string(cell) + "protocol kick {\n  duration 3 ms\n  inject c 10 uA/cm2 from 1 ms to 2 ms\n"
                                         "  record c.V every 0.1 ms\n}\n";
  ir::Model stimulated = lowered(text, "kick");
  ir::Model plain = lowered(text, "");
  CHECK(eventTimes(plain.kernel).empty());
  std::vector<double> edges = eventTimes(stimulated.kernel);
  REQUIRE(edges.size() == 2);
  CHECK(edges[0] == Approx(0.001).epsilon(1e-15));
  CHECK(edges[1] == Approx(0.002).epsilon(1e-15));
  const ir::Compartment &c = stimulated.compartments[0];
  std::vector<double> y = stimulated.initialState;
  auto iOther = [&](double t) { return outputs(stimulated, y, t)[static_cast<size_t>(c.iOtherOutput)]; };
  // 10 uA/cm2 = 0.1 A/m2 inward (membrane current is positive outward); [a, b) windows.
  CHECK(iOther(0.0015) - iOther(0.0005) == Approx(-0.1).epsilon(1e-12));
  CHECK(iOther(0.001) == iOther(0.0015));
  CHECK(iOther(0.002) == iOther(0.0005));
}

// Arithmetic of constants is folded as nodes are added (IR.cpp); calls of math functions on
// constants are left to run time, where the interpreter and the JIT call the same libm.
TEST_CASE("every lowered kernel shares identical nodes and folds constant arithmetic", "[lower]") {
  // The shipped specs exercise every kind of entry, gate, pool and stimulus.
  for (const char *spec : {"specs/reference/squid_axon_1952.saltpan", "specs/demo/tidewater_cell.saltpan",
                           "specs/reference/squid_axon_1952_experiments.saltpan"}) {
    Compilation c;
    compileFile(std::string(SALTPAN_SOURCE_DIR) + "/" + spec, c);
    INFO(spec << "\n" << testing::allDiagnostics(c));
    REQUIRE(c.checked);
    REQUIRE_FALSE(c.lowered.empty());
    for (const auto &[protocol, model] : c.lowered) {
      INFO("protocol " << protocol->name);
      const auto &nodes = model.kernel.nodes();
      std::set<std::tuple<int, double, int, int, int, int>> seen;
      size_t repeated = 0, foldable = 0;
      for (const ir::Node &n : nodes) {
        repeated += !seen.insert({static_cast<int>(n.op), n.constant, n.index, n.a, n.b, n.c}).second;
        bool arithmetic = n.op == ir::Op::Add || n.op == ir::Op::Sub || n.op == ir::Op::Mul || n.op == ir::Op::Div ||
                          n.op == ir::Op::Neg || n.op == ir::Op::Not;
        bool allConstant = arithmetic;
        for (ir::NodeId o : {n.a, n.b, n.c})
          if (o >= 0 && nodes[static_cast<size_t>(o)].op != ir::Op::Const)
            allConstant = false;
        foldable += allConstant;
      }
      CHECK(repeated == 0);
      CHECK(foldable == 0);
    }
  }
}
