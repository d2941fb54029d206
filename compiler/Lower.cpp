// Lower.cpp - Stage 8: builds the IR kernel of a model for one protocol.
#include "Lower.h"

#include "Analyze.h"
#include "Decimal.h"
#include "Diagnostics.h"
#include "DisplayUnits.h"
#include "Evaluate.h"
#include "Interpret.h"
#include "Nearest.h"
#include "Physics.h"
#include "Places.h"

#include <algorithm>
#include <cmath>
#include <map>

namespace saltpan {

using namespace ast;
using ir::NodeId;
using ir::Op;

std::vector<const ProtocolDecl *> protocols(const Program &program) {
  std::vector<const ProtocolDecl *> out;
  for (auto &m : program.modules)
    for (auto &d : m->decls)
      if (auto *p = dyn_cast<ProtocolDecl>(d.get()))
        out.push_back(p);
  return out;
}

bool lowerable(const AnalyzedModel &model) { return model.temperature && !model.compartments.empty(); }

namespace {

// Where an expression is being lowered: its compartment and the membrane potential node.
struct Env {
  const CompartmentValues *compartment = nullptr;
  NodeId voltage = -1;
  const std::vector<NodeId> *args = nullptr; // parameters of the inlined function
  const std::map<const IonDecl *, NodeId> *pools = nullptr; // dynamic inside concentrations
};

class Lowerer {
public:
  Lowerer(const AnalyzedModel &model, Evaluator &evaluator, DiagnosticEngine &diags, ir::Model &out)
      : model_(model), evaluator_(evaluator), diags_(diags), out_(out), k_(out.kernel) {}

  bool run(const Program &program, const ProtocolDecl *protocol) {
    out_.name = model_.header ? model_.header->name : ""; // no header: unnamed
    out_.temperature = model_.temperature.value_or(NAN);
    if (!lowerable(model_)) {
      diags_.error(protocol ? protocol->nameRange : SourceRange{}, !model_.temperature
                                                                       ? "the model has no temperature to simulate at"
                                                                       : "the model has no compartment to simulate");
      return false;
    }
    for (const CompartmentValues &c : model_.compartments) {
      // A cable's pieces share everything but their geometry: its first piece reports for all.
      size_t errors = diags_.errorCount();
      if (c.piece > 0 && quietCable_ == c.decl)
        continue;
      compartment(c, protocol);
      if (c.piece == 0 && diags_.errorCount() > errors)
        quietCable_ = c.decl;
    }
    for (const JunctionValues &j : model_.junctions)
      out_.junctions.push_back({static_cast<int>(j.parent), static_cast<int>(j.child), j.conductance});
    if (ok_)
      clampCurrentsThroughJunctions();
    if (protocol)
      lowerProtocol(*protocol);
    else
      defaultProtocol();
    (void)program;
    if (ok_)
      initialiseGates();
    return ok_;
  }

private:
  const AnalyzedModel &model_;
  Evaluator &evaluator_;
  const CompartmentDecl *quietCable_ = nullptr; // a cable whose first piece reported errors
  std::map<const Position *, int> pieces_;      // the piece each place along a cable falls in
  std::map<std::string, int> paramByName_;
  DiagnosticEngine &diags_;
  ir::Model &out_;
  ir::Kernel &k_;
  bool ok_ = true;

  void fail(SourceRange at, const std::string &message) {
    diags_.error(at, message);
    ok_ = false;
  }

  int addState(const std::string &name, double initial) {
    out_.stateNames.push_back(name);
    out_.initialState.push_back(initial);
    return static_cast<int>(out_.stateNames.size()) - 1;
  }
  int addParamIndex(const std::string &name, double value, Dimension dim) {
    // The pieces of a cable share its parameters (one density, one capacitance for the whole
    // cable, as the spec writes them), so --set and a sweep change the cable, not one piece.
    if (auto it = paramByName_.find(name); it != paramByName_.end()) {
      size_t i = static_cast<size_t>(it->second);
      if (out_.params[i] == value && out_.paramDims[i] == dim)
        return it->second;
    }
    paramByName_.emplace(name, static_cast<int>(out_.params.size()));
    out_.paramNames.push_back(name);
    out_.params.push_back(value);
    out_.paramDims.push_back(dim);
    return static_cast<int>(out_.params.size()) - 1;
  }
  NodeId addParam(const std::string &name, double value, Dimension dim) {
    return k_.param(addParamIndex(name, value, dim));
  }
  void probe(const std::string &name, const std::string &unit, double scale, NodeId node, bool entryCurrent = false) {
    ir::Probe r{name, unit, scale, -1, k_.addOutput(node), entryCurrent};
    out_.probes.push_back(r);
  }
  // A recorded quantity shown in the display unit of its dimension (DisplayUnits.h).
  void probe(const std::string &name, const Dimension &dim, NodeId node, bool entryCurrent = false) {
    DisplayUnit unit = displayUnit(dim);
    probe(name, unit.name, unit.scale, node, entryCurrent);
  }

