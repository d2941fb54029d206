// Physics.cpp - Nernst and GHK equations in coherent SI units.
#include "Physics.h"

#include <cmath>

namespace saltpan::physics {

double thermalVoltage(double kelvin) { return gasConstant * kelvin / faraday; }

double nernst(int z, double outside, double inside, double kelvin) {
  return thermalVoltage(kelvin) / z * std::log(outside / inside);
}

double ghkCurrent(const PermeantIon &ion, double v, double kelvin) {
  double u = ion.z * v / thermalVoltage(kelvin); // zFV/RT
  // I = P z F u (ci - co e^-u) / (1 - e^-u); near u = 0 the limit is P z F (ci - co).
  double factor = std::fabs(u) < 1e-9 ? 1.0 + u / 2 : u / -std::expm1(-u);
  return ion.permeability * ion.z * faraday * factor * (ion.inside - ion.outside * std::exp(-u));
}

std::optional<double> ghkZeroCurrentPotential(const std::vector<PermeantIon> &ions, double kelvin) {
  auto total = [&](double v) {
    double sum = 0;
    for (const PermeantIon &ion : ions)
      sum += ghkCurrent(ion, v, kelvin);
    return sum;
  };
  // The total GHK current rises monotonically with v, so bisection on a wide bracket
  // finds the single zero to full double precision.
  double lo = -1.0, hi = 1.0;
  double flo = total(lo), fhi = total(hi);
  if (!(flo < 0 && fhi > 0))
    return std::nullopt;
  for (int i = 0; i < 200 && hi - lo > 1e-16; ++i) {
    double mid = 0.5 * (lo + hi);
    double f = total(mid);
    if (f == 0)
      return mid;
    (f < 0 ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

// A sinusoid of angular frequency w decays along the cable as exp(-x Re(gamma)) with
// gamma = sqrt(1 + i w tau) / lambda0, and Re(sqrt(1 + i a)) = sqrt((1 + sqrt(1 + a^2)) / 2).
double lengthConstantAt(double frequency, double diameter, double axialResistivity, double conductance,
                        double capacitance) {
  double lambda0 = std::sqrt(diameter / (4 * axialResistivity * conductance));
  double a = 2 * M_PI * frequency * capacitance / conductance;
  return lambda0 * std::sqrt(2 / (1 + std::sqrt(1 + a * a)));
}

} // namespace saltpan::physics
