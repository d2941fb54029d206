// Run.cpp - fuse, compile (or interpret), simulate.
#include "Run.h"

#include "FixedStep.h"
#include "Fuse.h"
#include "Interpret.h"

#include <chrono>
#include <optional>

namespace saltpan {

RunOutcome runModel(const ir::Model &model, const std::vector<double> &params, const KernelCompiler &compile) {
  RunOutcome out;
  using Clock = std::chrono::steady_clock;
  auto started = Clock::now();
  std::optional<ir::Kernel> fused, stateOnly;
  if (model.protocol.method == ir::Method::ExponentialEuler) {
    fused = fuseExponentialEuler(model, model.protocol.step);
    // Steps that record nothing need only the next state; with dynamic concentrations every
    // step's injected current enters the charge balance, so they keep the full kernel.
    if (fused && model.pools.empty() && model.protocol.every > model.protocol.step * 1.5)
      stateOnly = fuseExponentialEuler(model, model.protocol.step, false);
  }
  Interpreter plain(model.kernel);
  std::optional<Interpreter> fusedInterpreter, stateOnlyInterpreter;
  KernelRef kernel{nullptr, &plain};
  FusedStep step;
  if (fused) {
    fusedInterpreter.emplace(*fused);
    step.kernel = KernelRef{nullptr, &*fusedInterpreter};
    step.available = true;
  }
  if (stateOnly) {
    stateOnlyInterpreter.emplace(*stateOnly);
    step.stateOnly = KernelRef{nullptr, &*stateOnlyInterpreter};
    step.hasStateOnly = true;
  }
  if (compile) {
    KernelFn native = compile(fused ? *fused : model.kernel, out.compileError);
    KernelFn nativeStateOnly = native && stateOnly ? compile(*stateOnly, out.compileError) : nullptr;
    // Steps that meet a stimulus edge are split by the general stepper, with the model's kernel.
    bool plainToo = fused && StepGrid(model).meetsEvents();
    KernelFn nativePlain = native && plainToo ? compile(model.kernel, out.compileError) : nullptr;
    if (native && (!stateOnly || nativeStateOnly) && (!plainToo || nativePlain)) {
      (fused ? step.kernel : kernel).native = native;
      if (stateOnly)
        step.stateOnly.native = nativeStateOnly;
      if (plainToo)
        kernel.native = nativePlain;
      out.native = true;
    }
  }
  auto compiled = Clock::now();
  out.trace = simulate(model, params, kernel, out.failure, &out.stats, step);
  auto finished = Clock::now();
  out.compileMs = std::chrono::duration<double, std::milli>(compiled - started).count();
  out.simulateMs = std::chrono::duration<double, std::milli>(finished - compiled).count();
  return out;
}

} // namespace saltpan
