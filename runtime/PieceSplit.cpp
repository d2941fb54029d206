// PieceSplit.cpp - splitting a tree's kernel into one small kernel per kind of piece.
#include "PieceSplit.h"

#include "Fuse.h"

#include <algorithm>
#include <cassert>
#include <cstring>
#include <unordered_map>

namespace saltpan {

const KernelPart allParts[kernelPartCount] = {KernelPart::All, KernelPart::Dynamics, KernelPart::Rates,
                                              KernelPart::Currents, KernelPart::Step};

const char *kernelPartName(KernelPart part) {
  switch (part) {
  case KernelPart::All: return "every output";
  case KernelPart::Dynamics: return "dynamics";
  case KernelPart::Rates: return "rates";
  case KernelPart::Currents: return "membrane currents";
  case KernelPart::Step: return "an implicit step's gates, then membrane currents";
  }
  return "?";
}

int hostVectorLanes() {
#if defined(__x86_64__)
  __builtin_cpu_init();
  if (__builtin_cpu_supports("avx512f"))
    return 8;
  if (__builtin_cpu_supports("avx2"))
    return 4;
#endif
  return 2;
}

namespace {

// Who owns each output and state: a compartment's index, or -1.
struct Ownership {
  std::vector<int> output, state;
  std::vector<uint8_t> rate, current; // the output is in Rates / in Currents
};

int compartmentOfName(const std::unordered_map<std::string, int> &byName, const std::string &name) {
  for (size_t dot = name.rfind('.'); dot != std::string::npos && dot > 0; dot = name.rfind('.', dot - 1)) {
    auto it = byName.find(name.substr(0, dot));
    if (it != byName.end())
      return it->second;
  }
  return -1;
}

Ownership owners(const ir::Model &m) {
  Ownership own{std::vector<int>(m.kernel.outputs.size(), -1), std::vector<int>(m.stateNames.size(), -1),
                std::vector<uint8_t>(m.kernel.outputs.size(), 0), std::vector<uint8_t>(m.kernel.outputs.size(), 0)};
  std::unordered_map<std::string, int> byName;
  auto set = [&](int output, int c, bool rate, bool current) {
    if (output < 0)
      return;
    own.output[output] = c;
    own.rate[output] |= rate;
    own.current[output] |= current;
  };
  for (size_t i = 0; i < m.compartments.size(); ++i) {
    const ir::Compartment &c = m.compartments[i];
    int ci = static_cast<int>(i);
    byName.emplace(c.name, ci);
    own.state[c.voltageState] = ci;
    for (int o : {c.gOutput, c.geOutput, c.iOtherOutput})
      set(o, ci, false, true);
    for (int o : {c.clampedOutput, c.commandOutput, c.injectedOutput})
      set(o, ci, true, false);
  }
  for (const ir::Pool &pool : m.pools) {
    own.state[pool.state] = pool.compartment;
    set(pool.derivativeOutput, pool.compartment, true, false);
  }
  for (const ir::Gate &g : m.gates) {
    int c = compartmentOfName(byName, g.name);
    own.state[g.state] = c;
    set(g.infOutput, c, true, false);
    set(g.tauOutput, c, true, false);
  }
  for (const ir::Probe &p : m.probes)
    if (p.output >= 0 && own.output[p.output] < 0)
      own.output[p.output] = compartmentOfName(byName, p.name);
  return own;
}

bool inPart(const Ownership &own, int output, KernelPart part) {
  switch (part) {
  case KernelPart::All: return true;
  case KernelPart::Dynamics: return own.rate[output] || own.current[output];
  case KernelPart::Rates: return own.rate[output];
  case KernelPart::Currents: return own.current[output];
  case KernelPart::Step: return false; // laid out by stepPrograms
  }
  return false;
}

// One compartment's outputs as a program of its own: nodes in the order a depth-first walk
// from the outputs meets them (so alike pieces give equal programs whatever the global
// numbering), states and params renumbered by first use.
struct LocalProgram {
  std::vector<ir::Node> nodes; // operands and indices local
  std::vector<ir::NodeId> outputNodes;
  std::vector<int> states, params, outputs; // global slots, by local slot
  bool foreign = false;                     // reads a state another compartment owns
};

class Localiser {
public:
  Localiser(const ir::Model &m, const Ownership &own)
      : m_(m), own_(own), local_(m.kernel.nodes().size(), -1), stateSlot_(m.stateNames.size(), -1),
        paramSlot_(m.params.size(), -1) {}

