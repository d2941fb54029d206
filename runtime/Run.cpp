// Run.cpp - plan, compile (or interpret), simulate.
#include "Run.h"

#include <chrono>

namespace saltpan {

RunOutcome runModel(const ir::Model &model, const std::vector<double> &params, const KernelCompiler &compile) {
  RunOutcome out;
  using Clock = std::chrono::steady_clock;
  auto started = Clock::now();
  PlannedKernels kernels(planKernels(model, KernelUse::Run), compile);
  out.native = kernels.native();
  out.compileError = kernels.compileError();
  auto compiled = Clock::now();
  out.trace = simulatePlanned(model, params, kernels, out.failure, &out.stats);
  auto finished = Clock::now();
  out.compileMs = std::chrono::duration<double, std::milli>(compiled - started).count();
  out.simulateMs = std::chrono::duration<double, std::milli>(finished - compiled).count();
  return out;
}

Trace simulatePlanned(const ir::Model &model, const std::vector<double> &params, const PlannedKernels &kernels,
                      SimulationFailure &failure, SimulationStats *stats) {
  return simulate(model, params, kernels.plain(), failure, stats, kernels.fusedStep());
}

} // namespace saltpan
