// ASTDump.cpp - the stable text dump behind `saltpan check --emit ast`, and node spellings.
#include "AST.h"
#include "Source.h"

#include <cstdio>
#include <sstream>

namespace saltpan::ast {

const char *spelling(BinaryOp op) {
  switch (op) {
  case BinaryOp::Add: return "+";
  case BinaryOp::Sub: return "-";
  case BinaryOp::Mul: return "*";
  case BinaryOp::Div: return "/";
  case BinaryOp::Pow: return "^";
  case BinaryOp::Eq: return "==";
  case BinaryOp::Ne: return "!=";
  case BinaryOp::Lt: return "<";
  case BinaryOp::Le: return "<=";
  case BinaryOp::Gt: return ">";
  case BinaryOp::Ge: return ">=";
  case BinaryOp::And: return "and";
  case BinaryOp::Or: return "or";
  }
  return "?";
}

const char *spelling(GateRate r) {
  switch (r) {
  case GateRate::Opening: return "opening";
  case GateRate::Closing: return "closing";
  case GateRate::Steady: return "steady";
  case GateRate::Tau: return "tau";
  }
  return "?";
}

const char *describe(DeclKind k) {
  switch (k) {
  case DeclKind::Model: return "model";
  case DeclKind::Use: return "use";
  case DeclKind::Temperature: return "temperature";
  case DeclKind::Ion: return "ion";
  case DeclKind::Const: return "constant";
  case DeclKind::Fn: return "function";
  case DeclKind::Solution: return "outside solution";
  case DeclKind::Compartment: return "compartment";
  case DeclKind::Channel: return "channel";
  case DeclKind::Pump: return "pump";
  case DeclKind::Protocol: return "protocol";
  case DeclKind::Expect: return "expectation";
  case DeclKind::Sweep: return "sweep";
  }
  return "declaration";
}

namespace {

std::string num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.10g", v);
  return buf;
}

std::string at(const SourceRange &r) {
  return "<" + std::to_string(r.begin.line) + ":" + std::to_string(r.begin.column) + ">";
}

class Dumper {
public:
  std::ostringstream out;
  bool resolved = false; // add what Resolve bound and what CheckUnits found (--emit resolved)
  const SourceFile *file = nullptr;

  // Where a declaration is: its line and column, with its file when it is another module.
  std::string where(const Decl &d) const {
    const SourceLoc &l = d.range.begin;
    std::string place = std::to_string(l.line) + ":" + std::to_string(l.column);
    return "<" + (l.file && l.file != file ? l.file->path() + ":" : std::string()) + place + ">";
  }
  std::string bound(const Decl *d) const {
    return resolved ? (d ? " -> " + std::string(describe(d->kind)) + " " + d->name + " " + where(*d) : " -> ?") : "";
  }
  std::string typed(const Expr &e) const {
    if (!resolved)
      return "";
    return e.type.known ? " : " + formatDimension(e.type.dim) : " : ?";
  }

  void line(int depth, const std::string &text) { out << std::string(2 * depth, ' ') << text << "\n"; }

  void expr(int depth, const char *label, const Expr *e) {
    if (!e)
      return;
    std::string head = std::string(label) + ": ";
    switch (e->kind) {
    case ExprKind::Number: {
      auto *n = static_cast<const NumberExpr *>(e);
      line(depth, head + "Number " + num(n->written) + (n->unitText.empty() ? "" : " " + n->unitText) + " = " +
                      num(n->value) + " SI " + at(e->range) + typed(*e));
      break;
    }
    case ExprKind::Name: {
      auto *n = static_cast<const NameExpr *>(e);
      std::string binding;
      if (resolved)
        binding = n->builtin == Builtin::MembranePotential ? " -> membrane potential"
                  : n->builtin == Builtin::Temperature     ? " -> temperature"
                  : n->paramIndex >= 0                     ? " -> parameter " + std::to_string(n->paramIndex)
                                                           : bound(n->target);
      line(depth, head + "Name " + n->name + " " + at(e->range) + binding + typed(*e));
      break;
    }
    case ExprKind::Concentration: {
      auto *c = static_cast<const ConcentrationExpr *>(e);
      line(depth, head + "Concentration [" + c->ion + "]" + (c->side == Side::Inside ? "in" : "out") + " " +
                      at(e->range) + bound(c->target) + typed(*e));
      break;
    }
    case ExprKind::Call: {
      auto *c = static_cast<const CallExpr *>(e);
      std::string binding;
      if (resolved)
        binding = c->reversalIon            ? " -> reversal of" + bound(c->reversalIon)
                  : c->target               ? bound(c->target)
                  : c->math != MathFn::None ? " -> built-in"
                                            : " -> ?";
      line(depth, head + "Call " + c->callee + " " + at(e->range) + binding + typed(*e));
      for (auto &a : c->args)
        expr(depth + 1, "arg", a.get());
      break;
    }
    case ExprKind::Unary: {
      auto *u = static_cast<const UnaryExpr *>(e);
      const char *op = u->op == UnaryOp::Negate ? "-" : u->op == UnaryOp::Plus ? "+" : "not";
      line(depth, head + "Unary " + op + " " + at(e->range) + typed(*e));
      expr(depth + 1, "operand", u->operand.get());
      break;
    }
    case ExprKind::Binary: {
      auto *b = static_cast<const BinaryExpr *>(e);
      line(depth, head + "Binary " + spelling(b->op) + " " + at(e->range) + typed(*e));
      expr(depth + 1, "lhs", b->lhs.get());
      expr(depth + 1, "rhs", b->rhs.get());
      break;
    }
    case ExprKind::If: {
      auto *i = static_cast<const IfExpr *>(e);
      line(depth, head + "If " + at(e->range) + typed(*e));
      expr(depth + 1, "cond", i->cond.get());
      expr(depth + 1, "then", i->thenExpr.get());
      expr(depth + 1, "else", i->elseExpr.get());
      break;
    }
    }
  }

