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
class TargetMachine;
class Triple;
} // namespace llvm

namespace saltpan {

/// Emits `void functionName(const double *y, const double *p, double t, double *out)`, which
/// writes out[i] = value of kernel.outputs[i]. y, p and out must not overlap (they are noalias).
/// Arithmetic is strict IEEE (no FMA contraction); comparisons give 1.0 or
/// 0.0 and every "is true" test is `!= 0`, so NaN counts as true, as in the interpreter.
/// Returns nullptr if the kernel is malformed (an operand that does not precede its user, or an
/// output that names no node).
///
/// With `lanes` of 2, 4 or 8 the function advances that many independent parameter sets at
/// once: slot i of lane l is at index i * lanes + l of y, p and out; t is shared. Every
/// operation is elementwise (math functions are glibc's libmvec variants _ZGVbN2v_exp,
/// _ZGVdN4v_exp, _ZGVeN8v_exp, ...), so no lane's value depends on another lane.
std::unique_ptr<llvm::Module> codegen(const ir::Kernel &kernel, llvm::LLVMContext &ctx, const std::string &functionName,
                                      int lanes = 1);

/// The new pass manager's O3 for `machine`, with scalar libm only (libmvec's vector functions
/// differ from scalar ones in the last bits). The JIT and `saltpan build` both use it, so a
/// built model computes bit for bit what `saltpan run` computes. Defined in JIT.cpp.
void optimizeModule(llvm::Module &module, llvm::TargetMachine &machine, const llvm::Triple &triple);

} // namespace saltpan