  NodeId add(NodeId a, NodeId b) { return k_.binary(Op::Add, a, b); }
  NodeId sub(NodeId a, NodeId b) { return k_.binary(Op::Sub, a, b); }
  NodeId mul(NodeId a, NodeId b) { return k_.binary(Op::Mul, a, b); }
  NodeId div(NodeId a, NodeId b) { return k_.binary(Op::Div, a, b); }
  NodeId num(double v) { return k_.constant(v); }

  // ---- expressions ----

  NodeId expr(const Expr &e, const Env &env) {
    SourceLoc loc = e.range.begin;
    switch (e.kind) {
    case ExprKind::Number:
      return num(static_cast<const NumberExpr &>(e).value);
    case ExprKind::Name: {
      auto &n = static_cast<const NameExpr &>(e);
      if (n.paramIndex >= 0 && env.args)
        return (*env.args)[n.paramIndex];
      if (n.builtin == Builtin::MembranePotential && env.voltage >= 0)
        return env.voltage;
      if (n.builtin == Builtin::Temperature)
        return num(*model_.temperature);
      if (auto *c = dyn_cast<ConstDecl>(n.target))
        if (auto v = evaluator_.constant(*c))
          return num(*v);
      fail(e.range, "cannot lower '" + n.name + "' here");
      return num(NAN);
    }
    case ExprKind::Concentration: {
      auto &c = static_cast<const ConcentrationExpr &>(e);
      if (c.side == Side::Inside && env.pools && c.target)
        if (auto it = env.pools->find(c.target); it != env.pools->end())
          return it->second;
      if (env.compartment && c.target)
        if (auto v = env.compartment->concentration(c.target, c.side))
          return num(*v);
      fail(e.range, "no concentration of '" + c.ion + "' " + (c.side == Side::Inside ? "inside" : "outside") +
                        " to simulate with");
      return num(NAN);
    }
    case ExprKind::Call:
      return call(static_cast<const CallExpr &>(e), env);
    case ExprKind::Unary: {
      auto &u = static_cast<const UnaryExpr &>(e);
      NodeId x = expr(*u.operand, env);
      return u.op == UnaryOp::Negate ? k_.unary(Op::Neg, x, loc) : u.op == UnaryOp::Not ? k_.unary(Op::Not, x, loc) : x;
    }
    case ExprKind::Binary: {
      auto &b = static_cast<const BinaryExpr &>(e);
      NodeId l = expr(*b.lhs, env), r = expr(*b.rhs, env);
      static const Op ops[] = {Op::Add, Op::Sub, Op::Mul, Op::Div, Op::Pow, Op::Eq, Op::Ne,
                               Op::Lt,  Op::Le,  Op::Gt,  Op::Ge,  Op::And, Op::Or};
      return k_.binary(ops[static_cast<int>(b.op)], l, r, loc);
    }
    case ExprKind::If: {
      auto &i = static_cast<const IfExpr &>(e);
      return k_.select(expr(*i.cond, env), expr(*i.thenExpr, env), expr(*i.elseExpr, env), loc);
    }
    }
    return num(NAN);
  }

  NodeId call(const CallExpr &c, const Env &env) {
    SourceLoc loc = c.range.begin;
    if (c.math == MathFn::Reversal) {
      if (c.reversalIon)
        if (NodeId dynamic = nernstNode(c.reversalIon, env); dynamic >= 0)
          return dynamic;
      if (env.compartment && c.reversalIon)
        if (auto v = env.compartment->nernst(c.reversalIon, *model_.temperature))
          return num(*v);
      fail(c.range, "no reversal potential of '" + (c.reversalIon ? c.reversalIon->name : "?") + "' to simulate with");
      return num(NAN);
    }
    std::vector<NodeId> args;
    for (auto &a : c.args)
      args.push_back(expr(*a, env));
    switch (c.math) {
    case MathFn::Exp: return k_.unary(Op::Exp, args[0], loc);
    case MathFn::Expm1: return k_.unary(Op::Expm1, args[0], loc);
    case MathFn::Log: return k_.unary(Op::Log, args[0], loc);
    case MathFn::Log10: return k_.unary(Op::Log10, args[0], loc);
    case MathFn::Sqrt: return k_.unary(Op::Sqrt, args[0], loc);
    case MathFn::Abs: return k_.unary(Op::Abs, args[0], loc);
    case MathFn::Tanh: return k_.unary(Op::Tanh, args[0], loc);
    case MathFn::Pow: return k_.binary(Op::Pow, args[0], args[1], loc);
    case MathFn::Min: return k_.binary(Op::Min, args[0], args[1], loc);
    case MathFn::Max: return k_.binary(Op::Max, args[0], args[1], loc);
    case MathFn::Reversal:
    case MathFn::None:
      break;
    }
    if (!c.target) {
      fail(c.range, "cannot lower the call to '" + c.callee + "'");
      return num(NAN);
    }
    Env inner = env;
    inner.args = &args;
    return expr(*c.target->body, inner); // functions are inlined; shared nodes keep it small
  }