  void solution(int depth, const SolutionBody &b) {
    for (auto &e : b.entries)
      expr(depth, ("[" + e.ion + "]").c_str(), e.value.get());
    for (auto &i : b.impermeants)
      expr(depth, ("impermeant valence " + num(i.valence.value)).c_str(), i.amount.get());
  }

  void decl(const Decl &d) {
    std::string head = std::string(describe(d.kind)) + " " + d.name + " " + at(d.range);
    line(0, head);
    if (!d.doc.empty())
      line(1, "doc: " + d.doc);
    switch (d.kind) {
    case DeclKind::Model:
      line(1, "title: " + static_cast<const ModelDecl &>(d).title);
      break;
    case DeclKind::Use:
      line(1, std::string(static_cast<const UseDecl &>(d).isPath ? "path" : "module"));
      break;
    case DeclKind::Temperature:
      expr(1, "value", static_cast<const TemperatureDecl &>(d).value.get());
      break;
    case DeclKind::Ion:
      line(1, "valence " + num(static_cast<const IonDecl &>(d).valence.value));
      break;
    case DeclKind::Const: {
      auto &c = static_cast<const ConstDecl &>(d);
      if (c.annotated)
        line(1, "unit " + c.declared.text);
      expr(1, "value", c.value.get());
      break;
    }
    case DeclKind::Fn: {
      auto &f = static_cast<const FnDecl &>(d);
      for (auto &p : f.params)
        line(1, "param " + p.name + ": " + p.unit.text);
      line(1, "result " + f.result.text);
      expr(1, "body", f.body.get());
      break;
    }
    case DeclKind::Solution:
      solution(1, static_cast<const SolutionDecl &>(d).body);
      break;
    case DeclKind::Compartment: {
      auto &c = static_cast<const CompartmentDecl &>(d);
      static const char *shapes[] = {"none", "sphere", "cylinder", "area"};
      if (const CableShape *cable = c.cable.get()) {
        line(1, "cable" + (cable->parent.empty() ? std::string(" (free)")
                                                 : " grows from " + cable->parent + bound(cable->parentDecl) +
                                                       (cable->atEnd ? " end" : "")));
        expr(2, "at", cable->at.at.get());
        expr(2, "length", cable->length.get());
        expr(2, "diameter", cable->diameter.get());
        expr(2, "to diameter", cable->diameterEnd.get());
        expr(2, "axial resistivity", cable->axialResistivity.get());
        if (cable->pieces > 0)
          line(2,
               "pieces " + std::to_string(cable->pieces) + (cable->perLengthConstantAt ? " per length constant" : ""));
        expr(2, "at frequency", cable->perLengthConstantAt.get());
        expr(2, "piece length", cable->pieceLength.get());
      }
      line(1, std::string("geometry ") + shapes[static_cast<int>(c.geometry.shape)]);
      expr(2, "diameter", c.geometry.diameter.get());
      expr(2, "length", c.geometry.length.get());
      expr(2, "area", c.geometry.area.get());
      expr(1, "capacitance", c.capacitance.get());
      expr(1, "initial V", c.initialV.get());
      if (!c.bathName.empty())
        line(1, "outside " + c.bathName + bound(c.bath));
      if (c.hasInside) {
        line(1, "inside");
        solution(2, c.inside);
      }
      for (auto &m : c.membrane) {
        line(1, "membrane " + m.name + bound(m.target));
        expr(2, "density", m.density.get());
        expr(2, "reversal", m.reversal.get());
      }
      break;
    }
    case DeclKind::Channel: {
      auto &c = static_cast<const ChannelDecl &>(d);
      for (auto &k : c.carries)
        line(1, "carries " + k.ion + (k.hasRatio ? " " + num(k.ratio.value) : ""));
      expr(1, "reversal", c.reversal.get());
      for (auto &g : c.gates) {
        line(1, "gate " + g.name + " power " + num(g.power.value));
        expr(2, "opening", g.opening.get());
        expr(2, "closing", g.closing.get());
        expr(2, "steady", g.steady.get());
        expr(2, "tau", g.tau.get());
      }
      expr(1, "q10", c.q10.get());
      expr(1, "q10 at", c.q10Reference.get());
      break;
    }
    case DeclKind::Pump: {
      auto &p = static_cast<const PumpDecl &>(d);
      line(1, p.exchanger ? "exchanger" : "pump");
      for (auto &t : p.cycle)
        line(1, "moves " + num(t.count.value) + " " + t.ion + (t.direction == Direction::In ? " in" : " out"));
      expr(1, "activity", p.activity.get());
      break;
    }
    case DeclKind::Sweep: {
      auto &sw = static_cast<const SweepDecl &>(d);
      for (auto &a : sw.axes) {
        line(1, "vary " + a.parameter + (a.logarithmic ? " logarithmic" : "") +
                    (a.points > 0 ? " points " + num(a.points) : ""));
        expr(2, "from", a.from.get());
        expr(2, "to", a.to.get());
        for (auto &v : a.values)
          expr(2, "value", v.get());
      }
      if (sw.design != SampleDesign::Grid)
        line(1, std::string("sample ") + num(sw.samples) +
                    (sw.design == SampleDesign::LatinHypercube ? " latin_hypercube" : " uniform") + " seed " +
                    num(sw.seed));
      for (auto &m : sw.measures) {
        line(1, "measure " + (m->protocol.empty() ? "" : m->protocol + ": ") + m->measure);
        for (auto &a : m->args) {
          if (!a.path.empty())
            line(2, "arg " + a.path);
          expr(3, "at", a.position.at.get());
          expr(2, "arg", a.value.get());
        }
      }
      break;
    }
    case DeclKind::Expect: {
      auto &e = static_cast<const ExpectDecl &>(d);
      line(1, "measure " + (e.protocol.empty() ? "" : e.protocol + ": ") + e.measure +
                  (e.protocol.empty() ? "" : bound(e.target)));
      for (auto &a : e.args) {
        if (!a.path.empty())
          line(2, "arg " + a.path);
        expr(3, "at", a.position.at.get());
        expr(2, "arg", a.value.get());
      }
      static const char *checks[] = {"==", "in", "<", "<=", ">", ">=", "measured"};
      line(1, std::string("check ") + checks[static_cast<int>(e.check)] + (e.relative ? " relative" : ""));
      expr(2, "value", e.value.get());
      expr(2, "tolerance", e.tolerance.get());
      expr(2, "to", e.high.get());
      if (!e.source.empty())
        line(1, "source " + e.source);
      break;
    }
    case DeclKind::Protocol: {
      auto &p = static_cast<const ProtocolDecl &>(d);
      if (p.method != IntegrationMethod::Default)
        line(1, "method " + p.methodText);
      expr(1, "step", p.step.get());
      expr(1, "tolerance", p.tolerance.get());
      expr(1, "duration", p.duration.get());
      static const char *shapes[] = {"step", "ramp", "pulses"};
      for (auto &i : p.injections) {
        line(1, std::string("inject ") + i.compartment + " " + shapes[static_cast<int>(i.shape)] + bound(i.target));
        expr(2, "at", i.position.at.get());
        expr(2, "amplitude", i.amplitude.get());
        expr(2, "to amplitude", i.amplitudeEnd.get());
        expr(2, "width", i.width.get());
        expr(2, "every", i.period.get());
        expr(2, "from", i.from.get());
        expr(2, "to", i.to.get());
      }
      for (auto &c : p.clamps) {
        line(1, "clamp " + c.compartment + bound(c.target));
        expr(2, "at", c.position.at.get());
        expr(2, "level", c.level.get());
        expr(2, "from", c.from.get());
        expr(2, "to", c.to.get());
      }
      static const char *synapseShapes[] = {"decay", "rise-decay", "alpha"};
      for (auto &y : p.synapses) {
        line(1, std::string("synapse ") + y.compartment + " " + synapseShapes[static_cast<int>(y.shape)] +
                    bound(y.target));
        expr(2, "at", y.position.at.get());
        expr(2, "conductance", y.conductance.get());
        expr(2, "reversal", y.reversal.get());
        expr(2, "rise", y.rise.get());
        expr(2, "decay", y.decay.get());
        expr(2, "peak", y.peak.get());
        for (auto &t : y.times)
          expr(2, "event", t.get());
        expr(2, "every", y.every.get());
        expr(2, "from", y.from.get());
        expr(2, "to", y.to.get());
      }
      for (auto &r : p.records) {
        line(1, "record " + r.path);
        expr(2, "at", r.position.at.get());
      }
      expr(1, "every", p.every.get());
      break;
    }
    }
  }
};

} // namespace

std::string dump(const Module &m, bool resolved) {
  Dumper d;
  d.resolved = resolved;
  d.file = m.file;
  for (auto &decl : m.decls)
    d.decl(*decl);
  return d.out.str();
}

std::string dumpResolved(const Program &program) {
  std::string out;
  for (auto &m : program.modules)
    out += "module " + m->name + "\n" + dump(*m, true);
  return out;
}

} // namespace saltpan::ast
