// JIT.tests.cpp - CodeGen + JIT: compiled kernels against a plain C++ evaluation of the same
// nodes, for every IR operation, rate expressions of the Hodgkin-Huxley kind and random kernels.
#include "IR.h"
#include "JIT.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <random>
#include <string>
#include <vector>

using namespace saltpan;
using ir::NodeId;
using ir::Op;

namespace {

constexpr double kEps = std::numeric_limits<double>::epsilon(); // 2^-52
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

double truth(double v) { return v != 0 ? 1.0 : 0.0; }

/// One node's value as plain C++ computes it (what the interpreter does).
double apply(const ir::Node &n, const std::vector<double> &v, const double *y, const double *p, double t) {
  double a = n.a >= 0 ? v[n.a] : 0, b = n.b >= 0 ? v[n.b] : 0;
  switch (n.op) {
  case Op::Const: return n.constant;
  case Op::State: return y[n.index];
  case Op::Param: return p[n.index];
  case Op::Time: return t;
  case Op::Add: return a + b;
  case Op::Sub: return a - b;
  case Op::Mul: return a * b;
  case Op::Div: return a / b;
  case Op::Neg: return -a;
  case Op::Pow: return std::pow(a, b);
  case Op::Exp: return std::exp(a);
  case Op::Expm1: return std::expm1(a);
  case Op::Log: return std::log(a);
  case Op::Log10: return std::log10(a);
  case Op::Sqrt: return std::sqrt(a);
  case Op::Abs: return std::fabs(a);
  case Op::Min: return std::fmin(a, b);
  case Op::Max: return std::fmax(a, b);
  case Op::Tanh: return std::tanh(a);
  case Op::Lt: return a < b ? 1 : 0;
  case Op::Le: return a <= b ? 1 : 0;
  case Op::Gt: return a > b ? 1 : 0;
  case Op::Ge: return a >= b ? 1 : 0;
  case Op::Eq: return a == b ? 1 : 0;
  case Op::Ne: return a != b ? 1 : 0;
  case Op::And: return truth(a) * truth(b);
  case Op::Or: return a != 0 || b != 0 ? 1 : 0;
  case Op::Not: return a == 0 ? 1 : 0;
  case Op::Select: return a != 0 ? b : v[n.c];
  }
  FAIL("unknown op");
  return 0;
}

std::vector<double> reference(const ir::Kernel &k, const double *y, const double *p, double t) {
  std::vector<double> v;
  for (const ir::Node &n : k.nodes())
    v.push_back(apply(n, v, y, p, t));
  std::vector<double> out;
  for (NodeId o : k.outputs)
    out.push_back(v[o]);
  return out;
}

/// A value with a running bound on its rounding error (first order, a few ulps per operation,
/// libmvec's 4-ulp vector functions included), so two evaluations that round differently
/// (FMA contraction, vector exp) can be compared honestly even after cancellation.
struct Bounded {
  double v = 0;
  double e = 0;           // |error| <= e
  bool ambiguous = false; // a comparison too close to call: the two evaluations may differ
};

std::vector<Bounded> referenceBounded(const ir::Kernel &k, const double *y, const double *p, double t) {
  std::vector<Bounded> r;
  std::vector<double> plain;
  for (const ir::Node &n : k.nodes()) {
    Bounded x;
    x.v = apply(n, plain, y, p, t);
    const Bounded none;
    const Bounded &a = n.a >= 0 ? r[n.a] : none, &b = n.b >= 0 ? r[n.b] : none;
    double own = 4 * kEps * std::fabs(x.v);
    // Too close to call unless exact (e == 0) or clearly apart; a NaN bound or value is never clear.
    auto close = [](double d, double e) { return !(e <= 0) && !(std::fabs(d) > 2 * e); };
    switch (n.op) {
    case Op::Const:
    case Op::State:
    case Op::Param:
    case Op::Time: break;
    case Op::Add:
    case Op::Sub: x.e = a.e + b.e + own; break;
    case Op::Mul: x.e = a.e * std::fabs(b.v) + b.e * std::fabs(a.v) + a.e * b.e + own; break;
    case Op::Div:
      x.e = std::fabs(b.v) > 2 * b.e ? (a.e + std::fabs(x.v) * b.e) / (std::fabs(b.v) - b.e) + own : kInf;
      break;
    case Op::Neg:
    case Op::Abs: x.e = a.e; break;
    case Op::Exp: x.e = std::fabs(x.v) * std::expm1(a.e) + own; break;
    case Op::Expm1: x.e = std::exp(a.v) * std::expm1(a.e) + own; break;
    case Op::Log:
    case Op::Log10:
      x.e = std::fabs(a.v) > 2 * a.e ? a.e / (std::fabs(a.v) - a.e) + own : kInf;
      if (n.op == Op::Log10)
        x.e /= std::log(10.0);
      break;
    case Op::Sqrt:
      x.e = a.v > 2 * a.e ? a.e / std::sqrt(a.v - a.e) + own : (a.v >= 0 ? std::sqrt(a.e) + own : kInf);
      break;
    case Op::Tanh: x.e = a.e + own; break;
    case Op::Pow: // d(a^b) = b a^(b-1) da + ln(a) a^b db; twice that for the second order
      x.e = a.v > 2 * a.e ? 2 * (std::fabs(b.v * x.v / a.v) * a.e + std::fabs(std::log(a.v) * x.v) * b.e) + own
                          : kInf;
      break;
    case Op::Min:
    case Op::Max: x.e = std::isnan(a.e) || std::isnan(b.e) ? kInf : std::fmax(a.e, b.e); break;
    case Op::Lt:
    case Op::Le:
    case Op::Gt:
    case Op::Ge:
    case Op::Eq:
    case Op::Ne: x.ambiguous = close(a.v - b.v, a.e + b.e); break;
    case Op::And:
    case Op::Or: x.ambiguous = close(a.v, a.e) || close(b.v, b.e); break;
    case Op::Not: x.ambiguous = close(a.v, a.e); break;
    case Op::Select: {
      const Bounded &chosen = a.v != 0 ? b : r[n.c];
      x.e = chosen.e;
      x.ambiguous = a.ambiguous || close(a.v, a.e) || chosen.ambiguous;
      break;
    }
    }
    // Exact operands give identical results in both evaluations, bar the operation's own
    // rounding; the same node on both sides of a comparison compares identically too.
    bool exactOperands = a.e == 0 && b.e == 0 && !a.ambiguous && !b.ambiguous &&
                         (n.op != Op::Select || (r[n.c].e == 0 && !r[n.c].ambiguous));
    if (exactOperands && n.op != Op::Select)
      x.e = std::isfinite(x.v) ? own : 0;
    if (exactOperands || (n.a == n.b && ir::arity(n.op) == 2))
      x.ambiguous = false;
    if (n.op != Op::Select)
      x.ambiguous = x.ambiguous || a.ambiguous || b.ambiguous;
    plain.push_back(x.v);
    r.push_back(x);
  }
  std::vector<Bounded> out;
  for (NodeId o : k.outputs)
    out.push_back(r[o]);
  return out;
}

bool sameValue(double a, double b) { return a == b || (std::isnan(a) && std::isnan(b)); }

bool closeValue(double got, double want, double tolerance) {
  return sameValue(got, want) || std::fabs(got - want) <= tolerance;
}

std::vector<double> run(KernelFn f, const ir::Kernel &k, const double *y, const double *p, double t) {
  std::vector<double> out(k.outputs.size() + 1, -12345.0);
  f(y, p, t, out.data());
  CHECK(out.back() == -12345.0); // nothing written past the last output
  out.pop_back();
  return out;
}

std::unique_ptr<JIT> makeJIT() {
  std::string error;
  std::unique_ptr<JIT> jit = JIT::create(error);
  INFO(error);
  REQUIRE(jit != nullptr);
  return jit;
}

KernelFn compileOrFail(JIT &jit, const ir::Kernel &k) {
  std::string error;
  KernelFn f = jit.compile(k, error);
  INFO(error);
  REQUIRE(f != nullptr);
  return f;
}

bool exactOp(Op op) {
  switch (op) {
  case Op::Pow:
  case Op::Exp:
  case Op::Expm1:
  case Op::Log:
  case Op::Log10:
  case Op::Tanh: return false; // libm (scalar or libmvec): within a few ulps
  default: return true;        // IEEE basic operations and comparisons: bit for bit
  }
}

/// A value from the given distribution or, now and then, an awkward one.
double awkward(std::mt19937_64 &rng, std::uniform_real_distribution<double> &dist) {
  static const double specials[] = {0.0, -0.0, 1.0, -1.0, 2.0, 0.5, kInf, -kInf, kNaN, 1e-300, -1e300, 3.0};
  std::uniform_int_distribution<int> pick(0, 39);
  int i = pick(rng);
  return i < 12 ? specials[i] : dist(rng);
}

} // namespace

