// Rest.h - steady states of each compartment, or of each tree of joined compartments
// (`saltpan rest`): the potentials where, with every gate at its steady value, the membrane
// currents balance, and whether each is stable. Analysis only; RestCommand.cpp prints the result.
//
// Compartments joined to nothing are analysed on their own (Rest.cpp): V and the gates form
// the ODE system dV/dt = -I/C, dx/dt = (inf - x)/tau. Roots of I(V) are bracketed on a
// fine grid and refined by Brent's method; stability comes from the eigenvalues of the
// system's Jacobian (central differences) at each root. Trees (RestTree.cpp) are described
// below. Dynamic concentrations (ir::Pool) and other compartments' states are held at their
// initial values.
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
/// Why findSteadyStates refuses a model with junctions (cables): it analyses each compartment
/// alone; findTreeSteadyStates solves joined ones together (`saltpan rest` and `show` call it).
inline constexpr const char *notForJoinedCompartments =
    "no steady state of one compartment alone: joined compartments (cables) rest together, each tree as one system";

std::vector<CompartmentRest> findSteadyStates(const ir::Model &model, const AnalyzedModel *analysis,
                                              const Options &options = {});

// --- joined compartments (cables): each tree solved as one system (RestTree.cpp) ---
//
// A tree's steady states are where, with every gate at its steady value at its own piece's V,
// each piece's membrane current balances the axial currents to its neighbours. The search: the
// tree's total membrane current at one uniform V is scanned as for one compartment (the steady
// states of the tree made isopotential), and each root is continued to the tree itself by
// Newton's method while the membrane currents are scaled up from 1e-3 of their value to all of
// it (an axial resistance 1000 times smaller than the real one, then the real one). Each Newton
// step is one O(N) tree solve (Tree::solve). A steady state not connected so to one of the
// isopotential tree's is not found.

/// The states a dense eigenvalue analysis takes at most: above it, stability is not assessed.
inline constexpr size_t maxStatesForEigenvalues = 1000;

/// One compartment or cable piece at a tree's steady state.
struct PieceRest {
  std::string name;                      // "soma", "dend[3]"
  double v = 0;                          // V
  std::vector<Named> gates;              // steady values
  std::vector<Named> currents;           // per membrane entry, uA/cm2, outward positive
  double membraneCurrent = 0;            // uA/cm2: its whole membrane's, balanced by the axial current
  double slopeConductance = 0;           // S/m2: dI/dV of its own membrane's steady-state I-V curve
  std::optional<double> inputResistance; // ohm: the tree's, for a small steady current injected here
};

struct TreeSteadyState {
  std::vector<PieceRest> pieces;                 // the tree's compartments, in model order
  double isopotentialV = 0;                      // V: the isopotential tree's steady state it continues
  double maxResidual = 0;                        // A/m2: the largest current density a piece leaves unbalanced
  bool stabilityAssessed = false;                // false above maxStatesForEigenvalues
  bool stable = false;                           // every eigenvalue has a negative real part
  double maxRealEigenvalue = 0;                  // 1/s
  std::vector<std::complex<double>> eigenvalues; // 1/s, sorted by decreasing real part
};

/// A cable of a tree: its pieces are compartments first .. first + pieces - 1 of the model.
struct CableSpan {
  std::string name;
  std::string growsFrom; // empty for a free cable
  size_t first = 0, pieces = 0;
  double length = 0; // m
};

/// An isopotential steady state whose continuation did not reach the tree (a fold on the way).
struct LostState {
  double isopotentialV = 0; // V
  std::string why;
};

struct TreeRest {
  std::vector<size_t> compartments;          // model indices, increasing
  std::vector<CableSpan> cables;             // empty without an analysis
  size_t states = 0;                         // V and gates of every piece (pools are held)
  std::vector<TreeSteadyState> steadyStates; // by increasing V of its first compartment
  std::vector<LostState> lost;
};

/// Every steady state of each tree of joined compartments in `model` (and of each compartment
/// joined to nothing, as a tree of one), found as the comment above says, in [options.from,
/// options.to]. `analysis` (may be null) names the cables. Throws std::invalid_argument when the
/// junctions do not form trees, std::runtime_error when the eigenvalue iteration does not converge.
std::vector<TreeRest> findTreeSteadyStates(const ir::Model &model, const AnalyzedModel *analysis,
                                           const Options &options = {});

/// Each compartment's steady states for the `rest(...)` and `input_resistance(...)` measures:
/// findSteadyStates for lone compartments, each piece's share of its tree's steady states
/// (findTreeSteadyStates) when compartments are joined.
std::vector<CompartmentRest> steadyStatesOfEach(const ir::Model &model, const AnalyzedModel *analysis,
                                                const Options &options = {});

/// The eigenvalues of the n x n real matrix `a` (row-major): balancing, reduction to upper
/// Hessenberg form, then the shifted (Francis double-shift) QR iteration. Throws
/// std::runtime_error when the iteration does not converge.
std::vector<std::complex<double>> eigenvalues(std::vector<double> a, int n);

} // namespace rest
} // namespace saltpan
