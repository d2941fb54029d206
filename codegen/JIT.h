// JIT.h - Stage 9a: compiles IR kernels to native code for this machine (LLVM ORC, hidden).
#pragma once
#include "IR.h"

#include <memory>
#include <string>

namespace saltpan {

using KernelFn = void (*)(const double *y, const double *p, double t, double *out);

class JIT {
public:
  /// Creates the JIT for the host CPU; returns nullptr with `error` set on failure.
  static std::unique_ptr<JIT> create(std::string &error);
  ~JIT();
  /// Compiles `kernel` (codegen, verifyModule, O3 for the host CPU) and returns its address,
  /// valid while this JIT lives; returns nullptr with `error` set on failure.
  KernelFn compile(const ir::Kernel &kernel, std::string &error);
  /// The same for `lanes` parameter sets in lockstep (CodeGen.h's lane layout).
  KernelFn compileLanes(const ir::Kernel &kernel, int lanes, std::string &error);
  /// compile() for one lane, compileLanes() for more (KernelPlan.h's KernelCompiler).
  KernelFn compile(const ir::Kernel &kernel, int lanes, std::string &error) {
    return lanes == 1 ? compile(kernel, error) : compileLanes(kernel, lanes, error);
  }
  /// The widest lane count this CPU's vector registers hold: 8 with AVX-512, 4 with AVX2,
  /// otherwise 2 (SSE2, every x86-64).
  int nativeLanes() const;
  /// The optimised LLVM IR of the last compiled kernel (for `--emit llvm`); the Nth compile
  /// (from 0) defines `saltpan_kernel_N`.
  const std::string &lastIR() const;
  /// The same module as codegen wrote it, before the optimiser (`--emit llvm-unoptimised`):
  /// what saltpan controls, the same on every CPU but for the target attributes.
  const std::string &lastUnoptimisedIR() const;

private:
  struct Impl;
  explicit JIT(std::unique_ptr<Impl> impl);
  std::unique_ptr<Impl> impl_;
};

} // namespace saltpan