TEST_CASE("every IR operation on states, params, time and constants matches C++", "[jit]") {
  ir::Kernel k;
  NodeId y0 = k.state(0), y1 = k.state(1), y2 = k.state(2), p0 = k.param(0), p1 = k.param(1), t = k.time();
  NodeId c = k.constant(0.75), zero = k.constant(0);
  std::vector<Op> outputOps;
  auto out = [&](NodeId n) {
    k.addOutput(n);
    outputOps.push_back(k.nodes()[n].op);
  };
  out(k.constant(-2.5)); // a bare constant and bare leaves
  out(y2);
  out(p1);
  out(t);
  const Op binaries[] = {Op::Add, Op::Sub, Op::Mul, Op::Div, Op::Pow, Op::Min, Op::Max, Op::Lt, Op::Le,
                         Op::Gt,  Op::Ge,  Op::Eq,  Op::Ne,  Op::And, Op::Or};
  const Op unaries[] = {Op::Neg, Op::Exp, Op::Expm1, Op::Log, Op::Log10, Op::Sqrt, Op::Abs, Op::Tanh, Op::Not};
  for (Op op : binaries) {
    out(k.binary(op, y0, y1));
    out(k.binary(op, y1, p0));
    out(k.binary(op, t, c));
    out(k.binary(op, c, y0));
  }
  for (Op op : unaries) {
    out(k.unary(op, y0));
    out(k.unary(op, p0));
  }
  out(k.select(y0, y1, p0)); // any non-zero (NaN too) is true
  out(k.select(k.binary(Op::Lt, y1, t), y2, c));
  out(k.select(k.binary(Op::Ne, p1, zero), k.unary(Op::Exp, y1), y0));
  out(k.binary(Op::Pow, y0, k.constant(2)));
  out(k.binary(Op::Pow, y0, k.constant(0.5)));
  out(k.binary(Op::Pow, y0, k.constant(-1)));
  out(k.binary(Op::Pow, p0, k.constant(3)));
  REQUIRE(k.outputs.size() == outputOps.size());

  auto jit = makeJIT();
  KernelFn f = compileOrFail(*jit, k);
  std::mt19937_64 rng(12345);
  std::uniform_real_distribution<double> wide(-4, 4);
  int checked = 0;
  for (int sample = 0; sample < 4000; ++sample) {
    double y[3] = {awkward(rng, wide), awkward(rng, wide), awkward(rng, wide)};
    double p[2] = {awkward(rng, wide), awkward(rng, wide)};
    double time = sample % 7 == 0 ? 0.75 : awkward(rng, wide); // sometimes equal to c
    if (sample % 11 == 0)
      y[1] = y[0]; // equal operands for Eq/Le/Ge
    std::vector<double> want = reference(k, y, p, time), got = run(f, k, y, p, time);
    for (size_t i = 0; i < want.size(); ++i) {
      INFO("output " << i << " (" << ir::opName(outputOps[i]) << ") y=" << y[0] << "," << y[1] << "," << y[2]
                     << " p=" << p[0] << "," << p[1] << " t=" << time << " want " << want[i] << " got " << got[i]);
      if (exactOp(outputOps[i]))
        CHECK(sameValue(got[i], want[i]));
      else
        CHECK(closeValue(got[i], want[i], 1e-13 * std::fabs(want[i])));
      ++checked;
    }
  }
  CHECK(checked == 4000 * static_cast<int>(outputOps.size()));
}

