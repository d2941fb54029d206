// CheckUnits.cpp - Stage 4: dimensional analysis over the SI base dimensions.
//
// An expression whose dimension could not be found (after an error) is "unknown" and
// never triggers a second diagnostic.
#include "CheckUnits.h"

#include "Diagnostics.h"
#include "Evaluate.h"

#include <cmath>
#include <set>

namespace saltpan {

using namespace ast;

namespace {

ExprType known(Dimension d) { return ExprType{d, true, false}; }
ExprType unknownType() { return ExprType{}; }

class UnitChecker {
public:
  UnitChecker(Evaluator &evaluator, DiagnosticEngine &diags) : evaluator_(evaluator), diags_(diags) {}

  void check(Module &module) {
    for (auto &d : module.decls)
      decl(*d);
  }

private:
  Evaluator &evaluator_;
  DiagnosticEngine &diags_;
  std::set<const Decl *> inProgress_, done_;
  const FnDecl *currentFn_ = nullptr; // whose parameters are in scope

  // ---- declarations ----

  void decl(Decl &d) {
    switch (d.kind) {
    case DeclKind::Model:
    case DeclKind::Use:
    case DeclKind::Ion:
      return;
    case DeclKind::Temperature: {
      auto &t = static_cast<TemperatureDecl &>(d);
      expect(t.value.get(), dims::temperature(), "the temperature");
      return;
    }
    case DeclKind::Const:
      constant(static_cast<ConstDecl &>(d));
      return;
    case DeclKind::Fn:
      function(static_cast<FnDecl &>(d));
      return;
    case DeclKind::Solution:
      solution(static_cast<SolutionDecl &>(d).body);
      return;
    case DeclKind::Compartment:
      compartment(static_cast<CompartmentDecl &>(d));
      return;
    case DeclKind::Channel:
      channel(static_cast<ChannelDecl &>(d));
      return;
    case DeclKind::Protocol:
      protocol(static_cast<ProtocolDecl &>(d));
      return;
    case DeclKind::Sweep: {
      // Axis values are inferred here; the sweep check compares them with each parameter.
      auto &sw = static_cast<SweepDecl &>(d);
      for (SweepAxis &a : sw.axes) {
        for (Expr *x : {a.from.get(), a.to.get()})
          if (x)
            infer(*x);
        for (ExprPtr &v : a.values)
          infer(*v);
      }
      for (auto &m : sw.measures)
        for (ExpectArg &a : m->args) {
          if (a.value)
            infer(*a.value);
          position(a.position, "a measured place");
        }
      return;
    }
    case DeclKind::Expect: {
      // Arguments and values are only inferred here; Expect.cpp knows what each measure wants.
      auto &e = static_cast<ExpectDecl &>(d);
      for (ExpectArg &a : e.args) {
        if (a.value)
          infer(*a.value);
        position(a.position, "a measured place");
      }
      for (Expr *x : {e.value.get(), e.tolerance.get(), e.high.get()})
        if (x)
          infer(*x);
      return;
    }
    case DeclKind::Pump: {
      auto &p = static_cast<PumpDecl &>(d);
      expect(p.activity.get(), Dimension::none(), "the activity of '" + p.name + "'",
             "an activity is a fraction of the maximal rate");
      return;
    }
    }
  }

  ExprType constant(ConstDecl &c) {
    if (done_.count(&c) || inProgress_.count(&c))
      return c.annotated && c.declared.valid ? known(c.declared.unit.dim) : c.value->type;
    inProgress_.insert(&c);
    if (c.annotated && c.declared.valid)
      expect(c.value.get(), c.declared.unit.dim, "the value of '" + c.name + "'", "",
             {c.declared.range, "'" + c.name + "' is declared as " + describeDimension(c.declared.unit.dim)});
    else
      infer(*c.value);
    inProgress_.erase(&c);
    done_.insert(&c);
    if (c.annotated)
      return c.declared.valid ? known(c.declared.unit.dim) : unknownType();
    return c.value->type;
  }

  void function(FnDecl &f) {
    if (done_.count(&f) || inProgress_.count(&f))
      return;
    inProgress_.insert(&f);
    const FnDecl *saved = currentFn_;
    currentFn_ = &f;
    if (f.result.valid)
      expect(f.body.get(), f.result.unit.dim, "the result of '" + f.name + "'", "",
             {f.result.range, "'" + f.name + "' is declared to return " + describeDimension(f.result.unit.dim)});
    else
      infer(*f.body);
    currentFn_ = saved;
    inProgress_.erase(&f);
    done_.insert(&f);
  }