  // The Nernst potential of an ion whose inside concentration is dynamic, or -1.
  NodeId nernstNode(const IonDecl *ion, const Env &env) {
    if (!env.pools || !env.compartment)
      return -1;
    auto it = env.pools->find(ion);
    auto z = integerValence(*ion);
    auto out = env.compartment->outside ? env.compartment->outside->get(ion) : std::nullopt;
    if (it == env.pools->end() || !z || !out)
      return -1;
    double scale = physics::thermalVoltage(*model_.temperature) / *z;
    return mul(num(scale), k_.unary(Op::Log, div(num(*out), it->second)));
  }

  // Outward current density carried by each dynamic ion of the compartment being lowered.
  std::map<const IonDecl *, NodeId> ionCurrent_;
  bool allCarried_ = true;

  void carries(const IonDecl *ion, NodeId current, const Env &env) {
    if (!ion) {
      allCarried_ = false;
      return;
    }
    if (!env.pools || !env.pools->count(ion))
      allCarried_ = false;
    auto [it, inserted] = ionCurrent_.emplace(ion, current);
    if (!inserted)
      it->second = add(it->second, current);
  }

  // ---- membrane entries ----

  struct Currents {
    NodeId g, ge, other, stimulus;
  };

  NodeId q10Factor(const ChannelDecl &ch) {
    if (!ch.q10 || !ch.q10Reference)
      return num(1);
    auto q = evaluator_.evaluate(*ch.q10, {});
    auto ref = evaluator_.evaluate(*ch.q10Reference, {});
    if (!q || !ref) {
      fail(ch.q10Range, "cannot compute the Q10 factor of '" + ch.name + "'");
      return num(1);
    }
    return num(std::pow(*q, (*model_.temperature - *ref) / 10.0));
  }

  // The open fraction of a placed channel: product of its gates raised to their powers.
  NodeId gates(const ChannelDecl &ch, const std::string &prefix, const Env &env) {
    NodeId phi = q10Factor(ch);
    NodeId open = num(1);
    for (const Gate &g : ch.gates) {
      std::string name = prefix + "." + g.name;
      int state = addState(name, 0);
      NodeId inf, tau;
      if (g.opening && g.closing) {
        NodeId alpha = mul(expr(*g.opening, env), phi), beta = mul(expr(*g.closing, env), phi);
        NodeId sum = add(alpha, beta);
        inf = div(alpha, sum);
        tau = div(num(1), sum);
      } else if (g.steady && g.tau) {
        inf = expr(*g.steady, env);
        tau = div(expr(*g.tau, env), phi);
      } else {
        fail(g.nameRange, "gate '" + g.name + "' has no complete kinetics");
        continue;
      }
      ir::Gate gate{name, state, k_.addOutput(inf), k_.addOutput(tau)};
      out_.gates.push_back(gate);
      out_.probes.push_back({name, "1", 1, state, -1});
      NodeId x = k_.state(state);
      int power = static_cast<int>(g.power.value);
      for (int i = 0; i < power; ++i)
        open = mul(open, x);
    }
    return open;
  }

  // GHK current density (A/m2, outward positive) of one ion with permeability `perm`.
  NodeId ghkNode(NodeId perm, int z, NodeId inside, double outside, NodeId v) {
    double zF = z * physics::faraday;
    NodeId u = mul(v, num(z / physics::thermalVoltage(*model_.temperature))); // zFV/RT
    NodeId negU = k_.unary(Op::Neg, u);
    // u / (1 - e^-u), whose limit at u = 0 is 1
    NodeId factor = k_.select(k_.binary(Op::Eq, u, num(0)), num(1),
                              div(u, k_.unary(Op::Neg, k_.unary(Op::Expm1, negU))));
    NodeId drive = sub(inside, mul(num(outside), k_.unary(Op::Exp, negU)));
    return mul(mul(perm, num(zF)), mul(factor, drive));
  }

  // A parameter's name: a compartment's, or for a piece its cable's (`dend.Leak.density`).
  static std::string paramName(const CompartmentValues &c, const std::string &item) {
    return c.decl->name + "." + item;
  }