TEST_CASE("comparisons give exactly 1 or 0 and treat NaN like C++", "[jit]") {
  ir::Kernel k;
  NodeId a = k.state(0), b = k.state(1);
  for (Op op : {Op::Lt, Op::Le, Op::Gt, Op::Ge, Op::Eq, Op::Ne, Op::And, Op::Or})
    k.addOutput(k.binary(op, a, b));
  k.addOutput(k.unary(Op::Not, a));
  k.addOutput(k.select(a, k.constant(10), k.constant(20)));
  auto jit = makeJIT();
  KernelFn f = compileOrFail(*jit, k);
  struct Case {
    double a, b;
    std::vector<double> want; // Lt Le Gt Ge Eq Ne And Or Not Select
  };
  const Case cases[] = {
      {1, 2, {1, 1, 0, 0, 0, 1, 1, 1, 0, 10}},
      {2, 2, {0, 1, 0, 1, 1, 0, 1, 1, 0, 10}},
      {-0.0, 0.0, {0, 1, 0, 1, 1, 0, 0, 0, 1, 20}},
      {kNaN, 1, {0, 0, 0, 0, 0, 1, 1, 1, 0, 10}},
      {0, kNaN, {0, 0, 0, 0, 0, 1, 0, 1, 1, 20}},
      {0.25, 0, {0, 0, 1, 1, 0, 1, 0, 1, 0, 10}},
  };
  for (const Case &cs : cases) {
    double y[2] = {cs.a, cs.b};
    std::vector<double> got = run(f, k, y, nullptr, 0);
    INFO("a=" << cs.a << " b=" << cs.b);
    CHECK(got == cs.want);
  }
}

