// IR.cpp - building kernels (with shared identical nodes) and the IR text dump.
#include "IR.h"

#include "Decimal.h"

#include <algorithm>
#include <cstdio>
#include <cstring>
#include <sstream>

namespace saltpan::ir {

const char *opName(Op op) {
  switch (op) {
#define IR_OP(Name, Arity)                                                                                             \
  case Op::Name:                                                                                                       \
    return #Name;
#include "IR.def"
  }
  return "?";
}

int arity(Op op) {
  switch (op) {
#define IR_OP(Name, Arity)                                                                                             \
  case Op::Name:                                                                                                       \
    return Arity;
#include "IR.def"
  }
  return 0;
}

const char *methodName(Method m) {
  switch (m) {
  case Method::ExponentialEuler: return "exponential_euler";
  case Method::RungeKutta4: return "rk4";
  case Method::DormandPrince: return "dormand_prince";
  case Method::Rosenbrock: return "rosenbrock";
  case Method::BackwardEuler: return "backward_euler";
  case Method::CrankNicolson: return "crank_nicolson";
  }
  return "?";
}

namespace {

uint64_t mix(uint64_t x) { // splitmix64's finaliser
  x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ull;
  x = (x ^ (x >> 27)) * 0x94D049BB133111EBull;
  return x ^ (x >> 31);
}

uint64_t constantBits(const Node &n) {
  uint64_t bits;
  std::memcpy(&bits, &n.constant, sizeof bits);
  return bits;
}

uint64_t keyHash(const Node &n) {
  uint64_t h = mix(constantBits(n));
  h = mix(h ^ (static_cast<uint64_t>(static_cast<uint32_t>(n.op)) << 32 | static_cast<uint32_t>(n.index)));
  h = mix(h ^ (static_cast<uint64_t>(static_cast<uint32_t>(n.a)) << 32 | static_cast<uint32_t>(n.b)));
  return mix(h ^ static_cast<uint32_t>(n.c));
}

bool sameKey(const Node &x, const Node &y) {
  return x.op == y.op && constantBits(x) == constantBits(y) && x.index == y.index && x.a == y.a && x.b == y.b &&
         x.c == y.c;
}

} // namespace

// A slot holds the node's id in its low half and its hash's high half above it (0: empty),
// so a probe reads a node only when the hashes agree.
void Kernel::grow() {
  std::vector<uint64_t> table(std::max<size_t>(64, table_.size() * 2), 0);
  size_t mask = table.size() - 1;
  for (uint64_t entry : table_)
    if (entry != 0) {
      size_t slot = keyHash(nodes_[static_cast<uint32_t>(entry) - 1]) & mask;
      while (table[slot] != 0)
        slot = (slot + 1) & mask;
      table[slot] = entry;
    }
  table_ = std::move(table);
}

NodeId Kernel::add(Node n) {
  if (2 * (nodes_.size() + 1) > table_.size()) // at most half full: probes stay short
    grow();
  size_t mask = table_.size() - 1;
  uint64_t hash = keyHash(n), tag = hash & 0xFFFFFFFF00000000ull;
  for (size_t slot = hash & mask;; slot = (slot + 1) & mask) {
    uint64_t entry = table_[slot];
    if (entry == 0) {
      nodes_.push_back(n);
      table_[slot] = tag | static_cast<uint32_t>(nodes_.size()); // id + 1: never 0
      return static_cast<NodeId>(nodes_.size() - 1);
    }
    NodeId id = static_cast<NodeId>(static_cast<uint32_t>(entry) - 1);
    if ((entry & 0xFFFFFFFF00000000ull) == tag && sameKey(nodes_[static_cast<size_t>(id)], n))
      return id;
  }
}

NodeId Kernel::constant(double v) { return add(Node{Op::Const, v, -1, -1, -1, -1, {}}); }
NodeId Kernel::state(int index) { return add(Node{Op::State, 0, index, -1, -1, -1, {}}); }
NodeId Kernel::param(int index) { return add(Node{Op::Param, 0, index, -1, -1, -1, {}}); }
NodeId Kernel::time() { return add(Node{Op::Time, 0, -1, -1, -1, -1, {}}); }

NodeId Kernel::unary(Op op, NodeId a, SourceLoc loc) {
  const Node &x = nodes_[a];
  if (x.op == Op::Const) { // fold constants now; the JIT and interpreter then agree exactly
    double v = x.constant;
    switch (op) {
    case Op::Neg: return constant(-v);
    case Op::Not: return constant(v == 0 ? 1 : 0);
    default: break;
    }
  }
  return add(Node{op, 0, -1, a, -1, -1, loc});
}

NodeId Kernel::binary(Op op, NodeId a, NodeId b, SourceLoc loc) {
  const Node &x = nodes_[a], &y = nodes_[b];
  if (x.op == Op::Const && y.op == Op::Const) {
    double l = x.constant, r = y.constant;
    switch (op) {
    case Op::Add: return constant(l + r);
    case Op::Sub: return constant(l - r);
    case Op::Mul: return constant(l * r);
    case Op::Div:
      if (r != 0)
        return constant(l / r);
      break;
    default: break;
    }
  }
  // x*1, 1*x, x+0, x-0 are common after lowering units; drop them.
  if (op == Op::Mul && y.op == Op::Const && y.constant == 1)
    return a;
  if (op == Op::Mul && x.op == Op::Const && x.constant == 1)
    return b;
  if ((op == Op::Add || op == Op::Sub) && y.op == Op::Const && y.constant == 0)
    return a;
  if (op == Op::Add && x.op == Op::Const && x.constant == 0)
    return b;
  if (op == Op::Div && y.op == Op::Const && y.constant == 1)
    return a;
  return add(Node{op, 0, -1, a, b, -1, loc});
}

NodeId Kernel::select(NodeId cond, NodeId then, NodeId otherwise, SourceLoc loc) {
  if (nodes_[cond].op == Op::Const)
    return nodes_[cond].constant != 0 ? then : otherwise;
  return add(Node{Op::Select, 0, -1, cond, then, otherwise, loc});
}

int Model::findParam(const std::string &wanted) const {
  for (size_t i = 0; i < paramNames.size(); ++i)
    if (paramNames[i] == wanted)
      return static_cast<int>(i);
  return -1;
}

int Model::findProbe(const std::string &wanted) const {
  for (size_t i = 0; i < probes.size(); ++i)
    if (probes[i].name == wanted)
      return static_cast<int>(i);
  return -1;
}

std::string dump(const Model &m) {
  std::ostringstream out;
  auto num = [](double v) { return shortestDecimal(v); };
  out << "model " << (m.name.empty() ? "(unnamed)" : m.name) << " temperature " << num(m.temperature) << " K\n";
  for (size_t i = 0; i < m.stateNames.size(); ++i)
    out << "state " << i << " " << m.stateNames[i] << " = " << num(m.initialState[i]) << "\n";
  for (size_t i = 0; i < m.paramNames.size(); ++i)
    out << "param " << i << " " << m.paramNames[i] << " = " << num(m.params[i]) << "\n";
  for (const Compartment &c : m.compartments)
    out << "compartment " << c.name << " V=y" << c.voltageState << " C=p" << c.capacitanceParam << " area "
        << num(c.area) << " G=out" << c.gOutput << " GE=out" << c.geOutput << " Iother=out" << c.iOtherOutput << "\n";
  for (const Junction &j : m.junctions)
    out << "junction " << m.compartments[static_cast<size_t>(j.parent)].name << " - "
        << m.compartments[static_cast<size_t>(j.child)].name << " " << num(j.conductance) << " S\n";
  for (const Gate &g : m.gates)
    out << "gate " << g.name << " y" << g.state << " inf=out" << g.infOutput << " tau=out" << g.tauOutput << "\n";
  for (const Probe &r : m.probes)
    out << "probe " << r.name << " [" << r.unit << "] " << (r.state >= 0 ? "y" + std::to_string(r.state)
                                                                             : "out" + std::to_string(r.output))
        << "\n";
  const Protocol &p = m.protocol;
  out << "protocol " << (p.name.empty() ? "(none)" : p.name) << " method " << methodName(p.method) << " step "
      << num(p.step) << " duration " << num(p.duration) << " every " << num(p.every) << "\n";
  out << dumpKernel(m.kernel);
  return out.str();
}

std::string dumpKernel(const Kernel &kernel) {
  std::ostringstream out;
  auto num = [](double v) { return shortestDecimal(v); };
  const auto &nodes = kernel.nodes();
  for (size_t i = 0; i < nodes.size(); ++i) {
    const Node &n = nodes[i];
    out << "%" << i << " = " << opName(n.op);
    if (n.op == Op::Const)
      out << " " << num(n.constant);
    if (n.op == Op::State)
      out << " y" << n.index;
    if (n.op == Op::Param)
      out << " p" << n.index;
    for (NodeId operand : {n.a, n.b, n.c})
      if (operand >= 0)
        out << " %" << operand;
    out << "\n";
  }
  for (size_t i = 0; i < kernel.outputs.size(); ++i)
    out << "out" << i << " = %" << kernel.outputs[i] << "\n";
  return out.str();
}

} // namespace saltpan::ir