  void channel(const Placement &p, const CompartmentValues &c, Currents &cur, const Env &env) {
    const ChannelDecl &ch = *p.channel;
    std::string prefix = c.name + "." + p.entry->name;
    if (!p.density) {
      fail(p.entry->nameRange, "the density of '" + ch.name + "' is unknown");
      return;
    }
    NodeId density = addParam(paramName(c, p.entry->name + ".density"), *p.density, p.entry->density->type.dim);
    NodeId open = gates(ch, prefix, env);
    NodeId current;
    if (p.densityKind == DensityKind::Permeability) {
      NodeId perm = mul(density, open);
      current = num(0);
      for (const CarriedIon &k : ch.carries) {
        auto z = k.target ? integerValence(*k.target) : std::nullopt;
        auto in = k.target ? c.inside.get(k.target) : std::nullopt;
        auto out = k.target && c.outside ? c.outside->get(k.target) : std::nullopt;
        if (!z || !in || !out) {
          fail(p.entry->nameRange, "'" + ch.name + "' needs the valence and both concentrations of '" + k.ion +
                                       "' for its GHK current");
          return;
        }
        double ratio = k.hasRatio ? k.ratio.value : 1.0;
        NodeId inside = num(*in);
        if (env.pools)
          if (auto it = env.pools->find(k.target); it != env.pools->end())
            inside = it->second;
        NodeId part = ghkNode(mul(perm, num(ratio)), *z, inside, *out, env.voltage);
        carries(k.target, part, env);
        current = add(current, part);
      }
      if (ch.carries.empty()) {
        fail(p.entry->nameRange, "a permeability density needs the ions '" + ch.name + "' carries");
        return;
      }
      cur.other = add(cur.other, current);
    } else {
      if (!p.reversal) {
        fail(p.entry->nameRange, "the reversal potential of '" + ch.name + "' in '" + c.decl->name + "' is unknown");
        return;
      }
      NodeId e = addParam(paramName(c, p.entry->name + ".reversal"), *p.reversal, dims::voltage());
      // A Nernst reversal follows a dynamic concentration; a written one stays as written.
      const IonDecl *single = ch.carries.size() == 1 ? ch.carries[0].target : nullptr;
      if (p.reversalKind == ReversalKind::Nernst && single)
        if (NodeId dynamic = nernstNode(single, env); dynamic >= 0)
          e = dynamic;
      if (p.reversalKind == ReversalKind::Ghk && env.pools)
        for (const CarriedIon &k : ch.carries)
          if (env.pools->count(k.target))
            fail(p.entry->nameRange, "'" + ch.name + "' has a GHK reversal from several ions, so its current cannot "
                                     "be shared among their dynamic concentrations; give it a permeability density");
      NodeId g = mul(density, open);
      cur.g = add(cur.g, g);
      cur.ge = add(cur.ge, mul(g, e));
      current = mul(g, sub(env.voltage, e));
      probe(prefix + ".conductance", dims::conductanceDensity(), g);
      probe(prefix + ".reversal", dims::voltage(), e);
      if (single)
        carries(single, current, env);
      else
        allCarried_ = false;
    }
    probe(prefix + ".current", dims::currentDensity(), current, true);
  }

  void pump(const Placement &p, const CompartmentValues &c, Currents &cur, const Env &env) {
    const PumpDecl &pump = *p.pump;
    std::string prefix = c.name + "." + p.entry->name;
    auto values = model_.pumps.find(&pump);
    if (!p.density || !pump.activity || values == model_.pumps.end() || !values->second.chargeKnown) {
      fail(p.entry->nameRange, "'" + pump.name + "' cannot be simulated without a density, cycle and activity");
      return;
    }
    int net = values->second.netOutwardCharge;
    NodeId density = addParam(paramName(c, p.entry->name + ".density"), *p.density, p.entry->density->type.dim);
    NodeId activity = expr(*pump.activity, env);
    NodeId current, cycles; // cycles per area and time
    if (p.densityKind == DensityKind::Current) {
      current = mul(mul(density, activity), num(net > 0 ? 1.0 : -1.0)); // the cycle fixes the sign
      cycles = div(mul(density, activity), num(std::abs(net) * physics::faraday));
    } else {
      cycles = mul(density, activity);
      current = mul(cycles, num(net * physics::faraday));
    }
    cur.other = add(cur.other, current);
    for (const StoichTerm &t : pump.cycle) {
      auto z = t.target ? integerValence(*t.target) : std::nullopt;
      if (!z)
        continue;
      double outward = (t.direction == Direction::Out ? 1.0 : -1.0) * t.count.value * *z * physics::faraday;
      NodeId ionPart = mul(cycles, num(outward));
      carries(t.target, ionPart, env);
    }
    probe(prefix + ".current", dims::currentDensity(), current, true);
  }

  std::optional<double> time(const Expr *e) { return e ? evaluator_.evaluate(*e, {}) : std::nullopt; }

  // The piece index a position along the cable of `c` falls in: 0 without a position; -1 (after
  // an error) outside the cable.
  int pieceAt(const Position &at, const CompartmentDecl &decl) {
    if (!at)
      return 0;
    if (auto known = pieces_.find(&at); known != pieces_.end())
      return known->second; // one report for a place, not one per piece
    return pieces_[&at] = findPiece(at, decl);
  }
  int findPiece(const Position &at, const CompartmentDecl &decl) {
    const CableValues *cable = cableOf(model_, &decl);
    if (!cable)
      return -1;
    auto piece = pieceAtDistance(*cable, placeDistance(at, *cable));
    if (!piece) {
      fail(at.range, placeOutsideMessage(*cable));
      DiagnosticEngine::note(*diags_.last(), {}, placeRangeNote);
      return -1;
    }
    return static_cast<int>(*piece);
  }
  // Whether a stimulus at `at` acts on `c`: a compartment as a whole, or the piece at the place.
  bool placed(const Position &at, const CompartmentValues &c) {
    return c.piece < 0 || (c.piece == pieceAt(at, *c.decl));
  }

