// Run.h - one simulation of a lowered model, ready for any caller: the kernels KernelPlan
// chooses, compiled natively when given a compiler (else interpreted), and stepped.
// Used by `saltpan run`, `saltpan test` (expectations), `saltpan snapshot` and built models.
#pragma once
#include "IR.h"
#include "KernelPlan.h"
#include "Simulate.h"

#include <string>

namespace saltpan {

struct RunOutcome {
  Trace trace;
  SimulationFailure failure;
  SimulationStats stats;
  bool native = false;                  // the kernels ran as native code
  std::string compileError;             // why they did not, when a compiler was given
  double compileMs = 0, simulateMs = 0; // wall time of the two phases
};

/// Simulates `model` with `params`; `compile` may be empty (the interpreter is used).
RunOutcome runModel(const ir::Model &model, const std::vector<double> &params, const KernelCompiler &compile);

/// Simulates `model` with `params` through kernels already planned and made for it (sweep
/// points reuse them).
Trace simulatePlanned(const ir::Model &model, const std::vector<double> &params, const PlannedKernels &kernels,
                      SimulationFailure &failure, SimulationStats *stats = nullptr);

} // namespace saltpan
