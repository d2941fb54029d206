// Fuse.cpp - Stage 9a: the exponential Euler step written into the kernel itself.
#include "Fuse.h"

#include <cmath>

namespace brine {

using ir::NodeId;
using ir::Op;

std::optional<ir::Kernel> fuseExponentialEuler(const ir::Model &m, double dt, bool withOutputs) {
  for (const ir::Compartment &c : m.compartments)
    if (c.clampedOutput >= 0)
      return std::nullopt;
  ir::Kernel k;
  // Copy the model's kernel node by node (the copy re-shares and re-folds as it goes).
  const auto &nodes = m.kernel.nodes();
  std::vector<NodeId> map(nodes.size());
  for (size_t i = 0; i < nodes.size(); ++i) {
    const ir::Node &n = nodes[i];
    switch (n.op) {
    case Op::Const: map[i] = k.constant(n.constant); break;
    case Op::State: map[i] = k.state(n.index); break;
    case Op::Param: map[i] = k.param(n.index); break;
    case Op::Time: map[i] = k.time(); break;
    case Op::Select: map[i] = k.select(map[n.a], map[n.b], map[n.c], n.loc); break;
    default:
      map[i] = ir::arity(n.op) == 1 ? k.unary(n.op, map[n.a], n.loc) : k.binary(n.op, map[n.a], map[n.b], n.loc);
    }
  }
  auto output = [&](int slot) { return map[m.kernel.outputs[slot]]; };
  std::vector<NodeId> next(m.stateNames.size(), -1);
  for (size_t s = 0; s < next.size(); ++s)
    next[s] = k.state(static_cast<int>(s));
  // Gates: x + (inf - x)(1 - e^(-dt/tau)), the Rush-Larsen update.
  for (const ir::Gate &g : m.gates) {
    NodeId inf = output(g.infOutput), tau = output(g.tauOutput), x = k.state(g.state);
    // A gate given by rates has tau = 1 / (alpha + beta): use e^(-dt (alpha + beta)) and skip
    // two divisions on the hot path.
    const ir::Node &tauNode = k.nodes()[tau];
    NodeId decay;
    if (tauNode.op == Op::Div && k.nodes()[tauNode.a].op == Op::Const && k.nodes()[tauNode.a].constant == 1)
      decay = k.unary(Op::Exp, k.unary(Op::Neg, k.binary(Op::Mul, k.constant(dt), tauNode.b)));
    else
      decay = k.unary(Op::Exp, k.unary(Op::Neg, k.binary(Op::Div, k.constant(dt), tau)));
    next[g.state] = k.binary(Op::Add, inf, k.binary(Op::Mul, k.binary(Op::Sub, x, inf), decay));
  }
  // V: the exact exponential relaxation of C V' = GE - G V - Iother with the gates frozen.
  for (const ir::Compartment &c : m.compartments) {
    NodeId g = output(c.gOutput), ge = output(c.geOutput), other = output(c.iOtherOutput);
    NodeId v = k.state(c.voltageState), cap = k.param(c.capacitanceParam);
    NodeId vInf = k.binary(Op::Div, k.binary(Op::Sub, ge, other), g);
    NodeId dtOverC = k.binary(Op::Div, k.constant(dt), cap); // one division, shared
    NodeId decay = k.unary(Op::Exp, k.unary(Op::Neg, k.binary(Op::Mul, dtOverC, g)));
    NodeId relaxed = k.binary(Op::Add, vInf, k.binary(Op::Mul, k.binary(Op::Sub, v, vInf), decay));
    // Without a positive conductance, an explicit step of the whole current (as Simulate.cpp).
    NodeId current = k.binary(Op::Add, k.binary(Op::Sub, k.binary(Op::Mul, g, v), ge), other);
    NodeId explicitStep = k.binary(Op::Sub, v, k.binary(Op::Mul, dtOverC, current));
    next[c.voltageState] = k.select(k.binary(Op::Gt, g, k.constant(0)), relaxed, explicitStep);
  }
  // Dynamic concentrations: a forward Euler step of their currents.
  for (const ir::Pool &pool : m.pools)
    next[pool.state] = k.binary(Op::Add, k.state(pool.state),
                                k.binary(Op::Mul, k.constant(dt), output(pool.derivativeOutput)));
  for (NodeId n : next)
    k.addOutput(n);
  if (withOutputs)
    for (size_t i = 0; i < m.kernel.outputs.size(); ++i)
      k.addOutput(output(static_cast<int>(i)));
  return k;
}

} // namespace brine
