// hh_sweep_handwritten.cpp - the baseline of tests/bench/sweep_bench.sh: a hand-written scalar
// loop over the points of the squid-axon conductance grid of
// specs/reference/squid_axon_1952_sweeps.saltpan (sweep `conductances`, protocol `euler10`),
// each point 200 ms of exponential Euler at 10 us with a 10 uA/cm2 step, V sampled every
// 0.1 ms and spikes counted as upward crossings of 0 mV between samples. One thread. Not a test.
//
// Equations and parameters: Hodgkin & Huxley 1952 in the modern convention, 6.3 degC.
#include "HH1952Rates.h"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace {

using namespace hh1952;

int spikeCount(double gNa, double gK) {
  const double gL = 0.3, eNa = 50, eK = -77, eL = -54.387, c = 1, stim = 10, dt = 0.01;
  double v = -65;
  double m = alphaM(v) / (alphaM(v) + betaM(v)), h = alphaH(v) / (alphaH(v) + betaH(v)),
         n = alphaN(v) / (alphaN(v) + betaN(v));
  int spikes = 0;
  double previous = v;
  for (long i = 1; i <= 20000; ++i) {
    double am = alphaM(v), bm = betaM(v), ah = alphaH(v), bh = betaH(v), an = alphaN(v), bn = betaN(v);
    double m3h = m * m * m * h, n4 = n * n * n * n;
    double g = gNa * m3h + gK * n4 + gL;
    double ge = gNa * m3h * eNa + gK * n4 * eK + gL * eL;
    double vInf = (ge + stim) / g;
    m = am / (am + bm) + (m - am / (am + bm)) * std::exp(-dt * (am + bm));
    h = ah / (ah + bh) + (h - ah / (ah + bh)) * std::exp(-dt * (ah + bh));
    n = an / (an + bn) + (n - an / (an + bn)) * std::exp(-dt * (an + bn));
    v = vInf + (v - vInf) * std::exp(-dt * g / c);
    if (i % 10 == 0) {
      spikes += previous < 0 && v >= 0;
      previous = v;
    }
  }
  return spikes;
}

} // namespace

int main(int argc, char **argv) {
  int side = argc > 1 ? std::atoi(argv[1]) : 64;
  auto start = std::chrono::steady_clock::now();
  long total = 0;
  for (int i = 0; i < side; ++i)
    for (int j = 0; j < side; ++j)
      total += spikeCount(60 + 120.0 * i / (side - 1), 18 + 36.0 * j / (side - 1));
  double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  std::printf("hand-written: %d points in %.3f s (%.1f points/s), %ld spikes in all\n", side * side, s,
              side * side / s, total);
  return 0;
}
