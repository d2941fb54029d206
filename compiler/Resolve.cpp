// Resolve.cpp - Stage 3: one namespace for the program; binds names where they are used.
#include "Resolve.h"

#include "Diagnostics.h"
#include "Modules.h"
#include "Nearest.h"

#include <algorithm>
#include <set>

namespace saltpan {

using namespace ast;

namespace {

struct BuiltinMath {
  const char *name;
  MathFn fn;
  int arity;
};

const BuiltinMath builtinMath[] = {
    {"exp", MathFn::Exp, 1},   {"expm1", MathFn::Expm1, 1}, {"log", MathFn::Log, 1},
    {"log10", MathFn::Log10, 1}, {"sqrt", MathFn::Sqrt, 1}, {"pow", MathFn::Pow, 2},
    {"abs", MathFn::Abs, 1},   {"min", MathFn::Min, 2},     {"max", MathFn::Max, 2},
    {"tanh", MathFn::Tanh, 1}, {"E", MathFn::Reversal, 1},
};

const BuiltinMath *findMath(const std::string &name) {
  for (const BuiltinMath &m : builtinMath)
    if (name == m.name)
      return &m;
  return nullptr;
}


/// Which names an expression may use, by where it sits.
struct Context {
  const char *where;              // "a function", "a constant", ... for messages
  bool kinetics = false;          // [X]in/out and E(X) are available
  bool temperature = false;       // T is available
  const FnDecl *function = nullptr; // parameters in scope
  bool voltage = false;             // V is available (gates and activity laws)
};

class Resolver {
public:
  Resolver(SymbolTable &symbols, DiagnosticEngine &diags) : symbols_(symbols), diags_(diags) {}

  void declare(Module &module, bool isRoot) {
    SourceRange modelAt;
    for (auto &decl : module.decls) {
      Decl *d = decl.get();
      switch (d->kind) {
      case DeclKind::Use:
      case DeclKind::Expect:
        continue;
      case DeclKind::Model:
        if (modelAt.valid()) {
          auto &diag = diags_.error(d->nameRange, "a file may have only one 'model' header");
          DiagnosticEngine::note(diag, modelAt, "first header here");
        } else {
          modelAt = d->nameRange;
          if (isRoot)
            symbols_.model = static_cast<ModelDecl *>(d);
        }
        continue;
      case DeclKind::Temperature:
        if (symbols_.temperature) {
          auto &diag = diags_.error(d->range, "the model's temperature is given twice");
          DiagnosticEngine::note(diag, symbols_.temperature->range, "first given here");
        } else {
          symbols_.temperature = static_cast<TemperatureDecl *>(d);
        }
        continue;
      default:
        break;
      }
      if (d->name == "V" || d->name == "T") {
        diags_.error(d->nameRange, "'" + d->name + "' is the model's " +
                                       (d->name == "V" ? "membrane potential" : "temperature") +
                                       " and cannot be declared");
        continue;
      }
      if (findMath(d->name)) {
        diags_.error(d->nameRange, "'" + d->name + "' is a built-in function and cannot be declared");
        continue;
      }
      auto [it, inserted] = symbols_.byName.emplace(d->name, d);
      if (!inserted) {
        auto &diag = diags_.error(d->nameRange, "'" + d->name + "' is already declared");
        DiagnosticEngine::note(diag, it->second->nameRange,
                               "previous declaration of " + std::string(describe(it->second->kind)) + " '" +
                                   d->name + "' here");
      }
    }
  }

  void bind(Module &module) {
    for (auto &decl : module.decls)
      bindDecl(*decl);
  }