  // `owner` -1: keep global indices (the outputs no compartment owns).
  LocalProgram build(const std::vector<int> &outputs, int owner) {
    LocalProgram prog;
    for (int o : outputs) {
      prog.outputNodes.push_back(visit(m_.kernel.outputs[static_cast<size_t>(o)], owner, prog));
      prog.outputs.push_back(o);
    }
    for (ir::NodeId id : touched_)
      local_[id] = -1;
    for (int s : prog.states)
      stateSlot_[s] = -1;
    for (int p : prog.params)
      paramSlot_[p] = -1;
    touched_.clear();
    return prog;
  }

private:
  ir::NodeId visit(ir::NodeId root, int owner, LocalProgram &prog) {
    const std::vector<ir::Node> &nodes = m_.kernel.nodes();
    stack_.assign(1, {root, 0});
    while (!stack_.empty()) {
      auto &[id, next] = stack_.back();
      const ir::Node &n = nodes[id];
      if (local_[id] >= 0) {
        stack_.pop_back();
        continue;
      }
      ir::NodeId operands[3] = {n.a, n.b, n.c};
      if (next < ir::arity(n.op)) {
        ir::NodeId operand = operands[next++];
        if (local_[operand] < 0)
          stack_.push_back({operand, 0});
        continue;
      }
      ir::Node copy = n;
      copy.a = n.a >= 0 ? local_[n.a] : -1;
      copy.b = n.b >= 0 ? local_[n.b] : -1;
      copy.c = n.c >= 0 ? local_[n.c] : -1;
      if (owner >= 0 && n.op == ir::Op::State) {
        prog.foreign |= own_.state[n.index] != owner;
        copy.index = slot(stateSlot_, prog.states, n.index);
      } else if (owner >= 0 && n.op == ir::Op::Param) {
        copy.index = slot(paramSlot_, prog.params, n.index);
      }
      local_[id] = static_cast<ir::NodeId>(prog.nodes.size());
      touched_.push_back(id);
      prog.nodes.push_back(copy);
      stack_.pop_back();
    }
    return local_[root];
  }

  static int slot(std::vector<int> &slots, std::vector<int> &globals, int global) {
    if (slots[global] < 0) {
      slots[global] = static_cast<int>(globals.size());
      globals.push_back(global);
    }
    return slots[global];
  }

