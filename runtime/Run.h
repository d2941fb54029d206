// Run.h - one simulation of a lowered model, ready for any caller: fuses the exponential
// Euler step when it can, compiles the kernel natively when given a compiler, and steps.
// Used by `saltpan run`, `saltpan test` (expectations) and `saltpan snapshot`.
#pragma once
#include "IR.h"
#include "Simulate.h"

#include <functional>
#include <string>

namespace saltpan {

/// Compiles a kernel to native code, or returns nullptr (with `error`) to use the interpreter.
using KernelCompiler = std::function<KernelFn(const ir::Kernel &, std::string &error)>;

struct RunOutcome {
  Trace trace;
  SimulationFailure failure;
  SimulationStats stats;
  bool native = false;                  // the kernel ran as native code
  std::string compileError;             // why it did not, when a compiler was given
  double compileMs = 0, simulateMs = 0; // wall time of the two phases
};

/// Simulates `model` with `params`; `compile` may be empty (the interpreter is used).
RunOutcome runModel(const ir::Model &model, const std::vector<double> &params, const KernelCompiler &compile);

} // namespace saltpan