  void checkCycles() {
    checkCableLoops();
    for (auto &[name, decl] : symbols_.byName)
      if (decl->kind == DeclKind::Const || decl->kind == DeclKind::Fn) {
        std::vector<const Decl *> path;
        visit(decl, path);
        if (symbols_.chainTooDeep)
          return; // one report; every other start in the chain would repeat it
      }
  }

private:
  // A cable that grows, through its parents, from itself would be joined in a loop.
  void checkCableLoops() {
    for (auto &[name, decl] : symbols_.byName) {
      auto *c = dyn_cast<CompartmentDecl>(decl);
      if (!c || !c->cable)
        continue;
      std::set<const CompartmentDecl *> seen{c};
      for (const CompartmentDecl *p = c->cable->parentDecl; p && p->cable; p = p->cable->parentDecl) {
        if (p == c) {
          auto &diag = diags_.error(c->cable->parentRange, p == c->cable->parentDecl
                                                               ? "cable '" + c->name + "' grows from itself"
                                                               : "cable '" + c->name + "' grows from itself through '" +
                                                                     c->cable->parent + "'");
          DiagnosticEngine::note(diag, {}, "a cell is a tree: follow 'grows from' to a compartment or a free cable");
          break;
        }
        if (!seen.insert(p).second)
          break; // a loop that does not pass through c; reported from its own cables
      }
    }
  }

  SymbolTable &symbols_;
  DiagnosticEngine &diags_;
  std::map<const Decl *, std::vector<std::pair<const Decl *, SourceRange>>> uses_; // const/fn -> what it uses
  std::set<const Decl *> finished_, reported_;
  const Decl *current_ = nullptr; // the const or fn whose body is being bound

public:
  bool stdIonsUsed_ = false; // whether to suggest 'use std.ions' for an unknown ion

private:

  Decl *lookup(const std::string &name) {
    auto it = symbols_.byName.find(name);
    return it == symbols_.byName.end() ? nullptr : it->second;
  }

  // Reports an unknown name, suggesting a close name of a kind that fits the place.
  Diagnostic &unknown(SourceRange range, const std::string &name, const char *what,
                      std::initializer_list<DeclKind> kinds, bool unitHint = true) {
    auto &d = diags_.error(range, std::string("unknown ") + what + " '" + name + "'");
    std::string best;
    size_t bestDistance = name.size() <= 2 ? 1 : 2;
    for (auto &[candidate, decl] : symbols_.byName) {
      if (decl == current_ || std::find(kinds.begin(), kinds.end(), decl->kind) == kinds.end())
        continue;
      size_t dist = editDistance(name, candidate);
      if (dist <= bestDistance && (best.empty() || dist < editDistance(name, best)))
        best = candidate;
    }
    if (!best.empty())
      DiagnosticEngine::note(d, lookup(best)->nameRange, "did you mean '" + best + "'?");
    else if (unitHint && lookupUnitSymbol(name))
      DiagnosticEngine::note(d, {}, "'" + name + "' is a unit: write it right after its number, without spaces, "
                                    "as in '1 /" + name + "'");
    return d;
  }

  const IonDecl *ion(const std::string &name, SourceRange range) {
    Decl *d = lookup(name);
    if (!d) {
      auto &diag = unknown(range, name, "ion", {DeclKind::Ion}, false);
      std::string module = stdModuleDeclaringIon(name);
      if (!module.empty())
        DiagnosticEngine::note(diag, {}, "'" + name + "' is declared in " + module + ": add 'use " + module +
                                             "' at the top of the file");
      else if (diag.notes.empty())
        DiagnosticEngine::note(diag, {},
                               stdIonsUsed_ ? "declare it with 'ion " + name + " valence ...'"
                                            : "declare it with 'ion " + name + " valence ...' or 'use std.ions'");
      return nullptr;
    }
    if (auto *i = dyn_cast<IonDecl>(d))
      return i;
    auto &diag = diags_.error(range, "'" + name + "' is " + article(d->kind) + ", not an ion");
    DiagnosticEngine::note(diag, d->nameRange, "declared here");
    return nullptr;
  }

  // The standard module that declares ion `name` ("std.ions"), or "" when none does.
  static std::string stdModuleDeclaringIon(const std::string &name) {
    for (const StdModule &m : stdModules()) {
      std::string text = std::string("\n") + m.text;
      if (text.find("\nion " + name + " ") != std::string::npos)
        return m.name;
    }
    return "";
  }

  static std::string article(DeclKind k) {
    std::string w = describe(k);
    bool vowel = std::string("aeiou").find(w[0]) != std::string::npos;
    return (vowel ? "an " : "a ") + w;
  }