TEST_CASE("Min and Max are fmin and fmax, NaN operands included", "[jit]") {
  ir::Kernel k;
  NodeId a = k.param(0), b = k.param(1);
  k.addOutput(k.binary(Op::Min, a, b));
  k.addOutput(k.binary(Op::Max, a, b));
  auto jit = makeJIT();
  KernelFn f = compileOrFail(*jit, k);
  const double pairs[][2] = {{1, 2}, {2, 1}, {-3, kNaN}, {kNaN, -3}, {kInf, 5}, {-kInf, 5}, {kNaN, kNaN}};
  for (const auto &pr : pairs) {
    double p[2] = {pr[0], pr[1]};
    std::vector<double> got = run(f, k, nullptr, p, 0);
    INFO(pr[0] << ", " << pr[1]);
    CHECK(sameValue(got[0], std::fmin(pr[0], pr[1])));
    CHECK(sameValue(got[1], std::fmax(pr[0], pr[1])));
  }
}

TEST_CASE("a Hodgkin-Huxley rate, plain and Select-guarded, matches C++", "[jit]") {
  // alpha(V) = 0.1 (V + 0.04) / (1 - exp(-(V + 0.04) / 0.01)), V in volts; singular at -40 mV.
  ir::Kernel k;
  NodeId v = k.state(0);
  NodeId shifted = k.binary(Op::Add, v, k.constant(0.04));
  NodeId x = k.binary(Op::Div, shifted, k.constant(0.01));
  NodeId denominator = k.binary(Op::Sub, k.constant(1), k.unary(Op::Exp, k.unary(Op::Neg, x)));
  NodeId plain = k.binary(Op::Div, k.binary(Op::Mul, k.constant(0.1), shifted), denominator);
  // Near the singularity use the series 0.1 * 0.01 * (1 + x/2).
  NodeId nearSingular = k.binary(Op::Lt, k.unary(Op::Abs, x), k.constant(1e-6));
  NodeId series =
      k.binary(Op::Mul, k.constant(0.001), k.binary(Op::Add, k.constant(1), k.binary(Op::Mul, k.constant(0.5), x)));
  NodeId guarded = k.select(nearSingular, series, plain);
  k.addOutput(plain);
  k.addOutput(guarded);

  auto jit = makeJIT();
  KernelFn f = compileOrFail(*jit, k);
  auto cppPlain = [](double V) { return 0.1 * (V + 0.04) / (1 - std::exp(-(V + 0.04) / 0.01)); };
  auto cppGuarded = [&](double V) {
    double xx = (V + 0.04) / 0.01;
    return std::fabs(xx) < 1e-6 ? 0.001 * (1 + 0.5 * xx) : cppPlain(V);
  };
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> volts(-0.1, 0.05), nearby(-0.04 - 2e-8, -0.04 + 2e-8);
  for (int i = 0; i < 20000; ++i) {
    double V = i % 4 == 0 ? nearby(rng) : volts(rng);
    std::vector<double> got = run(f, k, &V, nullptr, 0);
    INFO("V = " << V);
    CHECK(closeValue(got[0], cppPlain(V), 1e-13 * std::fabs(cppPlain(V))));
    // 1 + 0.5x may be fused into one FMA: a rounding of 0.5x, at most eps/2 relative here.
    CHECK(closeValue(got[1], cppGuarded(V), 1e-13 * std::fabs(cppGuarded(V))));
  }
  double singular = -0.04;
  std::vector<double> got = run(f, k, &singular, nullptr, 0);
  CHECK(std::isnan(got[0])); // 0/0 unguarded
  CHECK(got[1] == 0.001);    // the series at x = 0
  CHECK(got[1] == cppGuarded(singular));
}

