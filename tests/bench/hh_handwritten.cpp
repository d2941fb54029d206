// hh_handwritten.cpp - a hand-written stepper for the Hodgkin-Huxley 1952 squid axon with
// the same method saltpan uses (Rush-Larsen gates, exact exponential V step with frozen gates),
// the baseline for saltpan's JIT in tests/bench/sim_bench.sh. Not a test.
//
// Equations and parameters: Hodgkin & Huxley 1952 in the modern convention, 6.3 degC
// (see docs/references.md); units mV, ms, uA/cm2, mS/cm2, uF/cm2.
#include "HH1952Rates.h"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace {

using namespace hh1952;

struct State {
  double v, m, h, n;
};

} // namespace

int main(int argc, char **argv) {
  double durationMs = argc > 1 ? std::atof(argv[1]) : 1000;
  double dt = argc > 2 ? std::atof(argv[2]) : 0.01; // ms
  const double gNa = 120, gK = 36, gL = 0.3, eNa = 50, eK = -77, eL = -54.387, c = 1, stim = 10;
  State s{-65, 0, 0, 0};
  s.m = alphaM(s.v) / (alphaM(s.v) + betaM(s.v));
  s.h = alphaH(s.v) / (alphaH(s.v) + betaH(s.v));
  s.n = alphaN(s.v) / (alphaN(s.v) + betaN(s.v));
  long steps = std::lround(durationMs / dt);
  int spikes = 0;
  bool above = false;
  auto start = std::chrono::steady_clock::now();
  for (long i = 0; i < steps; ++i) {
    double v = s.v;
    double am = alphaM(v), bm = betaM(v), ah = alphaH(v), bh = betaH(v), an = alphaN(v), bn = betaN(v);
    double m3h = s.m * s.m * s.m * s.h, n4 = s.n * s.n * s.n * s.n;
    double g = gNa * m3h + gK * n4 + gL;
    double ge = gNa * m3h * eNa + gK * n4 * eK + gL * eL;
    double vInf = (ge + stim) / g;
    s.m = am / (am + bm) + (s.m - am / (am + bm)) * std::exp(-dt * (am + bm));
    s.h = ah / (ah + bh) + (s.h - ah / (ah + bh)) * std::exp(-dt * (ah + bh));
    s.n = an / (an + bn) + (s.n - an / (an + bn)) * std::exp(-dt * (an + bn));
    s.v = vInf + (v - vInf) * std::exp(-dt * g / c);
    if (!above && s.v >= 0)
      ++spikes;
    above = s.v >= 0;
  }
  auto end = std::chrono::steady_clock::now();
  double ms = std::chrono::duration<double, std::milli>(end - start).count();
  std::printf("hand-written: %ld steps in %.2f ms (%.2f ns/step), %d spikes, final V %.6f mV\n", steps, ms,
              ms * 1e6 / steps, spikes, s.v);
  return 0;
}
