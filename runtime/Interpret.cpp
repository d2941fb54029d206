// Interpret.cpp - evaluates a kernel node by node, with C++'s own math functions.
#include "Interpret.h"

#include <cmath>

namespace saltpan {

using ir::Op;

void Interpreter::run(const double *y, const double *p, double t, double *out) {
  const auto &nodes = kernel_.nodes();
  double *v = values_.data();
  for (size_t i = 0; i < nodes.size(); ++i) {
    const ir::Node &n = nodes[i];
    double a = n.a >= 0 ? v[n.a] : 0, b = n.b >= 0 ? v[n.b] : 0;
    double r = 0;
    switch (n.op) {
    case Op::Const: r = n.constant; break;
    case Op::State: r = y[n.index]; break;
    case Op::Param: r = p[n.index]; break;
    case Op::Time: r = t; break;
    case Op::Add: r = a + b; break;
    case Op::Sub: r = a - b; break;
    case Op::Mul: r = a * b; break;
    case Op::Div: r = a / b; break;
    case Op::Neg: r = -a; break;
    case Op::Pow: r = std::pow(a, b); break;
    case Op::Exp: r = std::exp(a); break;
    case Op::Expm1: r = std::expm1(a); break;
    case Op::Log: r = std::log(a); break;
    case Op::Log10: r = std::log10(a); break;
    case Op::Sqrt: r = std::sqrt(a); break;
    case Op::Abs: r = std::fabs(a); break;
    case Op::Min: r = std::fmin(a, b); break;
    case Op::Max: r = std::fmax(a, b); break;
    case Op::Tanh: r = std::tanh(a); break;
    case Op::Lt: r = a < b; break;
    case Op::Le: r = a <= b; break;
    case Op::Gt: r = a > b; break;
    case Op::Ge: r = a >= b; break;
    case Op::Eq: r = a == b; break;
    case Op::Ne: r = a != b; break;
    case Op::And: r = (a != 0 && b != 0); break;
    case Op::Or: r = (a != 0 || b != 0); break;
    case Op::Not: r = (a == 0); break;
    case Op::Select: r = a != 0 ? b : v[n.c]; break;
    }
    v[i] = r;
  }
  for (size_t i = 0; i < kernel_.outputs.size(); ++i)
    out[i] = v[kernel_.outputs[i]];
}

} // namespace saltpan
