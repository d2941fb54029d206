// Rest.h - steady states of each compartment (`saltpan rest`): the potentials where, with
// every gate at its steady value, the total membrane current is zero, and whether each is
// stable. Analysis only; RestCommand.cpp prints the result.
//
// Compartments are not coupled, so each is analysed on its own: its V and its gates form
// the ODE system dV/dt = -I/C, dx/dt = (inf - x)/tau. Roots of I(V) are bracketed on a
// fine grid and refined by Brent's method; stability comes from the eigenvalues of the
// system's Jacobian (central differences) at each root. Dynamic concentrations (ir::Pool)
// and other compartments' states are held at their initial values.
#pragma once
#include "IR.h"

#include <complex>
#include <optional>
#include <string>
#include <vector>

namespace saltpan {
struct AnalyzedModel;

namespace rest {

struct Options {
  double from = -0.150;      // V: the scanned range of V
  double to = 0.100;         // V
  double step = 1e-4;        // V: grid spacing of the scan (0.1 mV)
  double tolerance = 1e-12;  // V: each root is refined to this
};

struct Named {
  std::string name; // gate "SquidSodium1952.m", current "SquidSodium1952"
  double value = 0;
};

struct SteadyState {
  double v = 0;                                 // V
  bool stable = false;                          // every eigenvalue has a negative real part
  double maxRealEigenvalue = 0;                 // 1/s
  std::vector<std::complex<double>> eigenvalues; // 1/s, sorted by decreasing real part
  std::vector<Named> gates;                     // steady values (dimensionless)
  std::vector<Named> currents;                  // per membrane entry, uA/cm2, outward positive
  double totalCurrent = 0;                      // uA/cm2 (zero up to rounding)
  double slopeConductance = 0;                  // S/m2: dI/dV of the steady-state I-V curve
  // Input resistance for small steady currents: 1/slope (ohm m2), and over the area.
  std::optional<double> inputResistance;        // ohm, when the compartment has an area
};

struct CompartmentRest {
  std::string name;
  std::vector<SteadyState> steadyStates; // by increasing V
  // Every channel of the compartment is ungated and has a permeability density: its GHK
  // resting potential (from the analysis, as `saltpan show` prints it) is comparable.
  bool passivePermeability = false;
  std::optional<double> ghkRest; // V, set when passivePermeability and the analysis has one
};

/// Finds every steady state of every compartment of `model` (lowered without a protocol,
/// so with no injected current) in [options.from, options.to]. `analysis` (may be null)
/// supplies the GHK resting potentials. Throws std::runtime_error when the eigenvalue
/// iteration does not converge.
/// Why findSteadyStates refuses a model with junctions (cables): it analyses each compartment alone.
inline constexpr const char *notForJoinedCompartments =
    "the steady state of joined compartments (cables) is not solved yet: saltpan rest analyses each compartment alone";

std::vector<CompartmentRest> findSteadyStates(const ir::Model &model, const AnalyzedModel *analysis,
                                              const Options &options = {});

/// The eigenvalues of the n x n real matrix `a` (row-major): balancing, reduction to upper
/// Hessenberg form, then the shifted (Francis double-shift) QR iteration. Throws
/// std::runtime_error when the iteration does not converge.
std::vector<std::complex<double>> eigenvalues(std::vector<double> a, int n);

} // namespace rest
} // namespace saltpan
