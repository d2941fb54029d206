// LaneSimulate.h - several parameter sets of one model stepped in lockstep, one per SIMD lane.
//
// The exponential Euler or RK4 step is fused into the kernel (Fuse.h) and compiled in lane mode
// (CodeGen.h): slot i of lane l lives at i * lanes + l. Steps are fixed, so lanes never
// wait for one another, and every operation is elementwise, so a lane's result does not
// depend on its neighbours: a point gives the same numbers in any lane, batch or thread.
// The few steps with a stimulus edge inside or at their end are split at it by the scalar
// stepper (FixedStep.h), lane by lane, as a scalar run splits them.
#pragma once
#include "IR.h"
#include "Simulate.h"

#include <vector>

namespace saltpan {

struct LaneKernels {
  int lanes = 0;
  KernelFn full = nullptr;      // next state, then every output of the model's kernel
  KernelFn stateOnly = nullptr; // next state only
  KernelFn plain = nullptr;     // the model's kernel, one lane: steps split at an event
};

struct LaneRun {
  std::vector<Trace> traces;               // one per lane, the protocol's recorded quantities
  std::vector<SimulationFailure> failures; // one per lane
};

/// Runs `params.size()` (== kernels.lanes) parameter sets of `model` through its protocol,
/// whose step the kernels fuse (exponential Euler or RK4, fixed steps). `kernels.plain` is needed
/// when a step meets an event. A lane that fails stops being recorded; the others go on.
LaneRun simulateLanes(const ir::Model &model, const std::vector<std::vector<double>> &params,
                      const LaneKernels &kernels);

} // namespace saltpan
