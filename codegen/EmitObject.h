// EmitObject.h - `saltpan build`'s code generation: kernels and the model bundle as an object file.
//
// No LLVM type here; EmitObject.cpp is the one build-time LLVM file besides CodeGen and JIT.
#pragma once
#include "IR.h"

#include <string>
#include <vector>

namespace saltpan {

struct EmittedKernel {
  const ir::Kernel *kernel;
  int lanes; // 1: scalar
};

/// Writes a relocatable object for the host CPU (PIC, small code model) to `path`: each kernel
/// compiled exactly as the JIT compiles it (codegen, O3, the host's CPU and features), the
/// table of their fingerprints and addresses, and `bundleText` (StandaloneModel.h names the
/// symbols). Returns false with `error` set on failure.
bool emitModelObject(const std::vector<EmittedKernel> &kernels, const std::string &bundleText, const std::string &path,
                     std::string &error);

} // namespace saltpan