TEST_CASE("random kernels of every operation match C++ within their rounding bounds", "[jit]") {
  auto jit = makeJIT();
  int checked = 0, total = 0;
  for (int seed = 1; seed <= 16; ++seed) {
    std::mt19937_64 rng(seed);
    ir::Kernel k;
    std::vector<NodeId> pool = {k.state(0), k.state(1), k.state(2), k.state(3), k.param(0),
                                k.param(1), k.param(2), k.time(),   k.constant(0.5), k.constant(-1.5)};
    auto pick = [&] {
      // Mostly recent nodes, so chains grow deep; sometimes any node, so the graph is shared.
      size_t n = pool.size();
      std::uniform_int_distribution<size_t> recent(n > 6 ? n - 6 : 0, n - 1), any(0, n - 1);
      return pool[rng() % 2 ? recent(rng) : any(rng)];
    };
    const Op ops[] = {Op::Add, Op::Sub, Op::Mul, Op::Div, Op::Neg,  Op::Pow, Op::Exp, Op::Expm1,
                      Op::Log, Op::Log10, Op::Sqrt, Op::Abs, Op::Min, Op::Max, Op::Tanh, Op::Lt,
                      Op::Le,  Op::Gt,  Op::Ge,  Op::Eq,  Op::Ne,   Op::And, Op::Or,  Op::Not, Op::Select};
    std::uniform_int_distribution<size_t> whichOp(0, std::size(ops) - 1);
    while (pool.size() < 160) {
      Op op = ops[whichOp(rng)];
      NodeId a = pick(), b = pick(), n;
      switch (op) {
      case Op::Exp:
      case Op::Expm1: n = k.unary(op, k.unary(Op::Tanh, a)); break; // keep magnitudes finite
      case Op::Log:
      case Op::Log10:
      case Op::Sqrt: n = k.unary(op, rng() % 4 ? k.unary(Op::Abs, a) : a); break;
      case Op::Pow: n = k.binary(op, k.unary(Op::Abs, a), k.unary(Op::Tanh, b)); break;
      case Op::Select: n = k.select(k.binary(Op::Lt, a, b), pick(), pick()); break;
      default: n = ir::arity(op) == 1 ? k.unary(op, a) : k.binary(op, a, b); break;
      }
      pool.push_back(n);
    }
    for (size_t i = 10; i < pool.size(); i += 3)
      k.addOutput(pool[i]);
    k.addOutput(pool.back());

    KernelFn f = compileOrFail(*jit, k);
    std::uniform_real_distribution<double> state(-2, 2), param(0.5, 2), time(0, 1);
    for (int sample = 0; sample < 300; ++sample) {
      double y[4] = {state(rng), state(rng), state(rng), state(rng)};
      double p[3] = {param(rng), param(rng), param(rng)};
      double t = time(rng);
      std::vector<Bounded> want = referenceBounded(k, y, p, t);
      std::vector<double> got = run(f, k, y, p, t);
      for (size_t i = 0; i < want.size(); ++i) {
        ++total;
        if (want[i].ambiguous || !std::isfinite(want[i].e))
          continue;
        ++checked;
        double tolerance = std::fmax(2 * want[i].e, 1e-13 * std::fabs(want[i].v));
        INFO("seed " << seed << " sample " << sample << " output " << i << " want " << want[i].v << " +- "
                     << want[i].e << " got " << got[i]);
        CHECK(closeValue(got[i], want[i].v, tolerance));
      }
    }
  }
  INFO(checked << " of " << total << " outputs had a usable error bound");
  CHECK(checked > total / 2);
}

