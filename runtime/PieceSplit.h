// PieceSplit.h - a tree's kernel split by compartment: compartments whose parts of the kernel
// are the same program (a cable's pieces, all alike but for their parameters) share one small
// kernel, called for them in SIMD lanes, one piece per lane. Compile time is then that of a
// few pieces, whatever the tree's size; the model's one kernel over all pieces grows faster
// than linearly in LLVM's optimiser.
#pragma once
#include "IR.h"
#include "Simulate.h"

#include <cstdint>
#include <memory>
#include <optional>
#include <vector>

namespace saltpan {

extern const KernelPart allParts[kernelPartCount];
const char *kernelPartName(KernelPart part);

/// The compartments that share one small kernel for one part. Slot j of member m reads global
/// state states[m * kernel's state count + j] (params and outputs likewise).
struct PieceClass {
  ir::Kernel kernel; // over local slots: states, params and outputs numbered from 0
  int stateCount = 0, paramCount = 0;
  std::vector<int> members; // compartment indices
  std::string firstName;    // the first member's name, for --emit
  std::vector<int> states, params, outputs;
};

struct PieceSplit {
  std::vector<PieceClass> parts[kernelPartCount];
  bool prepared[kernelPartCount] = {}; // a part not prepared is computed as All
  /// The outputs no compartment owns, over the global slots (for All only); may be empty.
  std::optional<ir::Kernel> rest;
  std::vector<int> restOutputs; // the global output of each of rest's outputs
  const std::vector<PieceClass> &classes(KernelPart part) const { return parts[static_cast<int>(part)]; }
};

/// The split of `model`'s kernel for `parts` (All is always prepared), or nothing when a
/// compartment's outputs read another's states (then only the whole kernel is correct).
/// KernelPart::Step, the fused membrane part of an implicit step of `step` seconds, is
/// prepared only for a positive step and a model without clamps.
std::optional<PieceSplit> splitByPiece(const ir::Model &model, const std::vector<KernelPart> &parts, double step = 0);

/// A split's kernels made callable (threads may share it: its scratch is per thread): computes the outputs of a
/// part as the model's kernel would, each class in groups of its lanes (the last group padded
/// with copies of its last member, whose results are dropped).
class PieceRunner {
public:
  struct ClassKernel {
    KernelRef kernel;
    int lanes = 1; // native only when above 1
  };
  /// `kernels[part][k]` runs class k of that part; `rest` the outputs no compartment owns.
  PieceRunner(std::shared_ptr<const PieceSplit> split, std::vector<std::vector<ClassKernel>> kernels, KernelRef rest);
  /// `out` is the model's outputs, or for KernelPart::Step the array [next states | outputs].
  void run(const double *y, const double *p, double t, double *out, KernelPart part);
  bool prepared(KernelPart part) const { return split_->prepared[static_cast<int>(part)]; }

private:
  std::shared_ptr<const PieceSplit> split_;
  std::vector<std::vector<ClassKernel>> kernels_;
  KernelRef rest_;
  size_t widest_ = 0; // scratch values a call needs
};

/// The vector lanes of this CPU for doubles (8 with AVX-512, 4 with AVX2, else 2), as the JIT
/// and saltpan build target it.
int hostVectorLanes();

} // namespace saltpan
