// StandaloneModel.h - the model compiled into an executable or shared library by `saltpan build`.
//
// `saltpan build` emits an object file (codegen/EmitObject.cpp) that defines the symbols named
// here: the model bundle (ModelFile.h) as JSON text, and a table of the kernels it compiled,
// each with its fingerprint. The runtime rebuilds the models from the text and finds a
// kernel's native code by fingerprint, so a kernel it did not expect is an error, never a
// silent mix-up.
#pragma once
#include "ModelFile.h"
#include "Simulate.h"

#include <cstdint>
#include <string>

namespace saltpan {

/// One row of the embedded kernel table; laid out as the LLVM struct {i64, ptr}.
struct EmbeddedKernel {
  uint64_t fingerprint;
  KernelFn function;
};

inline constexpr const char *embeddedModelSymbol = "saltpan_embedded_model";              // char[], NUL-terminated
inline constexpr const char *embeddedModelSizeSymbol = "saltpan_embedded_model_size";     // uint64_t, without the NUL
inline constexpr const char *embeddedKernelsSymbol = "saltpan_embedded_kernels";          // EmbeddedKernel[]
inline constexpr const char *embeddedKernelCountSymbol = "saltpan_embedded_kernel_count"; // uint64_t

/// The bundle compiled into this program; false with `error` set when it is damaged.
bool loadEmbeddedBundle(ModelBundle &bundle, std::string &error);
/// The native code compiled for `kernel` (one lane), or nullptr (with `error`) when none was;
/// a KernelCompiler (KernelPlan.h) over the kernels `saltpan build` compiled in.
KernelFn embeddedKernel(const ir::Kernel &kernel, int lanes, std::string &error);

} // namespace saltpan
