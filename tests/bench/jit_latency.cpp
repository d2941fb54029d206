// jit_latency.cpp - not a test: how long the JIT takes to start and to compile a kernel the
// size of a small Hodgkin-Huxley-style membrane (~100 IR nodes). Run ./build/saltpan_jit_latency.
#include "IR.h"
#include "JIT.h"

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <vector>

using namespace saltpan;
using ir::Op;

namespace {

// Three gates with alpha/beta rates in SI units, a leak and a linearised membrane current.
ir::Kernel membraneKernel(int variant) {
  ir::Kernel k;
  auto c = [&](double v) { return k.constant(v); };
  auto add = [&](ir::NodeId a, ir::NodeId b) { return k.binary(Op::Add, a, b); };
  auto sub = [&](ir::NodeId a, ir::NodeId b) { return k.binary(Op::Sub, a, b); };
  auto mul = [&](ir::NodeId a, ir::NodeId b) { return k.binary(Op::Mul, a, b); };
  auto div = [&](ir::NodeId a, ir::NodeId b) { return k.binary(Op::Div, a, b); };
  auto ex = [&](ir::NodeId a) { return k.unary(Op::Exp, a); };
  ir::NodeId v = k.state(0);
  // a * (V - vh) / (1 - exp(-(V - vh) / s)), guarded at the removable singularity.
  auto linoid = [&](double a, double vh, double s) {
    ir::NodeId x = div(sub(v, c(vh)), c(s));
    ir::NodeId general = div(mul(c(a * s), x), sub(c(1), ex(k.unary(Op::Neg, x))));
    ir::NodeId small = k.binary(Op::Lt, k.unary(Op::Abs, x), c(1e-6));
    return k.select(small, mul(c(a * s), add(c(1), mul(c(0.5), x))), general);
  };
  auto expo = [&](double a, double vh, double s) { return mul(c(a), ex(div(sub(v, c(vh)), c(s)))); };
  auto sigm = [&](double a, double vh, double s) {
    return div(c(a), add(c(1), ex(div(sub(v, c(vh)), c(s)))));
  };
  double shift = 1e-3 * variant; // a different kernel each round, so nothing is cached
  struct Rates {
    ir::NodeId alpha, beta;
  };
  Rates gates[3] = {{linoid(1e5, -0.040 + shift, 0.010), expo(4e3, -0.065, -0.018)},
                    {expo(70, -0.065, -0.020), sigm(1e3, -0.035, -0.010)},
                    {linoid(1e4, -0.055, 0.010), expo(125, -0.065, -0.080)}};
  ir::NodeId qT = k.param(7);
  ir::NodeId open[3];
  for (int g = 0; g < 3; ++g) {
    ir::NodeId sum = add(gates[g].alpha, gates[g].beta);
    k.addOutput(div(gates[g].alpha, sum));    // inf
    k.addOutput(div(c(1), mul(qT, sum)));    // tau
    open[g] = k.state(g + 1);
  }
  ir::NodeId m = open[0], h = open[1], n = open[2];
  ir::NodeId gNa = mul(k.param(0), mul(mul(mul(m, m), m), h));
  ir::NodeId gK = mul(k.param(1), mul(mul(n, n), mul(n, n)));
  ir::NodeId gL = k.param(2);
  ir::NodeId g = add(add(gNa, gK), gL);
  ir::NodeId ge = add(add(mul(gNa, k.param(3)), mul(gK, k.param(4))), mul(gL, k.param(5)));
  ir::NodeId t = k.time();
  ir::NodeId on = k.binary(Op::And, k.binary(Op::Ge, t, c(0.01)), k.binary(Op::Lt, t, c(0.02)));
  ir::NodeId stim = k.select(on, k.unary(Op::Neg, k.param(6)), c(0));
  k.addOutput(g);
  k.addOutput(ge);
  k.addOutput(stim);
  k.addOutput(sub(add(mul(g, v), stim), ge)); // total current
  return k;
}

double msSince(std::chrono::steady_clock::time_point start) {
  return std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - start).count();
}

} // namespace

int main() {
  const int rounds = 10;
  std::vector<double> create, first, second;
  size_t nodes = 0;
  double check = 0;
  for (int r = 0; r < rounds; ++r) {
    ir::Kernel k1 = membraneKernel(2 * r), k2 = membraneKernel(2 * r + 1);
    nodes = k1.nodes().size();
    std::string error;
    auto t0 = std::chrono::steady_clock::now();
    std::unique_ptr<JIT> jit = JIT::create(error);
    if (!jit) {
      std::fprintf(stderr, "jit_latency: %s\n", error.c_str());
      return 70;
    }
    create.push_back(msSince(t0));
    auto t1 = std::chrono::steady_clock::now();
    KernelFn f1 = jit->compile(k1, error);
    first.push_back(msSince(t1));
    auto t2 = std::chrono::steady_clock::now();
    KernelFn f2 = jit->compile(k2, error);
    second.push_back(msSince(t2));
    if (!f1 || !f2) {
      std::fprintf(stderr, "jit_latency: %s\n", error.c_str());
      return 70;
    }
    double y[4] = {-0.065, 0.05, 0.6, 0.32}, p[8] = {1200, 360, 3, 0.05, -0.077, -0.0544, 0.1, 1};
    double out[10];
    f1(y, p, 0.015, out);
    check += out[9];
    f2(y, p, 0.015, out);
    check += out[9];
  }
  auto report = [&](const char *what, std::vector<double> v) {
    double best = v[0], sum = 0;
    for (double x : v) {
      best = std::min(best, x);
      sum += x;
    }
    std::printf("  %-34s mean %7.2f ms   best %7.2f ms\n", what, sum / v.size(), best);
  };
  std::printf("JIT latency, %d rounds, kernel of %zu IR nodes (checksum %g)\n", rounds, nodes, check);
  report("JIT::create", create);
  report("first compile (codegen+O3+machine)", first);
  report("second compile, same JIT", second);
  std::vector<double> total(rounds);
  for (int r = 0; r < rounds; ++r)
    total[r] = create[r] + first[r];
  report("create + first compile", total);
  return 0;
}