  void bindDecl(Decl &d) {
    switch (d.kind) {
    case DeclKind::Model:
    case DeclKind::Use:
    case DeclKind::Ion:
      return;
    case DeclKind::Temperature:
      expr(static_cast<TemperatureDecl &>(d).value.get(), {"the temperature"});
      return;
    case DeclKind::Const:
      current_ = &d;
      expr(static_cast<ConstDecl &>(d).value.get(), {"a constant"});
      current_ = nullptr;
      return;
    case DeclKind::Fn: {
      auto &f = static_cast<FnDecl &>(d);
      current_ = &d;
      expr(f.body.get(), {"a function", false, false, &f});
      current_ = nullptr;
      return;
    }
    case DeclKind::Solution:
      solution(static_cast<SolutionDecl &>(d).body);
      for (const ConcentrationEntry &e : static_cast<SolutionDecl &>(d).body.entries)
        if (e.dynamic) {
          auto &diag = diags_.error(e.dynamicRange, "an outside concentration cannot be dynamic");
          DiagnosticEngine::note(diag, {}, "the bath is taken to be large; only a compartment's inside changes");
        }
      return;
    case DeclKind::Compartment:
      compartment(static_cast<CompartmentDecl &>(d));
      return;
    case DeclKind::Channel: {
      auto &c = static_cast<ChannelDecl &>(d);
      for (CarriedIon &k : c.carries)
        k.target = ion(k.ion, k.range);
      Context kinetic{"channel kinetics", true, true};
      kinetic.voltage = true;
      expr(c.reversal.get(), {"a reversal potential", true, true});
      for (Gate &g : c.gates)
        for (Expr *e : {g.opening.get(), g.closing.get(), g.steady.get(), g.tau.get()})
          expr(e, kinetic);
      expr(c.q10.get(), {"a Q10 factor"});
      expr(c.q10Reference.get(), {"a Q10 reference temperature"});
      return;
    }
    case DeclKind::Sweep: {
      auto &sw = static_cast<SweepDecl &>(d);
      Context plain{"a sweep"};
      for (SweepAxis &a : sw.axes) {
        expr(a.from.get(), plain);
        expr(a.to.get(), plain);
        for (ExprPtr &v : a.values)
          expr(v.get(), plain);
      }
      for (auto &m : sw.measures)
        bindDecl(*m);
      return;
    }
    case DeclKind::Expect: {
      auto &e = static_cast<ExpectDecl &>(d);
      Context plain{"an expectation"};
      for (ExpectArg &a : e.args) {
        expr(a.value.get(), plain);
        // Bound silently: which kind of declaration fits depends on the measure, which
        // checkExpectations knows, and it reports a name of the wrong kind or none.
        if (!a.path.empty())
          a.target = lookup(a.path);
        position(a.position, dyn_cast<CompartmentDecl>(lookup(a.path.substr(0, a.path.find('.')))), plain);
      }
      for (Expr *x : {e.value.get(), e.tolerance.get(), e.high.get()})
        expr(x, plain);
      if (!e.protocol.empty()) {
        Decl *target = lookup(e.protocol);
        if (!target)
          unknown(e.protocolRange, e.protocol, "protocol", {DeclKind::Protocol});
        else if (auto *p = dyn_cast<ProtocolDecl>(target))
          e.target = p;
        else {
          auto &diag = diags_.error(e.protocolRange, "'" + e.protocol + "' is " + article(target->kind) +
                                                         ", not a protocol");
          DiagnosticEngine::note(diag, target->nameRange, "declared here");
        }
      }
      return;
    }
    case DeclKind::Protocol: {
      auto &p = static_cast<ProtocolDecl &>(d);
      Context plain{"a protocol"};
      for (Expr *e : {p.step.get(), p.tolerance.get(), p.duration.get(), p.every.get()})
        expr(e, plain);
      for (Injection &i : p.injections) {
        for (Expr *e : {i.amplitude.get(), i.amplitudeEnd.get(), i.width.get(), i.period.get(), i.from.get(), i.to.get()})
          expr(e, plain);
        i.target = compartmentNamed(i.compartment, i.compartmentRange);
        position(i.position, i.target, plain);
      }
      for (Clamp &c : p.clamps) {
        for (Expr *e : {c.level.get(), c.from.get(), c.to.get()})
          expr(e, plain);
        c.target = compartmentNamed(c.compartment, c.compartmentRange);
        position(c.position, c.target, plain);
      }
      for (Synapse &s : p.synapses) {
        for (Expr *e : {s.conductance.get(), s.reversal.get(), s.rise.get(), s.decay.get(), s.peak.get(),
                        s.every.get(), s.from.get(), s.to.get()})
          expr(e, plain);
        for (auto &t : s.times)
          expr(t.get(), plain);
        s.target = compartmentNamed(s.compartment, s.compartmentRange);
        position(s.position, s.target, plain);
      }
      // Bound silently: Lower reports a record that names nothing among the lowered probes.
      for (RecordTarget &r : p.records) {
        r.compartment = dyn_cast<CompartmentDecl>(lookup(r.path.substr(0, r.path.find('.'))));
        position(r.position, r.compartment, plain);
      }
      return;
    }
    case DeclKind::Pump: {
      auto &p = static_cast<PumpDecl &>(d);
      for (StoichTerm &t : p.cycle)
        t.target = ion(t.ion, t.ionRange);
      Context activity{"an activity law", true, true};
      activity.voltage = true;
      expr(p.activity.get(), activity);
      return;
    }
    }
  }

