// Fuse.h - Stage 9 (with KernelPlan): fuses a model's kernel with one exponential Euler step.
//
// The fused kernel computes, from (y, p, t), the next state after a step of `dt` in
// out[0..states) followed by every output of the model's kernel (for recording), so a
// step is one call into native code with nothing left for the C++ loop but a copy. It is
// the step FixedStep.cpp takes (in its arithmetic for RK4, bit for bit); it knows only the
// step's start, so steps that meet a stimulus edge are left to FixedStepper.
// Both the JIT and the interpreter run the same fused kernel, so they stay comparable.
#pragma once
#include "IR.h"

#include <optional>

namespace saltpan {

/// The fused step kernel, or nullopt when the model needs the general stepper (a voltage
/// clamp, whose command replaces V, is handled there).
/// With `withOutputs` false the kernel computes the next state only (out[0..states)), which
/// lets the optimiser drop everything that is only recorded; steps between recordings use it.
std::optional<ir::Kernel> fuseExponentialEuler(const ir::Model &model, double dt, bool withOutputs = true);

/// The same for one classical RK4 step (four evaluations of the model's kernel, at t,
/// t + dt/2 twice and t + dt), in the same output layout; sweeps step lanes with it.
std::optional<ir::Kernel> fuseRungeKutta4(const ir::Model &model, double dt, bool withOutputs = true);

/// Where one compartment's part of a whole implicit step sits in its local kernel (PieceSplit):
/// the kernel's outputs are, in this order, each gate's steady value and time constant, each
/// pool's derivative, then G, GE and Iother, then (if `injected`) the injected current.
struct StaggeredRoles {
  std::vector<int> gateStates, poolStates; // the local state of each gate and pool
  bool injected = false;
};

/// The membrane's part of one implicit step of `dt` (FixedStep.cpp's, in its arithmetic): from
/// `local`'s outputs at (y, t) the gates moved by exponential Euler and the pools by forward
/// Euler, then G, GE and Iother with the new gates at t + dt/2. Outputs: each gate's and
/// pool's new value, G, GE, Iother, then the injected current at t (if `roles.injected`).
ir::Kernel fuseStaggeredPiece(const ir::Kernel &local, int stateCount, const StaggeredRoles &roles, double dt);

} // namespace saltpan
