// Analyze.h - Stage 5: computes every static value of the model in coherent SI.
//
// Temperature, solutions, geometry, capacitance, densities, reversal potentials (Nernst,
// GHK or as written) and each compartment's GHK resting potential. CheckCharge,
// CheckPhysics and `saltpan show` read the result; none of them recompute it.
#pragma once
#include "AST.h"
#include "Resolve.h"

#include <map>
#include <optional>
#include <string>
#include <vector>

namespace saltpan {
class DiagnosticEngine;
class Evaluator;

struct SolutionValues {
  std::map<const ast::IonDecl *, double> concentration; // mol/m^3 (= mM)
  std::map<const ast::IonDecl *, const ast::ConcentrationEntry *> entry;
  std::vector<std::pair<double, double>> impermeant; // (valence, mol/m^3)
  std::optional<double> get(const ast::IonDecl *ion) const {
    auto it = concentration.find(ion);
    return it == concentration.end() ? std::nullopt : std::optional<double>(it->second);
  }
};

enum class DensityKind { Unknown, Conductance, Permeability, Current, Turnover };
enum class ReversalKind { None, Nernst, Ghk, Written };

struct Placement {
  const ast::MembraneEntry *entry = nullptr;
  const ast::ChannelDecl *channel = nullptr; // one of channel / pump is set
  const ast::PumpDecl *pump = nullptr;
  std::optional<double> density; // SI for its kind
  DensityKind densityKind = DensityKind::Unknown;
  ReversalKind reversalKind = ReversalKind::None;
  std::optional<double> reversal;              // volts, what the model uses
  std::optional<double> concentrationReversal; // volts, from the concentrations (Nernst/GHK)
  const ast::Expr *writtenReversal = nullptr;  // where a hand-written reversal came from
};

struct CompartmentValues {
  const ast::CompartmentDecl *decl = nullptr;
  std::string name;        // the compartment's, or a cable piece's: "dendrite[3]"
  int piece = -1;          // the index along its cable; -1 for a compartment
  double from = 0, to = 0; // a piece's ends, m from its cable's start
  const ast::SolutionDecl *bath = nullptr;
  const SolutionValues *outside = nullptr;
  SolutionValues inside;
  std::optional<double> area;        // m^2
  std::optional<double> capacitance; // F/m^2
  std::optional<double> initialV;    // V
  std::vector<const ast::IonDecl *> ions; // every ion with a concentration on either side, by name
  std::vector<Placement> placements;
  std::optional<double> ghkRest;     // V, from ungated permeability channels
  std::optional<double> volume;      // m^3, from a sphere or cylinder geometry
  struct Pool {
    const ast::IonDecl *ion = nullptr;
    const ast::ConcentrationEntry *entry = nullptr;
    double areaPerVolume = 0; // 1/m: membrane area over pool volume
  };
  std::vector<Pool> pools;           // dynamic inside concentrations
  size_t ghkChannels = 0;            // how many channels entered the GHK rest
  std::optional<double> concentration(const ast::IonDecl *ion, ast::Side side) const;
  std::optional<double> nernst(const ast::IonDecl *ion, double kelvin) const;
};

struct PumpValues {
  bool chargeKnown = false;
  int netOutwardCharge = 0; // elementary charges moved outward per cycle
};

/// Pieces of all cables together. `saltpan check` holds about 5 kB per piece (measured: 93 MB at
/// 20,000) and a run compiles code for each, so a million would need gigabytes and minutes.
inline constexpr size_t maxPiecesInAll = 100000;

/// The note to a place outside its cable.
inline constexpr const char *placeRangeNote =
    "a place along a cable is a distance from 0 to its length, or a percentage from 0 % to 100 %";

/// A cable's shape as computed, and where its pieces are in AnalyzedModel::compartments.
struct CableValues {
  const ast::CompartmentDecl *decl = nullptr;
  double length = 0, diameter = 0, diameterEnd = 0; // m
  double axialResistivity = 0;                      // ohm m
  size_t first = 0, pieces = 0;
  std::optional<double> lengthConstant; // m at rest; filled by CheckCables (it needs the kernel)
  // Cut by `pieces N per length constant at F`: F (Hz) and the length constant at F of the
  // thinnest end (m) that set the count.
  std::optional<double> cutFrequency, cutLengthConstant;
  double pieceLength() const { return length / static_cast<double>(pieces); }
  double diameterAt(double x) const { return diameter + (diameterEnd - diameter) * x / length; }
};

/// Two joined compartments (indices into AnalyzedModel::compartments) and their axial
/// conductance, centre to centre.
struct JunctionValues {
  size_t parent = 0, child = 0;
  double conductance = 0; // S
};

struct AnalyzedModel {
  const ast::ModelDecl *header = nullptr;
  const ast::TemperatureDecl *temperatureDecl = nullptr;
  std::optional<double> temperature; // K
  std::map<const ast::SolutionDecl *, SolutionValues> baths;
  std::vector<CompartmentValues> compartments; // the compartments, then each cable's pieces
  std::vector<CableValues> cables;
  std::vector<JunctionValues> junctions;
  std::map<const ast::PumpDecl *, PumpValues> pumps;
  std::vector<const ast::IonDecl *> ions;
  std::vector<const ast::ChannelDecl *> channels;
};

/// A cable's membrane at its initial state: what cutting it by its length constant at a
/// frequency needs (`pieces N per length constant at F`).
struct CableMembraneAtRest {
  double conductance = 0; // S/m2
  double capacitance = 0; // F/m2
};
using CableMembranes = std::map<const ast::CompartmentDecl *, CableMembraneAtRest>;

/// Fills `model`. Returns false if it reported an error. A cable cut by its length constant
/// takes its membrane from `membranes`; without them (a first, provisional analysis) it is cut
/// into one piece.
bool analyze(const ast::Program &program, const SymbolTable &symbols, Evaluator &evaluator, DiagnosticEngine &diags,
             AnalyzedModel &model, const CableMembranes *membranes = nullptr);

/// Whether a cable of the program is cut by its length constant at a frequency.
bool cutsByLengthConstant(const SymbolTable &symbols);

/// How a reversal potential was found, as `show` and `--emit values` print it ("nernst", ...).
const char *reversalSpelling(ReversalKind kind);
/// Every computed value in SI, one per line (saltpan check --emit values).
std::string dumpValues(const AnalyzedModel &model);

/// Valence of an ion as an integer, or nullopt if it is not a non-zero whole number.
std::optional<int> integerValence(const ast::IonDecl &ion);
} // namespace saltpan