  void solution(SolutionBody &body) {
    for (ConcentrationEntry &e : body.entries) {
      expect(e.value.get(), dims::concentration(), "the concentration of '" + e.ion + "'");
      expect(e.shellDepth.get(), dims::length(), "the shell depth of '" + e.ion + "'");
    }
    for (ImpermeantEntry &i : body.impermeants)
      expect(i.amount.get(), dims::concentration(), "an impermeant concentration");
  }

  // A distance along a cable, or a percentage of its length (a unit such as 'um/um' is no
  // percentage, though as dimensionless).
  void position(Position &p, const std::string &what) {
    if (!p)
      return;
    ExprType t = infer(*p.at);
    auto *n = dyn_cast<NumberExpr>(p.at.get());
    bool percent = n && n->unitText == "%";
    if (t.known && t.dim != dims::length() && !percent)
      mismatch(p.at->range, what, "a distance along the cable (um) or a percentage of its length (%)", t.dim);
  }

  void compartment(CompartmentDecl &c) {
    std::string of = " of '" + c.name + "'";
    if (CableShape *cable = c.cable.get()) {
      expect(cable->length.get(), dims::length(), "the length" + of);
      expect(cable->diameter.get(), dims::length(), "the diameter" + of);
      expect(cable->diameterEnd.get(), dims::length(), "the far diameter" + of);
      expect(cable->pieceLength.get(), dims::length(), "the piece length" + of);
      expect(cable->perLengthConstantAt.get(), dims::rate(), "the frequency of the length constant" + of,
             "a frequency, e.g. 100 Hz");
      expect(cable->axialResistivity.get(), dims::voltage() / dims::current() * dims::length(),
             "the axial resistivity" + of, "the resistivity of the cytoplasm, e.g. 150 ohm*cm");
      position(cable->at, "where '" + c.name + "' grows from");
    }
    expect(c.geometry.diameter.get(), dims::length(), "the diameter" + of);
    expect(c.geometry.length.get(), dims::length(), "the length" + of);
    expect(c.geometry.area.get(), dims::area(), "the membrane area" + of);
    expect(c.capacitance.get(), dims::specificCapacitance(), "the capacitance" + of,
           "give the capacitance per membrane area, e.g. 1 uF/cm2");
    expect(c.initialV.get(), dims::voltage(), "the initial potential" + of);
    if (c.hasInside)
      solution(c.inside);
    for (MembraneEntry &m : c.membrane) {
      std::string what = "the density of '" + m.name + "'";
      if (!m.density)
        continue;
      ExprType t = infer(*m.density);
      expect(m.reversal.get(), dims::voltage(), "the reversal potential of '" + m.name + "'");
      if (!t.known || !m.target)
        continue;
      if (m.target->kind == DeclKind::Channel) {
        if (t.dim != dims::conductanceDensity() && t.dim != dims::permeability())
          mismatch(m.density->range, what, "a conductance density (mS/cm2) or a permeability (cm/s)", t.dim,
                   "a channel's density is its maximal conductance, or its permeability, per membrane area");
      } else if (t.dim != dims::currentDensity() && t.dim != dims::turnoverDensity()) {
        mismatch(m.density->range, what, "a current density (uA/cm2) or a turnover density (mol/m2/s)", t.dim,
                 "a pump's density is its maximal current, or its maximal cycle rate, per membrane area");
      }
    }
  }

