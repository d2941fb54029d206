// FixedStep.h - Stage 10: the fixed-step methods (exponential Euler, RK4) and the step grid
// they share. Every place that takes a fixed step (Simulate, the edge steps of SIMD lanes, the
// C library) calls this one engine, so they agree bit for bit.
//
// Stimuli live in the kernel as windows of time ([a, b): a value at an edge belongs to what
// follows it), so the kernel jumps at each edge. The grid makes every edge an exact break
// point: a step that would cross one is split at it, and no stage is evaluated on the wrong
// side of an edge (a stage at a piece's end that lands on an edge is taken one ulp before it).
#pragma once
#include "IR.h"
#include "Simulate.h"
#include "Tree.h"

#include <memory>

#include <span>
#include <vector>

namespace saltpan {

/// The times at which the kernel jumps: every constant that time is compared with (edges of
/// injections and clamp windows, synaptic onsets), sorted, without repeats.
std::vector<double> eventTimes(const ir::Kernel &kernel);

/// A protocol's fixed steps with its events as exact break points. Times are step counts
/// times the step, never accumulated; a grid time within rounding of an event is the event.
class StepGrid {
public:
  explicit StepGrid(const ir::Model &model);
  double step() const { return dt_; }
  long steps() const { return steps_; } // whole steps in the protocol's duration
  long every() const { return every_; } // steps between recordings
  /// The start of step i.
  double time(long i) const;
  /// Whether step i is one whole step of dt with no event after its start up to its end (a
  /// fused kernel, which knows only its start, may take it).
  bool smooth(long i) const;
  /// The events strictly inside step i.
  std::span<const double> cuts(long i) const;
  bool isEvent(double t) const;
  /// Whether any step of the protocol meets an event (after the start, up to the end).
  bool meetsEvents() const;
  /// The events after `t`, up to and including `until`; the first of them or `until`.
  double nextBreak(double t, double until) const;

private:
  double dt_ = 0;
  long steps_ = 0, every_ = 1;
  std::vector<double> events_;
};

/// Whether every state is finite and every potential within +-2 V; on a problem fills
/// `failure` (time t, the state's name, the cause) and returns false. The values of y are
/// `stride` apart (1 for one run, the lane count for lockstep runs).
bool healthyState(const ir::Model &model, const double *y, size_t stride, double t, SimulationFailure &failure);

/// Sets each clamped potential in y to its command, from the kernel outputs `out` at y; true
/// when one moved (the outputs must then be evaluated again).
bool holdClamps(const ir::Model &model, double *y, const double *out);

/// dy/dt of every state from the kernel outputs at y (a clamped potential does not move).
void stateDerivative(const ir::Model &model, const double *params, const double *y, const double *out, double *dydt);

/// One step of exponential Euler or RK4 over a piece of time with no event inside it.
class FixedStepper {
public:
  FixedStepper(const ir::Model &model, const double *params, KernelRef kernel, SimulationStats *stats = nullptr);
  /// Sets clamped potentials in y to their command at t, then `out` to the outputs at (y, t):
  /// all of them, or (`all` false) those a step of the method reads at its start.
  void settle(double *y, double *out, double t, bool all = true);
  /// Advances y over step i of `grid` with the protocol's method, split at the events inside
  /// it. On entry `out` holds settle()'s outputs at (y, grid.time(i)); on return it is spent.
  /// `injected` (one per compartment, or null) gains the injected charge of the step.
  void step(const StepGrid &grid, long i, double *y, double *out, double *injected);
  /// Whether step i is one fused pass over a tree's pieces, which reads nothing from settle():
  /// then only a recording step needs it.
  bool stepsWhole(const StepGrid &grid, long i) const { return wholeSteps_ && grid.smooth(i); }

private:
  void evaluate(const double *y, double t, double *out, KernelPart part = KernelPart::All);
  // One step of length h from t; `end` is the time for stages at the piece's end.
  void rk4Step(double *y, const double *out, double t, double h, double end);
  void exponentialEulerStep(double *y, const double *out, double t, double h);
  void implicitStep(double *y, const double *out, double t, double h);
  // A smooth implicit step with the pieces' Step kernels: gates, pools and currents in one pass.
  void wholeImplicitStep(double *y, double t, double h, double *injected);
  // V from the linear system of the membranes (G, GE, Iother in `currents`) and the junctions;
  // `out` holds the clamps at the step's start (read only when a clamp exists).
  void solveVoltages(double *y, const double *out, const double *currents, double h);
  // Exponential Euler's gates and forward Euler's pools; then the outputs at the step's middle
  // with the new gates into scratch_ (false when every potential is clamped: nothing to do).
  bool gatesAndPools(double *y, const double *out, double t, double h);
  void piece(double *y, const double *out, double t, double h, double end, double *injected);

  const ir::Model &m_;
  const double *p_;
  KernelRef kernel_;
  SimulationStats *stats_;
  std::vector<double> k1_, k2_, k3_, k4_, tmp_, scratch_;
  std::shared_ptr<const Tree> tree_; // implicit methods: the junctions' elimination order
  std::vector<double> diag_, rhs_, up_, low_;
  std::vector<double> axialDiag_, axialUp_, axialLow_; // the junctions' terms of the system
  bool clamps_ = false;                                 // a clamp may clear rows
  bool wholeSteps_ = false;                             // the kernel has KernelPart::Step
  std::vector<double> next_;                            // its [next states | outputs]
  std::vector<int> moved_;                              // the states it moves: gates, pools
  KernelPart startPart_; // what a step reads at its start
};

/// The fixed-step run of one parameter set, step by step: a step the grid calls smooth is one
/// call of the fused kernel when there is one, any other step the FixedStepper's, split at its
/// events. Simulate and the C library step through this, so they agree bit for bit.
class FixedRun {
public:
  FixedRun(const ir::Model &model, const double *params, KernelRef plain, FusedStep fused,
           SimulationStats *stats = nullptr);
  const StepGrid &grid() const { return grid_; }
  /// Starts step i from the state y: holds the clamps, and with `outputs` fills outputs() with
  /// the kernel outputs at (y, time(i)). Any i >= 0 may be stepped, also past the protocol's end.
  void begin(long i, double *y, bool outputs);
  /// The same at the protocol's end (time(grid().steps())), where only the outputs are wanted.
  void end(double *y);
  const double *outputs() const { return out_.data(); }
  /// Finishes the step begun last: y becomes the state at time(i + 1). `injected` (one per
  /// compartment, or null) gains the injected charge of the step where the outputs are known.
  void finish(double *y, double *injected);

private:
  void callFused(const double *y, bool outputs);

  const ir::Model &m_;
  const double *p_;
  FusedStep fused_;
  SimulationStats *stats_;
  StepGrid grid_;
  FixedStepper stepper_;
  std::vector<double> out_, next_; // next_: the fused kernel's next state, then its outputs
  long step_ = 0;
  bool fusedStep_ = false, fusedOutputs_ = false; // begin() called the fused kernel (with outputs)
};

} // namespace saltpan
