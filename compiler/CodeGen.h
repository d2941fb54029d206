// CodeGen.h - Stage 7: IR kernel -> LLVM module.
//
// Lowers one straight-line ir::Kernel to a single function; JIT.cpp optimises and runs it.
#pragma once
#include "IR.h"

#include <memory>
#include <string>

namespace llvm {
class LLVMContext;
class Module;
} // namespace llvm

namespace brine {

/// Emits `void functionName(const double *y, const double *p, double t, double *out)`, which
/// writes out[i] = value of kernel.outputs[i]. y, p and out must not overlap (they are noalias).
/// Arithmetic is IEEE except that a*b+c may be fused (FMA contraction); comparisons give 1.0 or
/// 0.0 and every "is true" test is `!= 0`, so NaN counts as true, as in the interpreter.
/// Returns nullptr if the kernel is malformed (an operand that does not precede its user, or an
/// output that names no node).
std::unique_ptr<llvm::Module> codegen(const ir::Kernel &kernel, llvm::LLVMContext &ctx,
                                      const std::string &functionName);

} // namespace brine
