// Simulate.h - Stage 10: the steppers. Advance an ir::Model through its protocol with
// exponential Euler (Rush-Larsen gates first, then an exact exponential V update with the new
// gates), classical RK4 (both in FixedStep.h), or adaptive Dormand-Prince 5(4) or Rosenbrock,
// recording at the protocol's interval. Stimulus edges are break points of every method.
#pragma once
#include "IR.h"

#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

namespace saltpan {
class Interpreter;
class PieceRunner;

using KernelFn = void (*)(const double *y, const double *p, double t, double *out);

/// Which outputs a caller needs. The model's own kernel always computes all of them.
enum class KernelPart : uint8_t {
  All,      // every output: recording steps
  Dynamics, // what dy/dt needs: gates' rates, pools, membrane currents, clamps, stimulus
  Rates,    // an implicit step's start: gates' rates, pools, clamps, stimulus
  Currents, // an implicit step's middle: the linearised membrane currents alone
  Step,     // a whole smooth implicit step's membrane part (Fuse.h fuseStaggeredPiece): into
            // [next states | outputs], the moved gates and pools, G, GE, Iother and injection
};
inline constexpr int kernelPartCount = 5;

/// A compiled kernel, the interpreter, or a tree's kernels by kind of piece (PieceSplit.h); the
/// branch between them is predictable. Only a split kernel computes less than every output.
struct KernelRef {
  KernelFn native = nullptr;
  Interpreter *interpreter = nullptr;
  PieceRunner *pieces = nullptr;
  void operator()(const double *y, const double *p, double t, double *out, KernelPart part = KernelPart::All) const;
};

/// Recorded samples: one row per recording time, one column per recorded quantity, in the
/// quantities' display units (mV, uA/cm2, ...). Time is in seconds.
struct Trace {
  std::vector<std::string> names, units;
  std::vector<double> time;
  std::vector<double> values; // row-major: time.size() rows of names.size() values
  size_t columns() const { return names.size(); }
  double at(size_t row, size_t column) const { return values[row * names.size() + column]; }
};

struct SimulationFailure {
  bool failed = false;
  double time = 0;      // seconds
  std::string variable; // state name
  std::string reason;
};

struct SimulationStats {
  long steps = 0;
  long rejected = 0; // adaptive methods only
  long kernelCalls = 0;
  /// For compartments whose every current is carried by a dynamic ion: the largest
  /// |change of membrane charge - change of ion charge - injected charge| over the run,
  /// relative to the charge moved (NaN when no compartment qualifies).
  double chargeBalanceError = NAN;
};

/// A fused exponential Euler step (Fuse.h): out[0..states) is the next state, then the
/// model kernel's outputs at the current state.
struct FusedStep {
  KernelRef kernel;    // next state and every output (recording steps)
  KernelRef stateOnly; // next state only (the other steps); may be unset
  bool available = false;
  bool hasStateOnly = false;
};

/// The exponential Euler update of a potential with frozen conductances: the exact relaxation
/// of C V' = GE - G V - Iother when G > 0, otherwise an explicit step of the whole current.
double exponentialEulerVoltage(double v, double g, double ge, double other, double cap, double dt);

/// Runs the model's protocol with parameters `params` (same layout as model.params). With
/// exponential Euler and a fused step available, each step is one call of `fused`, except the
/// steps that meet a stimulus edge, which `kernel` takes split at the edge.
Trace simulate(const ir::Model &model, const std::vector<double> &params, KernelRef kernel, SimulationFailure &failure,
               SimulationStats *stats = nullptr, FusedStep fused = {});

} // namespace saltpan