  void protocol(ProtocolDecl &p) {
    std::string of = " of protocol '" + p.name + "'";
    expect(p.step.get(), dims::time(), "the step" + of);
    expect(p.tolerance.get(), Dimension::none(), "the tolerance" + of, "a tolerance is relative, e.g. 1e-8");
    expect(p.duration.get(), dims::time(), "the duration" + of);
    expect(p.every.get(), dims::time(), "the recording interval" + of);
    for (RecordTarget &r : p.records)
      position(r.position, "a recorded place");
    for (Injection &i : p.injections) {
      position(i.position, "the place of an injection");
      for (Expr *e : {i.amplitude.get(), i.amplitudeEnd.get()}) {
        if (!e)
          continue;
        ExprType t = infer(*e);
        if (t.known && t.dim != dims::current() && t.dim != dims::currentDensity())
          mismatch(e->range, "an injected current", "a current (nA) or a current density (uA/cm2)", t.dim);
      }
      if (i.amplitude && i.amplitudeEnd && i.amplitude->type.known && i.amplitudeEnd->type.known &&
          i.amplitude->type.dim != i.amplitudeEnd->type.dim)
        diags_.error(i.amplitudeEnd->range, "a ramp must start and end in the same kind of current");
      expect(i.width.get(), dims::time(), "the pulse width");
      expect(i.period.get(), dims::time(), "the pulse interval");
      expect(i.from.get(), dims::time(), "the start of an injection");
      expect(i.to.get(), dims::time(), "the end of an injection");
    }
    for (Clamp &c : p.clamps) {
      position(c.position, "the place of a clamp");
      expect(c.level.get(), dims::voltage(), "a clamp level");
      expect(c.from.get(), dims::time(), "the start of a clamp step");
      expect(c.to.get(), dims::time(), "the end of a clamp step");
    }
    for (Synapse &s : p.synapses) {
      position(s.position, "the place of a synapse");
      if (s.conductance) {
        ExprType t = infer(*s.conductance);
        if (t.known && t.dim != dims::conductanceDensity() && t.dim != dims::conductanceDensity() * dims::area())
          mismatch(s.conductance->range, "a synaptic conductance",
                   "a conductance (nS) or a conductance density (mS/cm2)", t.dim);
      }
      expect(s.reversal.get(), dims::voltage(), "a synaptic reversal potential");
      expect(s.rise.get(), dims::time(), "a synaptic rise time");
      expect(s.decay.get(), dims::time(), "a synaptic decay time");
      expect(s.peak.get(), dims::time(), "a synaptic time to peak");
      for (auto &t : s.times)
        expect(t.get(), dims::time(), "a synaptic event time");
      expect(s.every.get(), dims::time(), "a synaptic event interval");
      expect(s.from.get(), dims::time(), "the start of a synaptic train");
      expect(s.to.get(), dims::time(), "the end of a synaptic train");
    }
  }

  void channel(ChannelDecl &c) {
    expect(c.reversal.get(), dims::voltage(), "the reversal potential of '" + c.name + "'");
    for (Gate &g : c.gates) {
      std::string of = " of gate '" + g.name + "'";
      expect(g.opening.get(), dims::rate(), "the opening rate" + of);
      expect(g.closing.get(), dims::rate(), "the closing rate" + of);
      expect(g.steady.get(), Dimension::none(), "the steady value" + of, "a steady value is a fraction from 0 to 1");
      expect(g.tau.get(), dims::time(), "the time constant" + of);
    }
    expect(c.q10.get(), Dimension::none(), "the Q10 factor of '" + c.name + "'",
           "Q10 is the factor by which rates grow per 10 K");
    expect(c.q10Reference.get(), dims::temperature(), "the Q10 reference temperature of '" + c.name + "'");
  }

  // ---- checking against an expected dimension ----

  void mismatch(SourceRange at, const std::string &what, const std::string &expected, const Dimension &got,
                const std::string &hint = "", Note extra = {}) {
    auto &d = diags_.error(at, what + " must be " + expected + ", got " + describeDimension(got));
    if (!extra.message.empty())
      d.notes.push_back(extra);
    if (!hint.empty())
      DiagnosticEngine::note(d, {}, hint);
  }

  void expect(Expr *e, const Dimension &want, const std::string &what, const std::string &hint = "",
              Note extra = {}) {
    if (!e)
      return;
    ExprType t = infer(*e);
    if (t.known && t.dim != want)
      mismatch(e->range, what, describeDimension(want), t.dim, hint, extra);
  }

  // ---- inference ----

  bool celsiusOperand(const Expr &e, const char *role) {
    if (!e.type.celsiusLiteral)
      return false;
    auto *n = static_cast<const NumberExpr *>(&e);
    char buf[64];
    std::snprintf(buf, sizeof buf, "%g K", n->value);
    auto &d = diags_.error(e.range, "a temperature in degC is absolute (here " + std::string(buf) +
                                        ") and cannot be " + role);
    DiagnosticEngine::note(d, {}, "for a temperature difference, write it in K (a step of 1 degC is 1 K)");
    return true;
  }

  std::optional<int> integerExponent(const Expr &e) {
    auto v = evaluator_.evaluate(e, EvalEnv{});
    if (!v || *v != std::floor(*v) || std::fabs(*v) > 16)
      return std::nullopt;
    return static_cast<int>(*v);
  }