  // Injected current (A/m2, into the cell) of one inject line at time t.
  NodeId injection(const Injection &inj, const CompartmentValues &c) {
    auto amp = time(inj.amplitude.get());
    auto from = time(inj.from.get()), to = time(inj.to.get());
    if (!amp || !from || !to) {
      fail(inj.range, "cannot compute this injection");
      return num(0);
    }
    if (*to <= *from) {
      fail(inj.to->range, "an injection must end after it starts");
      return num(0);
    }
    double perArea = 1;
    if (inj.amplitude->type.dim == dims::current()) {
      if (!c.area || *c.area <= 0) {
        fail(inj.amplitude->range, "an absolute current needs the area of compartment '" + c.decl->name +
                                       "'; give its geometry or inject a current density (uA/cm2)");
        return num(0);
      }
      perArea = 1 / *c.area;
    }
    NodeId t = k_.time();
    auto window = [&](double a, double b) {
      return k_.binary(Op::And, k_.binary(Op::Ge, t, num(a)), k_.binary(Op::Lt, t, num(b)));
    };
    switch (inj.shape) {
    case InjectionShape::Step:
      return k_.select(window(*from, *to), num(*amp * perArea), num(0));
    case InjectionShape::Ramp: {
      auto end = time(inj.amplitudeEnd.get());
      if (!end) {
        fail(inj.range, "cannot compute this ramp");
        return num(0);
      }
      double slope = (*end - *amp) / (*to - *from) * perArea;
      NodeId value = add(num(*amp * perArea), mul(num(slope), sub(t, num(*from))));
      return k_.select(window(*from, *to), value, num(0));
    }
    case InjectionShape::Pulses: {
      auto width = time(inj.width.get()), period = time(inj.period.get());
      if (!width || !period || *width <= 0 || *period <= 0 || *width > *period) {
        fail(inj.range, "pulses need a positive width no longer than their interval");
        return num(0);
      }
      double count = trainCount(*from, *to, *period);
      if (count > 1000) {
        fail(inj.range, "a pulse train may have at most 1000 pulses");
        return num(0);
      }
      NodeId sum = num(0);
      for (int i = 0; i < static_cast<int>(count); ++i) {
        double a = *from + i * *period;
        sum = add(sum, k_.select(window(a, std::min(a + *width, *to)), num(*amp * perArea), num(0)));
      }
      return sum;
    }
    }
    return num(0);
  }

  // How many events a train `every P from T1 to T2` has: one at T1 + k P for each k with
  // T1 + k P < T2 (T2 itself is excluded), the same for pulses and synaptic trains. A start
  // within rounding of T2 (20 ms + 5 * 20 ms against 120 ms) counts as at T2.
  static double trainCount(double from, double to, double every) {
    return std::max(0.0, std::ceil((to - from) / every - 1e-9));
  }

  // The time course of one synaptic event, peak 1, at s = t - onset >= 0.
  NodeId waveform(const Synapse &syn, NodeId s) {
    auto neg = [&](NodeId x) { return k_.unary(Op::Neg, x); };
    auto decayOf = [&](double tau) { return k_.unary(Op::Exp, neg(div(s, num(tau)))); };
    switch (syn.shape) {
    case SynapseShape::SingleExponential: {
      auto decay = time(syn.decay.get());
      if (!decay || *decay <= 0) {
        fail(syn.range, "a synaptic decay time must be positive");
        return num(0);
      }
      return decayOf(*decay);
    }
    case SynapseShape::DoubleExponential: {
      auto rise = time(syn.rise.get()), decay = time(syn.decay.get());
      if (!rise || !decay || *rise <= 0 || *decay <= *rise) {
        fail(syn.range, "a synapse needs 0 < rise < decay");
        return num(0);
      }
      double peakTime = *rise * *decay / (*decay - *rise) * std::log(*decay / *rise);
      double norm = std::exp(-peakTime / *decay) - std::exp(-peakTime / *rise);
      return div(sub(decayOf(*decay), decayOf(*rise)), num(norm));
    }
    case SynapseShape::Alpha: {
      auto peak = time(syn.peak.get());
      if (!peak || *peak <= 0) {
        fail(syn.range, "a synaptic time to peak must be positive");
        return num(0);
      }
      NodeId x = div(s, num(*peak)); // (s/tp) e^(1 - s/tp)
      return mul(x, k_.unary(Op::Exp, sub(num(1), x)));
    }
    }
    return num(0);
  }

