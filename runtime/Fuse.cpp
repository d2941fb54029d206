// Fuse.cpp - Stage 9 (with KernelPlan): the exponential Euler step written into the kernel itself.
#include "Fuse.h"

#include "Derivative.h"

#include <algorithm>
#include <cmath>

namespace saltpan {

using ir::NodeId;
using ir::Op;

namespace {

// Copies `src` into `k` with its states read from `states` and its time from `time` (the copy
// re-shares and re-folds as it goes); returns the node of each of src's nodes.
std::vector<NodeId> inlineKernel(ir::Kernel &k, const ir::Kernel &src, const std::vector<NodeId> &states, NodeId time) {
  const auto &nodes = src.nodes();
  std::vector<NodeId> map(nodes.size());
  for (size_t i = 0; i < nodes.size(); ++i) {
    const ir::Node &n = nodes[i];
    switch (n.op) {
    case Op::Const: map[i] = k.constant(n.constant); break;
    case Op::State: map[i] = states[static_cast<size_t>(n.index)]; break;
    case Op::Param: map[i] = k.param(n.index); break;
    case Op::Time: map[i] = time; break;
    case Op::Select: map[i] = k.select(map[n.a], map[n.b], map[n.c], n.loc); break;
    default: map[i] = ir::arity(n.op) == 1 ? k.unary(n.op, map[n.a], n.loc) : k.binary(n.op, map[n.a], map[n.b], n.loc);
    }
  }
  return map;
}

// IR nodes as Derivative.h's arithmetic.
struct NodeMath {
  ir::Kernel &k;
  using Value = NodeId;
  NodeId constant(double x) { return k.constant(x); }
  NodeId add(NodeId a, NodeId b) { return k.binary(Op::Add, a, b); }
  NodeId sub(NodeId a, NodeId b) { return k.binary(Op::Sub, a, b); }
  NodeId mul(NodeId a, NodeId b) { return k.binary(Op::Mul, a, b); }
  NodeId div(NodeId a, NodeId b) { return k.binary(Op::Div, a, b); }
  NodeId neg(NodeId a) { return k.unary(Op::Neg, a); }
};

} // namespace

std::optional<ir::Kernel> fuseRungeKutta4(const ir::Model &m, double dt, bool withOutputs) {
  for (const ir::Compartment &c : m.compartments)
    if (c.clampedOutput >= 0)
      return std::nullopt;
  ir::Kernel k;
  NodeMath math{k};
  size_t n = m.stateNames.size();
  std::vector<NodeId> y(n), k1(n), k2(n), k3(n), k4(n), tmp(n);
  for (size_t s = 0; s < n; ++s)
    y[s] = k.state(static_cast<int>(s));
  // dy/dt at (states, time): the model's kernel inlined there, then Derivative.h's formula, as
  // the C++ RK4 step computes it.
  std::vector<NodeId> firstOutputs;
  auto slope = [&](int, const NodeId *states, NodeId time, NodeId *d) {
    std::vector<NodeId> map = inlineKernel(k, m.kernel, std::vector<NodeId>(states, states + n), time);
    auto out = [&](int slot) { return map[m.kernel.outputs[static_cast<size_t>(slot)]]; };
    if (firstOutputs.empty())
      for (NodeId o : m.kernel.outputs)
        firstOutputs.push_back(map[o]);
    std::fill(d, d + n, k.constant(0));
    timeDerivative(
        math, m, [states](int s) { return states[s]; }, out,
        [&k](const ir::Compartment &c) { return k.param(c.capacitanceParam); }, d);
  };
  NodeId t = k.time();
  NodeId half = k.binary(Op::Add, t, k.constant(0.5 * dt)), full = k.binary(Op::Add, t, k.constant(dt));
  rungeKutta4Step(math, n, y.data(), dt, t, half, full, slope, k1.data(), k2.data(), k3.data(), k4.data(), tmp.data());
  for (NodeId next : y)
    k.addOutput(next);
  if (withOutputs)
    for (NodeId o : firstOutputs)
      k.addOutput(o);
  return k;
}

std::optional<ir::Kernel> fuseExponentialEuler(const ir::Model &m, double dt, bool withOutputs) {
  if (!m.junctions.empty()) // its potentials relax one compartment at a time
    return std::nullopt;
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
    default: map[i] = ir::arity(n.op) == 1 ? k.unary(n.op, map[n.a], n.loc) : k.binary(n.op, map[n.a], map[n.b], n.loc);
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
  // Dynamic concentrations: a forward Euler step of their currents.
  for (const ir::Pool &pool : m.pools)
    next[pool.state] =
        k.binary(Op::Add, k.state(pool.state), k.binary(Op::Mul, k.constant(dt), output(pool.derivativeOutput)));
  // V: the exact exponential relaxation of C V' = GE - G V - Iother with the conductances of
  // the new gates and the stimulus at the step's middle, as FixedStep.cpp's step. The kernel
  // is copied once more for them; what depends on V and the parameters only (the rates) is
  // shared with the first copy, so the second costs little.
  std::vector<NodeId> gatesFirst = next;
  for (const ir::Compartment &c : m.compartments)
    gatesFirst[c.voltageState] = k.state(c.voltageState);
  std::vector<NodeId> middle = inlineKernel(k, m.kernel, gatesFirst, k.binary(Op::Add, k.time(), k.constant(0.5 * dt)));
  auto newOutput = [&](int slot) { return middle[m.kernel.outputs[static_cast<size_t>(slot)]]; };
  for (const ir::Compartment &c : m.compartments) {
    NodeId g = newOutput(c.gOutput), ge = newOutput(c.geOutput), other = newOutput(c.iOtherOutput);
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
  for (NodeId n : next)
    k.addOutput(n);
  if (withOutputs)
    for (size_t i = 0; i < m.kernel.outputs.size(); ++i)
      k.addOutput(output(static_cast<int>(i)));
  return k;
}

ir::Kernel fuseStaggeredPiece(const ir::Kernel &local, int stateCount, const StaggeredRoles &roles, double dt) {
  ir::Kernel k;
  std::vector<NodeId> states(static_cast<size_t>(stateCount));
  for (int s = 0; s < stateCount; ++s)
    states[static_cast<size_t>(s)] = k.state(s);
  std::vector<NodeId> start = inlineKernel(k, local, states, k.time());
  auto output = [&](const std::vector<NodeId> &map, size_t slot) { return map[local.outputs[slot]]; };
  size_t slot = 0;
  std::vector<NodeId> moved = states, next;
  for (int g : roles.gateStates) { // as FixedStepper::gatesAndPools: inf + (x - inf) e^(-h/tau)
    NodeId inf = output(start, slot++), tau = output(start, slot++), x = k.state(g);
    NodeId decay = k.unary(Op::Exp, k.unary(Op::Neg, k.binary(Op::Div, k.constant(dt), tau)));
    moved[static_cast<size_t>(g)] = k.binary(Op::Add, inf, k.binary(Op::Mul, k.binary(Op::Sub, x, inf), decay));
    next.push_back(moved[static_cast<size_t>(g)]);
  }
  for (int pool : roles.poolStates) {
    NodeId derivative = output(start, slot++);
    moved[static_cast<size_t>(pool)] = k.binary(Op::Add, k.state(pool), k.binary(Op::Mul, k.constant(dt), derivative));
    next.push_back(moved[static_cast<size_t>(pool)]);
  }
  std::vector<NodeId> middle = inlineKernel(k, local, moved, k.binary(Op::Add, k.time(), k.constant(0.5 * dt)));
  for (int j = 0; j < 3; ++j)
    next.push_back(output(middle, slot++));
  if (roles.injected)
    next.push_back(output(start, slot++));
  for (NodeId n : next)
    k.addOutput(n);
  return k;
}

} // namespace saltpan