  ExprType infer(Expr &e) {
    e.type = inferUncached(e);
    return e.type;
  }

  ExprType inferUncached(Expr &e) {
    switch (e.kind) {
    case ExprKind::Number: {
      auto &n = static_cast<NumberExpr &>(e);
      if (!n.unitValid)
        return unknownType();
      return ExprType{n.unit.dim, true, n.celsius};
    }
    case ExprKind::Name: {
      auto &n = static_cast<NameExpr &>(e);
      if (n.paramIndex >= 0) {
        if (!currentFn_ || static_cast<size_t>(n.paramIndex) >= currentFn_->params.size())
          return unknownType();
        const Param &p = currentFn_->params[n.paramIndex];
        return p.unit.valid ? known(p.unit.unit.dim) : unknownType();
      }
      if (n.builtin == Builtin::MembranePotential)
        return known(dims::voltage());
      if (n.builtin == Builtin::Temperature)
        return known(dims::temperature());
      if (auto *c = dyn_cast<ConstDecl>(n.target))
        return constant(*const_cast<ConstDecl *>(c));
      return unknownType();
    }
    case ExprKind::Concentration:
      return static_cast<ConcentrationExpr &>(e).target ? known(dims::concentration()) : unknownType();
    case ExprKind::Call:
      return call(static_cast<CallExpr &>(e));
    case ExprKind::Unary: {
      auto &u = static_cast<UnaryExpr &>(e);
      ExprType t = infer(*u.operand);
      if (u.op == UnaryOp::Not) {
        requireDimensionless(*u.operand, "the operand of 'not'");
        return known(Dimension::none());
      }
      t.celsiusLiteral = false;
      return t;
    }
    case ExprKind::Binary:
      return binary(static_cast<BinaryExpr &>(e));
    case ExprKind::If: {
      auto &i = static_cast<IfExpr &>(e);
      infer(*i.cond);
      requireDimensionless(*i.cond, "the condition of 'if'");
      ExprType a = infer(*i.thenExpr), b = infer(*i.elseExpr);
      if (a.known && b.known && a.dim != b.dim) {
        auto &d = diags_.error(i.elseExpr->range, "the branches of 'if' differ: " + describeDimension(a.dim) +
                                                      " and " + describeDimension(b.dim));
        DiagnosticEngine::note(d, i.thenExpr->range, "the 'then' branch is " + describeDimension(a.dim));
        return unknownType();
      }
      return a.known ? ExprType{a.dim, true, false} : b.known ? ExprType{b.dim, true, false} : unknownType();
    }
    }
    return unknownType();
  }

  bool requireDimensionless(const Expr &e, const std::string &what, const std::string &hint = "") {
    if (e.type.known && !e.type.dim.dimensionless()) {
      auto &d = diags_.error(e.range, what + " must be dimensionless, got " + describeDimension(e.type.dim));
      if (!hint.empty())
        DiagnosticEngine::note(d, {}, hint);
      return false;
    }
    return true;
  }

  ExprType call(CallExpr &c) {
    for (auto &a : c.args)
      infer(*a);
    if (c.math == MathFn::Reversal)
      return c.reversalIon ? known(dims::voltage()) : unknownType();
    for (auto &a : c.args)
      if (celsiusOperand(*a, "passed to a function"))
        return unknownType();
    if (c.math != MathFn::None) {
      std::string of = "the argument of '" + c.callee + "'";
      const Expr &x = *c.args[0];
      switch (c.math) {
      case MathFn::Exp:
      case MathFn::Expm1:
      case MathFn::Log:
      case MathFn::Log10:
      case MathFn::Tanh:
        requireDimensionless(x, of, "divide by a scale first, e.g. exp((V + 40 mV) / 10 mV)");
        return known(Dimension::none());
      case MathFn::Sqrt: {
        if (!x.type.known)
          return unknownType();
        if (auto root = x.type.dim.sqrt())
          return known(*root);
        diags_.error(x.range, "cannot take the square root of " + describeDimension(x.type.dim));
        return unknownType();
      }
      case MathFn::Abs:
        return x.type.known ? known(x.type.dim) : unknownType();
      case MathFn::Min:
      case MathFn::Max:
        return sameDimension(x, *c.args[1], c.calleeRange, "cannot compare");
      case MathFn::Pow:
        return power(x, *c.args[1]);
      case MathFn::Reversal:
      case MathFn::None:
        break;
      }
      return unknownType();
    }
    if (!c.target)
      return unknownType();
    auto *f = const_cast<FnDecl *>(c.target);
    function(*f);
    for (size_t i = 0; i < c.args.size() && i < f->params.size(); ++i) {
      const Param &p = f->params[i];
      const Expr &a = *c.args[i];
      if (p.unit.valid && a.type.known && a.type.dim != p.unit.unit.dim) {
        auto &d = diags_.error(a.range, "argument " + std::to_string(i + 1) + " of '" + c.callee + "' must be " +
                                            describeDimension(p.unit.unit.dim) + ", got " +
                                            describeDimension(a.type.dim));
        DiagnosticEngine::note(d, p.range, "parameter '" + p.name + "' declared here");
      }
    }
    return f->result.valid ? known(f->result.unit.dim) : unknownType();
  }