  // A conductance input: linear in V, so it joins G and GE and stays exact under
  // exponential Euler.
  void synapse(const Synapse &syn, const CompartmentValues &c, Currents &cur, const Env &env, int number) {
    auto gmax = time(syn.conductance.get());
    auto reversal = time(syn.reversal.get());
    if (!gmax || !reversal || *gmax < 0) {
      fail(syn.range, "a synapse needs a non-negative conductance and a reversal potential");
      return;
    }
    double perArea = 1;
    if (syn.conductance->type.dim != dims::conductanceDensity()) {
      if (!c.area || *c.area <= 0) {
        fail(syn.conductance->range, "an absolute conductance needs the area of compartment '" + c.decl->name + "'");
        return;
      }
      perArea = 1 / *c.area;
    }
    std::vector<double> onsets;
    for (auto &t : syn.times)
      if (auto v = time(t.get()))
        onsets.push_back(*v);
    if (syn.every) {
      auto every = time(syn.every.get()), from = time(syn.from.get()), to = time(syn.to.get());
      if (!every || !from || !to || *every <= 0 || *to < *from) {
        fail(syn.range, "a synaptic train needs a positive interval and an end after its start");
        return;
      }
      double count = std::min(trainCount(*from, *to, *every), 1001.0);
      for (int i = 0; i < static_cast<int>(count); ++i)
        onsets.push_back(*from + i * *every);
    }
    if (onsets.size() > 1000) {
      fail(syn.range, "a synapse may have at most 1000 events");
      return;
    }
    NodeId t = k_.time();
    NodeId sum = num(0);
    for (double onset : onsets) {
      NodeId s = sub(t, num(onset));
      sum = add(sum, k_.select(k_.binary(Op::Ge, t, num(onset)), waveform(syn, s), num(0)));
    }
    NodeId g = mul(num(*gmax * perArea), sum);
    allCarried_ = false; // a synaptic current is not assigned to any ion
    cur.g = add(cur.g, g);
    cur.ge = add(cur.ge, mul(g, num(*reversal)));
    std::string prefix = c.name + ".synapse" + std::to_string(number);
    // The conductance is recorded in the kind of unit it was given in: nS for an absolute one.
    if (perArea == 1)
      probe(prefix + ".conductance", dims::conductanceDensity(), g);
    else
      probe(prefix + ".conductance", "nS", *c.area * 1e9, g);
    probe(prefix + ".current", dims::currentDensity(), mul(g, sub(env.voltage, num(*reversal))));
  }

  void clamps(const ProtocolDecl &p, const CompartmentValues &c, ir::Compartment &comp) {
    const Clamp *holding = nullptr;
    std::vector<const Clamp *> steps;
    for (const Clamp &cl : p.clamps) {
      if (cl.target != c.decl || !placed(cl.position, c)) // on a cable, the piece at its place
        continue;
      if (!cl.from) {
        if (holding) {
          fail(cl.range, (c.piece < 0 ? "compartment '" : "piece '") + c.name + "' already has a holding potential");
          DiagnosticEngine::note(*diags_.last(), holding->range, "the first holding clamp");
          continue;
        }
        holding = &cl;
      } else {
        steps.push_back(&cl);
      }
    }
    if (!holding && steps.empty())
      return;
    NodeId t = k_.time();
    NodeId command = holding ? num(time(holding->level.get()).value_or(NAN)) : num(0);
    NodeId clamped = num(holding ? 1 : 0);
    for (auto it = steps.rbegin(); it != steps.rend(); ++it) { // earlier lines win where windows overlap
      auto level = time((*it)->level.get()), from = time((*it)->from.get()), to = time((*it)->to.get());
      if (!level || !from || !to || *to <= *from) {
        fail((*it)->range, "a clamp step needs a level and an end after its start");
        continue;
      }
      NodeId inside = k_.binary(Op::And, k_.binary(Op::Ge, t, num(*from)), k_.binary(Op::Lt, t, num(*to)));
      command = k_.select(inside, num(*level), command);
      clamped = k_.binary(Op::Or, inside, clamped);
    }
    comp.clampedOutput = k_.addOutput(clamped);
    comp.commandOutput = k_.addOutput(command);
  }

  // A clamped compartment of a tree holds its neighbours too: its clamp current gains what
  // leaves through each junction, g (V - V_neighbour), per its membrane area.
  void clampCurrentsThroughJunctions() {
    for (const ir::Junction &j : out_.junctions)
      for (auto [self, other] : {std::pair{j.parent, j.child}, std::pair{j.child, j.parent}}) {
        const ir::Compartment &c = out_.compartments[static_cast<size_t>(self)];
        int held = c.clampedOutput < 0 ? -1 : out_.findProbe(c.name + ".clamp_current");
        if (held < 0 || !(c.area > 0))
          continue;
        int voltage = out_.compartments[static_cast<size_t>(other)].voltageState;
        NodeId outward = mul(num(j.conductance / c.area), sub(k_.state(c.voltageState), k_.state(voltage)));
        NodeId &probed = k_.outputs[static_cast<size_t>(out_.probes[static_cast<size_t>(held)].output)];
        probed = add(probed, mul(k_.outputs[static_cast<size_t>(c.clampedOutput)], outward));
      }
  }

