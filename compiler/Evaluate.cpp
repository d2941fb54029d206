// Evaluate.cpp - a direct tree-walking evaluator of checked expressions.
#include "Evaluate.h"

#include "Physics.h"

#include <cmath>
#include <vector>

namespace saltpan {

using namespace ast;

struct Evaluator::Frame {
  const double *args = nullptr;
};

namespace {
struct Abort {};
} // namespace

std::optional<double> Evaluator::evaluate(const Expr &e, const EvalEnv &env, EvalFailure *failure) {
  failure_ = {};
  try {
    double v = eval(e, env, nullptr);
    if (!std::isfinite(v)) {
      if (failure)
        *failure = {e.range, "the result is not a finite number"};
      return std::nullopt;
    }
    return v;
  } catch (Abort &) {
    if (failure)
      *failure = failure_;
    return std::nullopt;
  }
}

std::optional<double> Evaluator::constant(const ConstDecl &c, EvalFailure *failure) {
  if (auto it = constants_.find(&c); it != constants_.end()) {
    if (!it->second && failure)
      *failure = {c.value->range, "its value could not be computed"};
    return it->second;
  }
  EvalEnv none;
  auto v = evaluate(*c.value, none, failure);
  constants_[&c] = v;
  return v;
}

double Evaluator::eval(const Expr &e, const EvalEnv &env, const Frame *frame) {
  auto fail = [&](const std::string &reason) -> double {
    failure_.range = e.range;
    failure_.reason = reason;
    throw Abort{};
  };
  switch (e.kind) {
  case ExprKind::Number:
    return static_cast<const NumberExpr &>(e).value;
  case ExprKind::Name: {
    auto &n = static_cast<const NameExpr &>(e);
    if (n.paramIndex >= 0 && frame && frame->args)
      return frame->args[n.paramIndex];
    if (n.builtin == Builtin::MembranePotential)
      return env.V ? *env.V : fail("needs the membrane potential");
    if (n.builtin == Builtin::Temperature)
      return env.T ? *env.T : fail("needs the model's temperature");
    if (auto *c = dyn_cast<ConstDecl>(n.target)) {
      EvalFailure inner;
      if (auto v = constant(*c, &inner))
        return *v;
      failure_ = inner;
      throw Abort{};
    }
    return fail("'" + n.name + "' has no value");
  }
  case ExprKind::Concentration: {
    auto &c = static_cast<const ConcentrationExpr &>(e);
    std::optional<double> v;
    if (env.concentration && c.target)
      v = env.concentration(c.target, c.side);
    if (!v)
      failure_.missingIon = c.target;
    return v ? *v
             : fail("needs the concentration of '" + c.ion + "' " + (c.side == Side::Inside ? "inside" : "outside"));
  }
  case ExprKind::Call: {
    auto &c = static_cast<const CallExpr &>(e);
    if (c.math == MathFn::Reversal) {
      std::optional<double> v;
      if (env.reversal && c.reversalIon)
        v = env.reversal(c.reversalIon);
      if (!v)
        failure_.missingIon = c.reversalIon;
      return v ? *v : fail("needs the reversal potential of '" + (c.reversalIon ? c.reversalIon->name : "?") + "'");
    }
    // Most calls take a few arguments: keep them off the heap on this hot path.
    double local[8];
    std::vector<double> spill;
    double *args = local;
    if (c.args.size() > 8) {
      spill.resize(c.args.size());
      args = spill.data();
    }
    for (size_t i = 0; i < c.args.size(); ++i)
      args[i] = eval(*c.args[i], env, frame);
    switch (c.math) {
    case MathFn::Exp: return std::exp(args[0]);
    case MathFn::Expm1: return std::expm1(args[0]);
    case MathFn::Log: return args[0] > 0 ? std::log(args[0]) : fail("'log' of a number that is not positive");
    case MathFn::Log10: return args[0] > 0 ? std::log10(args[0]) : fail("'log10' of a number that is not positive");
    case MathFn::Sqrt: return args[0] >= 0 ? std::sqrt(args[0]) : fail("'sqrt' of a negative number");
    case MathFn::Pow: return std::pow(args[0], args[1]);
    case MathFn::Abs: return std::fabs(args[0]);
    case MathFn::Min: return std::fmin(args[0], args[1]);
    case MathFn::Max: return std::fmax(args[0], args[1]);
    case MathFn::Tanh: return std::tanh(args[0]);
    case MathFn::Reversal:
    case MathFn::None:
      break;
    }
    if (!c.target)
      return fail("unresolved call");
    Frame inner{args};
    return eval(*c.target->body, env, &inner);
  }
  case ExprKind::Unary: {
    auto &u = static_cast<const UnaryExpr &>(e);
    double v = eval(*u.operand, env, frame);
    return u.op == UnaryOp::Negate ? -v : u.op == UnaryOp::Plus ? v : (v == 0 ? 1.0 : 0.0);
  }
  case ExprKind::Binary: {
    auto &b = static_cast<const BinaryExpr &>(e);
    double l = eval(*b.lhs, env, frame);
    // 'and'/'or' do not evaluate their right side when the left decides.
    if (b.op == BinaryOp::And)
      return l != 0 && eval(*b.rhs, env, frame) != 0 ? 1.0 : 0.0;
    if (b.op == BinaryOp::Or)
      return l != 0 || eval(*b.rhs, env, frame) != 0 ? 1.0 : 0.0;
    double r = eval(*b.rhs, env, frame);
    switch (b.op) {
    case BinaryOp::Add: return l + r;
    case BinaryOp::Sub: return l - r;
    case BinaryOp::Mul: return l * r;
    case BinaryOp::Div: return r != 0 ? l / r : fail("division by zero");
    case BinaryOp::Pow: return std::pow(l, r);
    case BinaryOp::Eq: return l == r;
    case BinaryOp::Ne: return l != r;
    case BinaryOp::Lt: return l < r;
    case BinaryOp::Le: return l <= r;
    case BinaryOp::Gt: return l > r;
    case BinaryOp::Ge: return l >= r;
    case BinaryOp::And:
    case BinaryOp::Or:
      break;
    }
    return fail("unknown operator");
  }
  case ExprKind::If: {
    auto &i = static_cast<const IfExpr &>(e);
    return eval(*i.cond, env, frame) != 0 ? eval(*i.thenExpr, env, frame) : eval(*i.elseExpr, env, frame);
  }
  }
  return fail("unknown expression");
}

} // namespace saltpan