  const ir::Model &m_;
  const Ownership &own_;
  std::vector<ir::NodeId> local_; // global node -> local node, -1 when not yet met
  std::vector<int> stateSlot_, paramSlot_;
  std::vector<ir::NodeId> touched_;
  std::vector<std::pair<ir::NodeId, int>> stack_;
};

bool sameNode(const ir::Node &x, const ir::Node &y) {
  return x.op == y.op && std::memcmp(&x.constant, &y.constant, sizeof x.constant) == 0 && x.index == y.index &&
         x.a == y.a && x.b == y.b && x.c == y.c;
}

bool sameProgram(const LocalProgram &x, const LocalProgram &y) {
  if (x.nodes.size() != y.nodes.size() || x.outputNodes != y.outputNodes || x.states.size() != y.states.size() ||
      x.params.size() != y.params.size())
    return false;
  for (size_t i = 0; i < x.nodes.size(); ++i)
    if (!sameNode(x.nodes[i], y.nodes[i]))
      return false;
  return true;
}

uint64_t fingerprint(const LocalProgram &prog) {
  uint64_t h = 1469598103934665603ull; // FNV-1a over the fields sameProgram compares
  auto mix = [&h](const void *data, size_t size) {
    for (size_t i = 0; i < size; ++i)
      h = (h ^ static_cast<const unsigned char *>(data)[i]) * 1099511628211ull;
  };
  for (const ir::Node &n : prog.nodes) {
    mix(&n.op, sizeof n.op);
    mix(&n.constant, sizeof n.constant);
    mix(&n.index, sizeof n.index);
    mix(&n.a, sizeof n.a);
    mix(&n.b, sizeof n.b);
    mix(&n.c, sizeof n.c);
  }
  mix(prog.outputNodes.data(), prog.outputNodes.size() * sizeof(ir::NodeId));
  return h;
}

ir::Kernel toKernel(const LocalProgram &prog) {
  ir::Kernel k;
  std::vector<ir::NodeId> id(prog.nodes.size());
  for (size_t i = 0; i < prog.nodes.size(); ++i) {
    const ir::Node &n = prog.nodes[i];
    switch (n.op) {
    case ir::Op::Const: id[i] = k.constant(n.constant); break;
    case ir::Op::State: id[i] = k.state(n.index); break;
    case ir::Op::Param: id[i] = k.param(n.index); break;
    case ir::Op::Time: id[i] = k.time(); break;
    default:
      switch (ir::arity(n.op)) {
      case 1: id[i] = k.unary(n.op, id[n.a], n.loc); break;
      case 2: id[i] = k.binary(n.op, id[n.a], id[n.b], n.loc); break;
      default: id[i] = k.select(id[n.a], id[n.b], id[n.c], n.loc); break;
      }
    }
  }
  for (ir::NodeId o : prog.outputNodes)
    k.addOutput(id[o]);
  return k;
}

// What one compartment computes for a part: the kernel outputs its local program reads, in
// order, and where each of its class kernel's outputs is written (for Step, in the
// [next states | outputs] array; otherwise the outputs themselves).
struct PartLayout {
  std::vector<int> outputs, targets;
  std::vector<int> gateStates, poolStates; // Step: the global states it moves
  bool injected = false;
};

// `owned`: each compartment's outputs in the part (not for Step).
PartLayout layoutOf(const ir::Model &m, size_t c, KernelPart part, const std::vector<std::vector<int>> &owned,
                    const std::vector<std::vector<int>> &gatesOf, const std::vector<std::vector<int>> &poolsOf) {
  PartLayout layout;
  if (part != KernelPart::Step) {
    layout.outputs = owned[c];
    layout.targets = layout.outputs;
    return layout;
  }
  int states = static_cast<int>(m.stateNames.size());
  for (int g : gatesOf[c]) {
    const ir::Gate &gate = m.gates[static_cast<size_t>(g)];
    layout.outputs.insert(layout.outputs.end(), {gate.infOutput, gate.tauOutput});
    layout.gateStates.push_back(gate.state);
  }
  for (int p : poolsOf[c]) {
    layout.outputs.push_back(m.pools[static_cast<size_t>(p)].derivativeOutput);
    layout.poolStates.push_back(m.pools[static_cast<size_t>(p)].state);
  }
  layout.targets.insert(layout.targets.end(), layout.gateStates.begin(), layout.gateStates.end());
  layout.targets.insert(layout.targets.end(), layout.poolStates.begin(), layout.poolStates.end());
  const ir::Compartment &comp = m.compartments[c];
  for (int o : {comp.gOutput, comp.geOutput, comp.iOtherOutput}) {
    layout.outputs.push_back(o);
    layout.targets.push_back(states + o);
  }
  layout.injected = comp.injectedOutput >= 0;
  if (layout.injected) {
    layout.outputs.push_back(comp.injectedOutput);
    layout.targets.push_back(states + comp.injectedOutput);
  }
  return layout;
}

// The local slot of global state `global` in `prog`, added when its outputs never read it.
int localState(LocalProgram &prog, int global) {
  auto it = std::find(prog.states.begin(), prog.states.end(), global);
  if (it != prog.states.end())
    return static_cast<int>(it - prog.states.begin());
  prog.states.push_back(global);
  return static_cast<int>(prog.states.size()) - 1;
}

bool sameRoles(const StaggeredRoles &x, const StaggeredRoles &y) {
  return x.gateStates == y.gateStates && x.poolStates == y.poolStates && x.injected == y.injected;
}

// A whole implicit step fuses exponential Euler into the pieces' kernels; a clamp, whose
// command replaces V, needs the general stepper.
bool stepFusable(const ir::Model &m) {
  return std::none_of(m.compartments.begin(), m.compartments.end(),
                      [](const ir::Compartment &c) { return c.clampedOutput >= 0; });
}

} // namespace

std::optional<PieceSplit> splitByPiece(const ir::Model &model, const std::vector<KernelPart> &parts, double step) {
  Ownership own = owners(model);
  Localiser localiser(model, own);
  // A probe that reads another piece's state (a clamp's current through its junctions) is
  // computed with the outputs no piece owns.
  for (const ir::Probe &p : model.probes)
    if (int o = p.output;
        o >= 0 && own.output[o] >= 0 && !own.rate[o] && !own.current[o] && localiser.build({o}, own.output[o]).foreign)
      own.output[o] = -1;
  std::vector<std::vector<int>> gatesOf(model.compartments.size()), poolsOf(model.compartments.size());
  for (size_t g = 0; g < model.gates.size(); ++g)
    if (int c = own.state[model.gates[g].state]; c >= 0)
      gatesOf[static_cast<size_t>(c)].push_back(static_cast<int>(g));
  for (size_t p = 0; p < model.pools.size(); ++p)
    poolsOf[static_cast<size_t>(model.pools[p].compartment)].push_back(static_cast<int>(p));
  PieceSplit split;
  for (KernelPart part : allParts) {
    if (part != KernelPart::All && std::find(parts.begin(), parts.end(), part) == parts.end())
      continue;
    if (part == KernelPart::Step && (!(step > 0) || !stepFusable(model)))
      continue;
    split.prepared[static_cast<int>(part)] = true;
    std::vector<PieceClass> &classes = split.parts[static_cast<int>(part)];
    std::vector<std::pair<LocalProgram, StaggeredRoles>> representatives;
    std::unordered_multimap<uint64_t, size_t> byFingerprint;
    std::vector<std::vector<int>> owned(model.compartments.size());
    for (size_t o = 0; o < own.output.size(); ++o)
      if (own.output[o] >= 0 && inPart(own, static_cast<int>(o), part))
        owned[static_cast<size_t>(own.output[o])].push_back(static_cast<int>(o));
    for (size_t c = 0; c < model.compartments.size(); ++c) {
      PartLayout layout = layoutOf(model, c, part, owned, gatesOf, poolsOf);
      if (layout.outputs.empty())
        continue;
      LocalProgram prog = localiser.build(layout.outputs, static_cast<int>(c));
      if (prog.foreign)
        return std::nullopt;
      StaggeredRoles roles;
      for (int g : layout.gateStates)
        roles.gateStates.push_back(localState(prog, g));
      for (int p : layout.poolStates)
        roles.poolStates.push_back(localState(prog, p));
      roles.injected = layout.injected;
      uint64_t key = fingerprint(prog) ^ (roles.gateStates.size() * 0x9e3779b97f4a7c15ull + prog.states.size());
      size_t chosen = classes.size();
      for (auto [it, end] = byFingerprint.equal_range(key); it != end; ++it)
        if (sameProgram(representatives[it->second].first, prog) &&
            sameRoles(representatives[it->second].second, roles))
          chosen = it->second;
      if (chosen == classes.size()) {
        byFingerprint.emplace(key, chosen);
        PieceClass cls;
        int stateCount = static_cast<int>(prog.states.size());
        cls.kernel =
            part == KernelPart::Step ? fuseStaggeredPiece(toKernel(prog), stateCount, roles, step) : toKernel(prog);
        cls.firstName = model.compartments[c].name;
        cls.stateCount = stateCount;
        cls.paramCount = static_cast<int>(prog.params.size());
        classes.push_back(std::move(cls));
        representatives.emplace_back(std::move(prog), roles);
        prog = representatives.back().first; // the member tables below read the copy
      }
      PieceClass &cls = classes[chosen];
      cls.members.push_back(static_cast<int>(c));
      cls.states.insert(cls.states.end(), prog.states.begin(), prog.states.end());
      cls.params.insert(cls.params.end(), prog.params.begin(), prog.params.end());
      cls.outputs.insert(cls.outputs.end(), layout.targets.begin(), layout.targets.end());
    }
  }
  std::vector<int> unowned;
  for (size_t o = 0; o < own.output.size(); ++o)
    if (own.output[o] < 0)
      unowned.push_back(static_cast<int>(o));
  if (!unowned.empty()) {
    LocalProgram prog = localiser.build(unowned, -1);
    split.rest = toKernel(prog);
    split.restOutputs = prog.outputs;
  }
  return split;
}

PieceRunner::PieceRunner(std::shared_ptr<const PieceSplit> split, std::vector<std::vector<ClassKernel>> kernels,
                         KernelRef rest)
    : split_(std::move(split)), kernels_(std::move(kernels)), rest_(rest) {
  size_t widest = 0;
  for (int part = 0; part < kernelPartCount; ++part)
    for (size_t k = 0; k < split_->parts[part].size(); ++k) {
      const PieceClass &cls = split_->parts[part][k];
      size_t slots = std::max(
          {static_cast<size_t>(cls.stateCount), static_cast<size_t>(cls.paramCount), cls.kernel.outputs.size()});
      widest = std::max(widest, slots * static_cast<size_t>(kernels_[part][k].lanes));
    }
  widest_ = std::max(widest, split_->restOutputs.size());
}

void PieceRunner::run(const double *y, const double *p, double t, double *out, KernelPart part) {
  assert(part != KernelPart::Step || prepared(part)); // its layout is not the outputs'
  if (!split_->prepared[static_cast<int>(part)])
    part = KernelPart::All;
  // Scratch per thread: threads running points of a sweep share one runner.
  thread_local std::vector<double> y_, p_, out_;
  if (y_.size() < widest_)
    for (auto *v : {&y_, &p_, &out_})
      v->assign(widest_, 0);
  const std::vector<PieceClass> &classes = split_->parts[static_cast<int>(part)];
  for (size_t k = 0; k < classes.size(); ++k) {
    const PieceClass &cls = classes[k];
    const ClassKernel &fn = kernels_[static_cast<int>(part)][k];
    size_t lanes = static_cast<size_t>(fn.lanes), members = cls.members.size();
    size_t states = static_cast<size_t>(cls.stateCount), params = static_cast<size_t>(cls.paramCount);
    size_t outputs = cls.kernel.outputs.size();
    for (size_t first = 0; first < members; first += lanes) {
      for (size_t l = 0; l < lanes; ++l) {
        size_t m = std::min(first + l, members - 1);
        for (size_t j = 0; j < states; ++j)
          y_[j * lanes + l] = y[cls.states[m * states + j]];
        for (size_t j = 0; j < params; ++j)
          p_[j * lanes + l] = p[cls.params[m * params + j]];
      }
      fn.kernel(y_.data(), p_.data(), t, out_.data());
      for (size_t l = 0; l < lanes && first + l < members; ++l) {
        size_t m = first + l;
        for (size_t j = 0; j < outputs; ++j)
          out[cls.outputs[m * outputs + j]] = out_[j * lanes + l];
      }
    }
  }
  if (part == KernelPart::All && split_->rest) {
    rest_(y, p, t, out_.data());
    for (size_t j = 0; j < split_->restOutputs.size(); ++j)
      out[split_->restOutputs[j]] = out_[j];
  }
}

} // namespace saltpan
