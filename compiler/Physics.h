// Physics.h - physical constants (exact, 2019 SI / CODATA 2018) and the textbook
// membrane equations: Nernst, GHK voltage and current equations.
#pragma once
#include <optional>
#include <vector>

namespace saltpan::physics {

inline constexpr double elementaryCharge = 1.602176634e-19; // C, exact
inline constexpr double avogadro = 6.02214076e23;           // 1/mol, exact
inline constexpr double boltzmann = 1.380649e-23;           // J/K, exact
inline constexpr double gasConstant = boltzmann * avogadro; // J/(mol K)
inline constexpr double faraday = elementaryCharge * avogadro; // C/mol
inline constexpr double zeroCelsius = 273.15;               // K

/// RT/F in volts.
double thermalVoltage(double kelvin);

/// Nernst potential (volts) of an ion of valence z: (RT/zF) ln(out/in).
double nernst(int z, double outside, double inside, double kelvin);

struct PermeantIon {
  int z = 1;
  double permeability = 0; // m/s, or a relative weight: only ratios matter for a zero
  double inside = 0;       // mol/m^3
  double outside = 0;
};

/// GHK current density (A/m^2, outward positive) of one ion at potential v.
double ghkCurrent(const PermeantIon &ion, double v, double kelvin);

/// The potential where the summed GHK currents vanish (the GHK voltage equation, solved
/// for any valences). nullopt when no such potential exists (e.g. one ion, one side only).
std::optional<double> ghkZeroCurrentPotential(const std::vector<PermeantIon> &ions, double kelvin);

/// The length constant (m) of a cable at frequency f (Hz): the distance over which a sinusoidal
/// potential falls by e, lambda0 * sqrt(2 / (1 + sqrt(1 + (2 pi f tau)^2))), with
/// lambda0 = sqrt(d / (4 Ri G)) and tau = C / G (G in S/m2, C in F/m2, Ri in ohm m, d in m).
/// At f = 0 it is lambda0.
double lengthConstantAt(double frequency, double diameter, double axialResistivity, double conductance,
                        double capacitance);

} // namespace saltpan::physics
