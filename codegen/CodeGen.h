// CodeGen.h - Stage 9a: IR kernel -> LLVM module.
//
// Lowers one straight-line ir::Kernel to a single function; JIT.cpp prepares (verifies and
// optimises) it for the JIT and for `saltpan build`.
#pragma once
#include "IR.h"

#include <memory>
#include <string>

namespace llvm {
class LLVMContext;
class Module;
class TargetMachine;
class Triple;
namespace orc {
class JITTargetMachineBuilder;
}
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

/// The target both the JIT and `saltpan build` compile for: the host CPU and its features,
/// aggressive codegen, PIC and the small code model (JITTargetMachineBuilder's default is the
/// large one). nullptr with `error` on failure. Defined in JIT.cpp, as is the next one.
std::unique_ptr<llvm::orc::JITTargetMachineBuilder> hostTarget(std::string &error);

/// One kernel's module, ready to compile for `machine`: codegen, the machine's triple and data
/// layout, verification, the CPU's attributes on the function (and whole vectors for lanes),
/// then O3 with scalar libm only (libmvec's vector functions differ from the scalar ones in the
/// last bits). The JIT and `saltpan build` both take it, so a built model computes bit for bit
/// what `saltpan run` computes. `unoptimised`, when given, receives the module as codegen wrote
/// it. nullptr with `error` on failure.
std::unique_ptr<llvm::Module> prepareKernelModule(const ir::Kernel &kernel, llvm::LLVMContext &ctx,
                                                  const std::string &functionName, int lanes,
                                                  llvm::TargetMachine &machine, std::string *unoptimised,
                                                  std::string &error);

} // namespace saltpan