  ExprType sameDimension(const Expr &a, const Expr &b, SourceRange at, const std::string &verb) {
    if (!a.type.known || !b.type.known)
      return unknownType();
    if (a.type.dim != b.type.dim) {
      auto &d = diags_.error(at, verb + " " + describeDimension(a.type.dim) + " with " + describeDimension(b.type.dim));
      DiagnosticEngine::note(d, a.range, "this is " + describeDimension(a.type.dim));
      DiagnosticEngine::note(d, b.range, "this is " + describeDimension(b.type.dim));
      return unknownType();
    }
    return known(a.type.dim);
  }

  ExprType power(const Expr &base, const Expr &exponent) {
    if (!requireDimensionless(exponent, "an exponent"))
      return unknownType();
    if (!base.type.known || !exponent.type.known)
      return unknownType();
    if (base.type.dim.dimensionless())
      return known(Dimension::none());
    auto n = integerExponent(exponent);
    if (!n) {
      auto &d = diags_.error(exponent.range, "raising " + describeDimension(base.type.dim) +
                                                 " to a power needs a constant whole-number exponent");
      DiagnosticEngine::note(d, {}, "make the base dimensionless first, e.g. pow(c / 1 mM, 1.5)");
      return unknownType();
    }
    return known(base.type.dim.pow(*n));
  }

  ExprType binary(BinaryExpr &b) {
    infer(*b.lhs);
    infer(*b.rhs);
    const Expr &l = *b.lhs, &r = *b.rhs;
    switch (b.op) {
    case BinaryOp::Add:
    case BinaryOp::Sub: {
      bool adding = b.op == BinaryOp::Add;
      if (l.type.celsiusLiteral && r.type.celsiusLiteral && adding) {
        auto &d = diags_.error(b.opRange, "cannot add two absolute temperatures");
        DiagnosticEngine::note(d, {}, "write the temperature difference in K");
        return unknownType();
      }
      ExprType t = sameDimension(l, r, b.opRange, adding ? "cannot add" : "cannot subtract");
      return t;
    }
    case BinaryOp::Mul:
    case BinaryOp::Div: {
      const char *role = b.op == BinaryOp::Mul ? "multiplied" : "divided";
      if (celsiusOperand(l, role) || celsiusOperand(r, role))
        return unknownType();
      if (!l.type.known || !r.type.known)
        return unknownType();
      return known(b.op == BinaryOp::Mul ? l.type.dim * r.type.dim : l.type.dim / r.type.dim);
    }
    case BinaryOp::Pow:
      if (celsiusOperand(l, "raised to a power"))
        return unknownType();
      return power(l, r);
    case BinaryOp::Eq:
    case BinaryOp::Ne:
    case BinaryOp::Lt:
    case BinaryOp::Le:
    case BinaryOp::Gt:
    case BinaryOp::Ge:
      if (sameDimension(l, r, b.opRange, "cannot compare").known || (!l.type.known || !r.type.known))
        return known(Dimension::none());
      return unknownType();
    case BinaryOp::And:
    case BinaryOp::Or: {
      std::string op = spelling(b.op);
      requireDimensionless(l, "the operands of '" + op + "'");
      requireDimensionless(r, "the operands of '" + op + "'");
      return known(Dimension::none());
    }
    }
    return unknownType();
  }
};

} // namespace

bool checkUnits(Program &program, Evaluator &evaluator, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  UnitChecker checker(evaluator, diags);
  for (auto &m : program.modules)
    checker.check(*m);
  return diags.errorCount() == before;
}

} // namespace saltpan