  // A position names a place along a cable; a compartment is one isopotential patch.
  void position(Position &p, const CompartmentDecl *on, Context &context) {
    if (!p)
      return;
    expr(p.at.get(), context);
    if (on && !on->cable) {
      auto &diag = diags_.error(p.range, "'" + on->name + "' is a compartment, not a cable: it has no places along it");
      DiagnosticEngine::note(diag, on->nameRange, "declared here");
    }
  }

  const CompartmentDecl *compartmentNamed(const std::string &name, SourceRange at) {
    Decl *target = lookup(name);
    if (!target) {
      unknown(at, name, "compartment", {DeclKind::Compartment});
      return nullptr;
    }
    if (auto *c = dyn_cast<CompartmentDecl>(target))
      return c;
    auto &diag = diags_.error(at, "'" + name + "' is " + article(target->kind) + ", not a compartment");
    DiagnosticEngine::note(diag, target->nameRange, "declared here");
    return nullptr;
  }

  void solution(SolutionBody &body) {
    for (ConcentrationEntry &e : body.entries) {
      e.target = ion(e.ion, e.ionRange);
      expr(e.value.get(), {"a concentration"});
      expr(e.shellDepth.get(), {"a shell depth"});
    }
    for (ImpermeantEntry &i : body.impermeants)
      expr(i.amount.get(), {"a concentration"});
  }

  void compartment(CompartmentDecl &c) {
    Context plain{"a compartment"};
    if (CableShape *cable = c.cable.get()) {
      for (Expr *e : {cable->length.get(), cable->diameter.get(), cable->diameterEnd.get(),
                      cable->axialResistivity.get(), cable->pieceLength.get(), cable->perLengthConstantAt.get()})
        expr(e, plain);
      if (!cable->parent.empty()) {
        cable->parentDecl = compartmentNamed(cable->parent, cable->parentRange);
        if (cable->parentDecl && !cable->parentDecl->cable && (cable->atEnd || cable->at)) {
          auto &diag =
              diags_.error(cable->growsRange,
                           "'" + cable->parent + "' is a compartment, not a cable: a cable grows from it as a whole");
          DiagnosticEngine::note(diag, {}, "write 'grows from " + cable->parent + "'");
        }
        if (cable->at)
          expr(cable->at.at.get(), plain);
      }
    }
    expr(c.geometry.diameter.get(), plain);
    expr(c.geometry.length.get(), plain);
    expr(c.geometry.area.get(), plain);
    expr(c.capacitance.get(), plain);
    expr(c.initialV.get(), plain);
    if (c.hasInside)
      solution(c.inside);
    if (!c.bathName.empty()) {
      Decl *d = lookup(c.bathName);
      if (!d)
        unknown(c.bathRange, c.bathName, "outside solution", {DeclKind::Solution});
      else if (auto *s = dyn_cast<SolutionDecl>(d))
        c.bath = s;
      else {
        auto &diag = diags_.error(c.bathRange, "'" + c.bathName + "' is " + article(d->kind) + ", not an outside solution");
        DiagnosticEngine::note(diag, d->nameRange, "declared here");
      }
    }
    for (MembraneEntry &m : c.membrane) {
      Decl *d = lookup(m.name);
      if (!d)
        unknown(m.nameRange, m.name, "channel or pump", {DeclKind::Channel, DeclKind::Pump});
      else if (d->kind == DeclKind::Channel || d->kind == DeclKind::Pump)
        m.target = d;
      else {
        auto &diag = diags_.error(m.nameRange, "'" + m.name + "' is " + article(d->kind) +
                                                   "; a membrane holds channels and pumps");
        DiagnosticEngine::note(diag, d->nameRange, "declared here");
      }
      expr(m.density.get(), plain);
      expr(m.reversal.get(), plain);
    }
  }