  void compartment(const CompartmentValues &c, const ProtocolDecl *protocol) {
    const CompartmentDecl &d = *c.decl;
    if (!c.initialV) {
      fail(d.nameRange, "compartment '" + d.name + "' has no initial potential to start from");
      DiagnosticEngine::note(*diags_.last(), {}, "add e.g. 'initial V = -65 mV'");
      return;
    }
    if (!c.capacitance || *c.capacitance <= 0) {
      fail(d.nameRange, "compartment '" + d.name + "' needs a positive capacitance to simulate");
      return;
    }
    ir::Compartment comp;
    comp.name = c.name;
    comp.area = c.area.value_or(0);
    comp.voltageState = addState(c.name + ".V", *c.initialV);
    comp.capacitanceParam = addParamIndex(paramName(c, "capacitance"), *c.capacitance, dims::specificCapacitance());
    std::map<const IonDecl *, NodeId> pools;
    for (const CompartmentValues::Pool &pool : c.pools) {
      auto z = integerValence(*pool.ion);
      auto initial = c.inside.get(pool.ion);
      if (!z || !initial) {
        fail(pool.entry->range, "a dynamic concentration needs a valence and a value");
        continue;
      }
      int state = addState(c.name + "." + pool.ion->name, *initial);
      pools[pool.ion] = k_.state(state);
      out_.pools.push_back({c.name + "." + pool.ion->name, static_cast<int>(out_.compartments.size()), state, -1, *z,
                            pool.areaPerVolume});
      DisplayUnit mM = displayUnit(dims::concentration());
      out_.probes.push_back({c.name + "." + pool.ion->name, mM.name, mM.scale, state, -1});
    }
    size_t firstPool = out_.pools.size() - pools.size();
    ionCurrent_.clear();
    allCarried_ = true;
    Env env{&c, k_.state(comp.voltageState), nullptr, pools.empty() ? nullptr : &pools};
    Currents cur{num(0), num(0), num(0), num(0)};
    for (const Placement &p : c.placements) {
      if (p.channel)
        channel(p, c, cur, env);
      else if (p.pump)
        pump(p, c, cur, env);
    }
    if (protocol) {
      for (const Injection &inj : protocol->injections)
        if (inj.target == &d && placed(inj.position, c))
          cur.stimulus = add(cur.stimulus, injection(inj, c));
      int number = 0;
      for (const Synapse &syn : protocol->synapses)
        if (syn.target == &d && placed(syn.position, c))
          synapse(syn, c, cur, env, ++number);
      clamps(*protocol, c, comp);
    }
    NodeId ionic = add(sub(mul(cur.g, env.voltage), cur.ge), cur.other);
    for (size_t i = firstPool; i < out_.pools.size(); ++i) {
      ir::Pool &pool = out_.pools[i];
      const IonDecl *ion = nullptr;
      for (auto &[candidate, node] : pools)
        if (out_.stateNames[pool.state] == c.name + "." + candidate->name)
          ion = candidate;
      NodeId current = ionCurrent_.count(ion) ? ionCurrent_[ion] : num(0);
      // Outward current removes the ion from the inside: d[X]/dt = -I (A/V) / (z F).
      pool.derivativeOutput =
          k_.addOutput(mul(current, num(-pool.areaPerVolume / (pool.valence * physics::faraday))));
      if (NodeId e = nernstNode(ion, env); e >= 0)
        probe(pool.name + ".reversal", dims::voltage(), e);
    }
    // Whether its membrane's charge can balance its ions'; a joined one balances with its tree.
    comp.allCurrentCarried = !pools.empty() && allCarried_;
    std::vector<const IonDecl *> carried;
    for (auto &[ion, current] : ionCurrent_)
      carried.push_back(ion);
    std::sort(carried.begin(), carried.end(), [](auto *a, auto *b) { return a->name < b->name; });
    for (const IonDecl *ion : carried)
      probe(c.name + "." + ion->name + ".current", dims::currentDensity(), ionCurrent_[ion]);
    comp.gOutput = k_.addOutput(cur.g);
    comp.geOutput = k_.addOutput(cur.ge);
    comp.iOtherOutput = k_.addOutput(sub(cur.other, cur.stimulus)); // injected current enters the cell
    comp.injectedOutput = k_.addOutput(cur.stimulus);
    out_.compartments.push_back(comp);
    DisplayUnit mV = displayUnit(dims::voltage());
    out_.probes.push_back({c.name + ".V", mV.name, mV.scale, comp.voltageState, -1});
    probe(c.name + ".membrane_current", dims::currentDensity(), ionic);
    // While clamped, the amplifier supplies the ionic current (and, in a tree, what flows out
    // through the junctions: clampCurrentsThroughJunctions). A piece's is absolute: per piece
    // area it would change with the cut.
    if (NodeId held = comp.clampedOutput >= 0 ? mul(k_.outputs[comp.clampedOutput], ionic) : -1; held >= 0) {
      if (c.piece >= 0)
        probe(c.name + ".clamp_current", "nA", comp.area * 1e9, held);
      else
        probe(c.name + ".clamp_current", dims::currentDensity(), held);
    }
    probe(c.name + ".injected", dims::currentDensity(), cur.stimulus);
  }

