// Run.cpp - fuse, compile (or interpret), simulate.
#include "Run.h"

#include "Fuse.h"
#include "Interpret.h"

#include <chrono>
#include <optional>

namespace brine {

RunOutcome runModel(const ir::Model &model, const std::vector<double> &params, const KernelCompiler &compile) {
  RunOutcome out;
  using Clock = std::chrono::steady_clock;
  auto started = Clock::now();
  std::optional<ir::Kernel> fused;
  if (model.protocol.method == ir::Method::ExponentialEuler)
    fused = fuseExponentialEuler(model, model.protocol.step);
  Interpreter plain(model.kernel);
  std::optional<Interpreter> fusedInterpreter;
  KernelRef kernel{nullptr, &plain};
  FusedStep step;
  if (fused) {
    fusedInterpreter.emplace(*fused);
    step = {KernelRef{nullptr, &*fusedInterpreter}, true};
  }
  if (compile) {
    KernelFn native = compile(fused ? *fused : model.kernel, out.compileError);
    if (native) {
      (fused ? step.kernel : kernel).native = native;
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

} // namespace brine