  void noteUse(const Decl *target, SourceRange at) {
    if (current_)
      uses_[current_].push_back({target, at});
  }

  void expr(Expr *e, const Context &ctx) {
    if (!e)
      return;
    switch (e->kind) {
    case ExprKind::Number:
      return;
    case ExprKind::Name:
      name(static_cast<NameExpr &>(*e), ctx);
      return;
    case ExprKind::Concentration: {
      auto &c = static_cast<ConcentrationExpr &>(*e);
      if (!ctx.kinetics) {
        auto &d = diags_.error(e->range, std::string("concentrations are not available in ") + ctx.where);
        if (ctx.function)
          DiagnosticEngine::note(d, {}, "pass the concentration to the function as a parameter");
        return;
      }
      c.target = ion(c.ion, c.ionRange);
      return;
    }
    case ExprKind::Call:
      call(static_cast<CallExpr &>(*e), ctx);
      return;
    case ExprKind::Unary:
      expr(static_cast<UnaryExpr &>(*e).operand.get(), ctx);
      return;
    case ExprKind::Binary: {
      auto &b = static_cast<BinaryExpr &>(*e);
      expr(b.lhs.get(), ctx);
      expr(b.rhs.get(), ctx);
      return;
    }
    case ExprKind::If: {
      auto &i = static_cast<IfExpr &>(*e);
      expr(i.cond.get(), ctx);
      expr(i.thenExpr.get(), ctx);
      expr(i.elseExpr.get(), ctx);
      return;
    }
    }
  }

  void name(NameExpr &n, const Context &ctx) {
    if (ctx.function)
      for (size_t i = 0; i < ctx.function->params.size(); ++i)
        if (ctx.function->params[i].name == n.name) {
          n.paramIndex = static_cast<int>(i);
          return;
        }
    if (n.name == "V" || n.name == "T") {
      bool isV = n.name == "V";
      if (isV ? ctx.voltage : ctx.temperature || ctx.kinetics) {
        n.builtin = isV ? Builtin::MembranePotential : Builtin::Temperature;
        return;
      }
      auto &d = diags_.error(n.range, std::string("the ") + (isV ? "membrane potential" : "temperature") + " '" +
                                          n.name + "' is not available in " + ctx.where);
      if (ctx.function)
        DiagnosticEngine::note(d, {}, "pass '" + n.name + "' to the function as a parameter");
      return;
    }
    Decl *d = lookup(n.name);
    if (!d) {
      unknown(n.range, n.name, "name", {DeclKind::Const});
      return;
    }
    if (d->kind == DeclKind::Const) {
      n.target = d;
      noteUse(d, n.range);
      return;
    }
    auto &diag = diags_.error(n.range, "'" + n.name + "' is " + article(d->kind) + ", not a value");
    if (d->kind == DeclKind::Ion)
      DiagnosticEngine::note(diag, {}, "write '[" + n.name + "]in' or '[" + n.name + "]out' for its concentration");
    else if (d->kind == DeclKind::Fn)
      DiagnosticEngine::note(diag, d->nameRange, "call it with arguments: " + n.name + "(...)");
    else
      DiagnosticEngine::note(diag, d->nameRange, "declared here");
  }