TEST_CASE("one JIT compiles several kernels, each callable, and shows their IR", "[jit]") {
  auto jit = makeJIT();
  ir::Kernel first;
  first.addOutput(first.binary(Op::Mul, first.state(0), first.param(0)));
  ir::Kernel second;
  NodeId s = second.state(0);
  second.addOutput(second.binary(Op::Sub, second.unary(Op::Tanh, s), second.unary(Op::Expm1, s)));
  second.addOutput(second.time());

  KernelFn f1 = compileOrFail(*jit, first);
  std::string ir1 = jit->lastIR();
  KernelFn f2 = compileOrFail(*jit, second);
  const std::string &ir2 = jit->lastIR();
  CHECK(f1 != f2);
  CHECK(ir1.find("define void @saltpan_kernel_0(") != std::string::npos);
  CHECK(ir2.find("define void @saltpan_kernel_1(") != std::string::npos);
  CHECK(ir2.find("saltpan_kernel_0") == std::string::npos);
  CHECK(ir2.find("@tanh") != std::string::npos);
  CHECK(ir2.find("@expm1") != std::string::npos);

  double y = 0.3, p = -2, out[2] = {0, 0};
  f1(&y, &p, 0, out);
  CHECK(out[0] == 0.3 * -2);
  f2(&y, nullptr, 1.25, out);
  CHECK(out[0] == std::tanh(0.3) - std::expm1(0.3));
  CHECK(out[1] == 1.25);
  f1(&y, &p, 0, out); // the first kernel is still there
  CHECK(out[0] == 0.3 * -2);

  // A second JIT is independent and starts numbering again.
  auto other = makeJIT();
  compileOrFail(*other, second);
  CHECK(other->lastIR().find("@saltpan_kernel_0(") != std::string::npos);
}

TEST_CASE("a kernel with no outputs compiles; a malformed one is refused", "[jit]") {
  auto jit = makeJIT();
  ir::Kernel empty;
  KernelFn f = compileOrFail(*jit, empty);
  double sentinel = 42;
  f(nullptr, nullptr, 0, &sentinel);
  CHECK(sentinel == 42);

  ir::Kernel bad;
  bad.addOutput(bad.state(0));
  bad.outputs.push_back(7); // names no node
  std::string error;
  CHECK(jit->compile(bad, error) == nullptr);
  CHECK(error.find("malformed") != std::string::npos);
}

TEST_CASE("many exp calls over independent states still agree (vectorised exp)", "[jit]") {
  // Eight independent exp(-y_i / p_0) outputs: O3 may group them into libmvec's _ZGVdN4v_exp.
  ir::Kernel k;
  NodeId scale = k.param(0);
  for (int i = 0; i < 8; ++i)
    k.addOutput(k.unary(Op::Exp, k.binary(Op::Div, k.unary(Op::Neg, k.state(i)), scale)));
  auto jit = makeJIT();
  KernelFn f = compileOrFail(*jit, k);
  std::mt19937_64 rng(99);
  std::uniform_real_distribution<double> dist(-30, 30);
  for (int sample = 0; sample < 2000; ++sample) {
    double y[8], p = 1.5;
    for (double &v : y)
      v = dist(rng);
    std::vector<double> got = run(f, k, y, &p, 0), want = reference(k, y, &p, 0);
    for (int i = 0; i < 8; ++i)
      CHECK(closeValue(got[i], want[i], 1e-13 * std::fabs(want[i])));
  }
}