  void defaultProtocol() {
    out_.protocol = ir::Protocol{};
    recordEveryPotential();
    if (!out_.junctions.empty()) // exponential Euler relaxes one compartment at a time
      out_.protocol.method = ir::Method::CrankNicolson;
  }

  // Without a method: exponential Euler, or for joined compartments Crank-Nicolson (exponential
  // Euler relaxes one compartment at a time).
  ir::Method method(IntegrationMethod m) const {
    switch (m) {
    case IntegrationMethod::RungeKutta4: return ir::Method::RungeKutta4;
    case IntegrationMethod::DormandPrince: return ir::Method::DormandPrince;
    case IntegrationMethod::Rosenbrock: return ir::Method::Rosenbrock;
    case IntegrationMethod::BackwardEuler: return ir::Method::BackwardEuler;
    case IntegrationMethod::CrankNicolson: return ir::Method::CrankNicolson;
    case IntegrationMethod::Default:
      return out_.junctions.empty() ? ir::Method::ExponentialEuler : ir::Method::CrankNicolson;
    case IntegrationMethod::ExponentialEuler:
    case IntegrationMethod::Unknown: break;
    }
    return ir::Method::ExponentialEuler;
  }

  void lowerProtocol(const ProtocolDecl &p) {
    ir::Protocol &proto = out_.protocol;
    proto.name = p.name;
    // CheckProtocol (stage 8a) judges the method and the timing on the lowered model; a value it
    // will refuse is passed over here, and the model is then not kept.
    proto.method = method(p.method);
    if (auto v = time(p.step.get()))
      proto.step = *v;
    if (auto v = time(p.tolerance.get()))
      proto.rtol = *v;
    if (auto v = time(p.duration.get()))
      proto.duration = *v;
    proto.every = proto.step;
    if (auto v = time(p.every.get()))
      proto.every = *v;
    for (const RecordTarget &r : p.records) {
      std::string name = recordedName(r);
      if (name.empty())
        continue; // a place along a cable, already reported
      int index = out_.findProbe(name);
      if (index < 0) {
        fail(r.range, "there is nothing called '" + r.path + "' to record");
        std::vector<std::string> names;
        for (const ir::Probe &probe : out_.probes)
          names.push_back(probe.name);
        std::vector<std::string> near = nearestNames(r.path, names);
        std::string some;
        for (size_t i = 0; i < near.size(); ++i)
          some += (i ? " or '" : "'") + near[i] + "'";
        if (!some.empty())
          DiagnosticEngine::note(*diags_.last(), {}, "did you mean " + some + "?");
        else if (!names.empty()) {
          for (size_t i = 0; i < names.size() && i < 6; ++i)
            some += (i ? ", " : "") + names[i];
          DiagnosticEngine::note(*diags_.last(), {}, "probes (recorded quantities) include " + some);
        }
      } else {
        proto.record.push_back(index);
      }
    }
    if (p.records.empty())
      recordEveryPotential();
  }

  // What a record line names: a cable's quantity at a place is its piece's ("dendrite[12].V").
  std::string recordedName(const RecordTarget &r) {
    std::string head = r.path.substr(0, r.path.find('.'));
    for (const CableValues &cv : model_.cables)
      if (r.compartment && cv.decl == r.compartment) {
        if (!r.position) {
          fail(r.range, "'" + head + "' is a cable: say where along it to record");
          DiagnosticEngine::note(*diags_.last(), {}, placeExample(r.path));
          return "";
        }
        int piece = pieceAt(r.position, *cv.decl);
        return piece < 0 ? "" : head + "[" + std::to_string(piece) + "]" + r.path.substr(head.size());
      }
    return r.path;
  }

  // Without a record line: every compartment's V, and each cable's at its far end.
  void recordEveryPotential() {
    for (size_t i = 0; i < out_.compartments.size() && i < model_.compartments.size(); ++i) {
      const CompartmentValues &c = model_.compartments[i];
      bool farEnd = c.piece < 0;
      for (const CableValues &cv : model_.cables)
        farEnd = farEnd || (cv.decl == c.decl && static_cast<size_t>(c.piece) + 1 == cv.pieces);
      if (farEnd)
        out_.protocol.record.push_back(out_.findProbe(out_.compartments[i].name + ".V"));
    }
  }

  // Gates start at their steady values for the initial potentials.
  void initialiseGates() {
    Interpreter interp(out_.kernel);
    std::vector<double> outputs(out_.kernel.outputs.size());
    interp.run(out_.initialState.data(), out_.params.data(), 0.0, outputs.data());
    for (const ir::Gate &g : out_.gates)
      out_.initialState[g.state] = outputs[g.infOutput];
  }
};

} // namespace

bool lowerModel(const Program &program, const AnalyzedModel &model, Evaluator &evaluator, const ProtocolDecl *protocol,
                DiagnosticEngine &diags, ir::Model &out) {
  size_t before = diags.errorCount();
  bool ok = Lowerer(model, evaluator, diags, out).run(program, protocol);
  return ok && diags.errorCount() == before;
}

} // namespace saltpan