  void call(CallExpr &c, const Context &ctx) {
    if (const BuiltinMath *m = findMath(c.callee)) {
      c.math = m->fn;
      if (static_cast<int>(c.args.size()) != m->arity) {
        diags_.error(c.range, "'" + c.callee + "' takes " + std::to_string(m->arity) + " argument" +
                                  (m->arity == 1 ? "" : "s") + ", but " + std::to_string(c.args.size()) +
                                  (c.args.size() == 1 ? " was" : " were") + " given");
        c.math = MathFn::None;
        for (auto &a : c.args)
          expr(a.get(), ctx);
        return;
      }
      if (m->fn == MathFn::Reversal) {
        if (!ctx.kinetics) {
          diags_.error(c.range, std::string("reversal potentials are not available in ") + ctx.where);
          return;
        }
        auto *arg = dyn_cast<NameExpr>(c.args[0].get());
        if (!arg) {
          diags_.error(c.args[0]->range, "'E' takes the name of an ion, as in E(K)");
          return;
        }
        c.reversalIon = ion(arg->name, arg->range);
        return;
      }
      for (auto &a : c.args)
        expr(a.get(), ctx);
      return;
    }
    for (auto &a : c.args)
      expr(a.get(), ctx);
    Decl *d = lookup(c.callee);
    if (!d) {
      unknown(c.calleeRange, c.callee, "function", {DeclKind::Fn});
      return;
    }
    auto *f = dyn_cast<FnDecl>(d);
    if (!f) {
      auto &diag = diags_.error(c.calleeRange, "'" + c.callee + "' is " + article(d->kind) + ", not a function");
      DiagnosticEngine::note(diag, d->nameRange, "declared here");
      return;
    }
    if (c.args.size() != f->params.size()) {
      auto &diag = diags_.error(c.range, "'" + c.callee + "' takes " + std::to_string(f->params.size()) +
                                             " argument" + (f->params.size() == 1 ? "" : "s") + ", but " +
                                             std::to_string(c.args.size()) + (c.args.size() == 1 ? " was" : " were") +
                                             " given");
      DiagnosticEngine::note(diag, f->nameRange, "'" + c.callee + "' declared here");
      return;
    }
    c.target = f;
    noteUse(f, c.calleeRange);
  }

  // Depth-first search for constants or functions that depend on themselves.
  void visit(const Decl *d, std::vector<const Decl *> &path) {
    if (finished_.count(d))
      return;
    auto onPath = std::find(path.begin(), path.end(), d);
    if (onPath != path.end()) {
      if (reported_.count(d))
        return;
      for (auto it = onPath; it != path.end(); ++it)
        reported_.insert(*it);
      std::string chain;
      for (auto it = onPath; it != path.end(); ++it)
        chain += "'" + (*it)->name + "' -> ";
      chain += "'" + d->name + "'";
      diags_.error(d->nameRange, std::string(describe(d->kind)) + " '" + d->name +
                                     "' depends on itself: " + chain);
      return;
    }
    if (path.size() >= maxDependencyDepth) {
      auto &diag = diags_.error(d->nameRange, std::string(describe(d->kind)) + " '" + d->name + "' is more than " +
                                                  std::to_string(maxDependencyDepth) + " constants and functions deep");
      DiagnosticEngine::note(diag, path.front()->nameRange,
                             "the chain of uses starts at '" + path.front()->name + "' here");
      DiagnosticEngine::note(diag, {}, "split the chain, or compute the value in fewer steps");
      symbols_.chainTooDeep = true;
      return;
    }
    path.push_back(d);
    for (auto &[target, at] : uses_[d]) {
      visit(target, path);
      if (symbols_.chainTooDeep)
        return;
    }
    path.pop_back();
    finished_.insert(d);
  }
};

} // namespace

bool resolveNames(Program &program, SymbolTable &symbols, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  Resolver r(symbols, diags);
  for (auto &m : program.modules)
    r.stdIonsUsed_ = r.stdIonsUsed_ || m->name == "std.ions";
  for (auto &m : program.modules)
    r.declare(*m, m.get() == program.root);
  for (auto &m : program.modules)
    r.bind(*m);
  r.checkCycles();
  return diags.errorCount() == before;
}

} // namespace saltpan
