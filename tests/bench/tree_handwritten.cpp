// tree_handwritten.cpp - a hand-written implicit solver of a Hodgkin-Huxley 1952 cable (a lumped
// sealed start and N cylindrical pieces), with the method saltpan uses for trees: gates by
// exponential Euler staggered half a step, then Crank-Nicolson for V (backward Euler over half the
// step, extrapolated), the line's tridiagonal system eliminated in O(N) (Hines 1984 order on an
// unbranched tree). The baseline for saltpan in tests/bench/tree_bench.sh. Not a test.
//
// Equations: Hodgkin & Huxley 1952 in the modern convention with Q10 = 3 from 6.3 degC; cable
// geometry of Part III (diameter 476 um, 35.4 ohm*cm, 18.5 degC; from memory). Units mV, ms,
// uA/cm2, mS/cm2, uF/cm2, cm.
#include "HH1952Rates.h"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

namespace {

using namespace hh1952;

} // namespace

int main(int argc, char **argv) {
  int pieces = argc > 1 ? std::atoi(argv[1]) : 1000;
  double durationMs = argc > 2 ? std::atof(argv[2]) : 100;
  double dt = argc > 3 ? std::atof(argv[3]) : 0.025; // ms
  const double gNa = 120, gK = 36, gL = 0.3, eNa = 50, eK = -77, eL = -54.387, cm = 1;
  const double q10 = std::pow(3.0, (18.5 - 6.3) / 10), diameter = 476e-4, length = 6, ri = 35.4;

  // Compartment 0 is the lumped start (a sphere as wide as the axon), 1..N the pieces.
  size_t n = static_cast<size_t>(pieces) + 1;
  double piece = length / pieces, pi = std::acos(-1.0);
  std::vector<double> area(n, pi * diameter * piece), up(n, 0); // up[i]: mS to compartment i-1
  area[0] = pi * diameter * diameter;
  double halfPiece = 4 * ri * (piece / 2) / (pi * diameter * diameter); // ohm
  for (size_t i = 1; i < n; ++i)
    up[i] = 1e3 / (i == 1 ? halfPiece : 2 * halfPiece);
  std::vector<double> v(n, -65), m(n), h(n), k(n), diag(n), rhs(n);
  for (size_t i = 0; i < n; ++i) {
    m[i] = alphaM(-65) / (alphaM(-65) + betaM(-65));
    h[i] = alphaH(-65) / (alphaH(-65) + betaH(-65));
    k[i] = alphaN(-65) / (alphaN(-65) + betaN(-65));
  }
  long steps = std::lround(durationMs / dt);
  size_t stimulated = 1, probeA = 1 + static_cast<size_t>(2.0 / piece), probeB = 1 + static_cast<size_t>(4.0 / piece);
  double stimulus = 20.0 / area[stimulated]; // 20 uA as uA/cm2
  double arrivalA = NAN, arrivalB = NAN;
  auto start = std::chrono::steady_clock::now();
  for (long s = 0; s < steps; ++s) {
    double t = s * dt, half = dt / 2;
    for (size_t i = 0; i < n; ++i) { // gates at the step's start rates
      double x = v[i];
      double am = q10 * alphaM(x), bm = q10 * betaM(x), ah = q10 * alphaH(x), bh = q10 * betaH(x);
      double an = q10 * alphaN(x), bn = q10 * betaN(x);
      m[i] = am / (am + bm) + (m[i] - am / (am + bm)) * std::exp(-dt * (am + bm));
      h[i] = ah / (ah + bh) + (h[i] - ah / (ah + bh)) * std::exp(-dt * (ah + bh));
      k[i] = an / (an + bn) + (k[i] - an / (an + bn)) * std::exp(-dt * (an + bn));
      double m3h = m[i] * m[i] * m[i] * h[i], n4 = k[i] * k[i] * k[i] * k[i];
      double g = gNa * m3h + gK * n4 + gL, ge = gNa * m3h * eNa + gK * n4 * eK + gL * eL;
      diag[i] = cm / half + g;
      rhs[i] = cm / half * x + ge;
    }
    double mid = t + half;
    if (mid >= 0.5 && mid < 0.7)
      rhs[stimulated] += stimulus;
    for (size_t i = 1; i < n; ++i) {
      diag[i] += up[i] / area[i];
      diag[i - 1] += up[i] / area[i - 1];
    }
    for (size_t i = n - 1; i > 0; --i) { // eliminate from the far end
      double lower = -up[i] / area[i - 1], upper = -up[i] / area[i];
      double f = lower / diag[i];
      diag[i - 1] -= f * upper;
      rhs[i - 1] -= f * rhs[i];
    }
    rhs[0] /= diag[0];
    for (size_t i = 1; i < n; ++i)
      rhs[i] = (rhs[i] + up[i] / area[i] * rhs[i - 1]) / diag[i];
    for (size_t i = 0; i < n; ++i) {
      double next = 2 * rhs[i] - v[i];
      if (i == probeA && std::isnan(arrivalA) && v[i] < 0 && next >= 0)
        arrivalA = t + dt * (0 - v[i]) / (next - v[i]);
      if (i == probeB && std::isnan(arrivalB) && v[i] < 0 && next >= 0)
        arrivalB = t + dt * (0 - v[i]) / (next - v[i]);
      v[i] = next;
    }
  }
  auto end = std::chrono::steady_clock::now();
  double ms = std::chrono::duration<double, std::milli>(end - start).count();
  std::printf("hand-written tree: %d pieces, %ld steps in %.2f ms (%.2f ns per piece and step), velocity %.4f m/s\n",
              pieces, steps, ms, ms * 1e6 / steps / n, 20.0 / (arrivalB - arrivalA));
  return 0;
}
