// KernelPlan.h - Stage 9: which kernels a run of a lowered model calls, decided in this one place for
// every caller (run, test, snapshot, sweep points and lanes, saltpan build, the C library and
// --emit), and those kernels made callable: compiled to native code, or interpreted.
#pragma once
#include "IR.h"
#include "LaneSimulate.h"
#include "PieceSplit.h"
#include "Simulate.h"

#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

namespace saltpan {
class Interpreter;

/// What the kernels are for.
enum class KernelUse {
  Run,   // one run of the protocol as lowered (run, test, snapshot, sweep points)
  Built, // any duration and recording interval of the protocol (saltpan build, the C library)
  Lanes, // sweep points stepped in lockstep, one per SIMD lane
};

/// The kernels a run calls. A fused kernel takes a whole fixed step in one call (Fuse.h); the
/// model's own kernel serves unfused methods and the steps that meet a stimulus edge.
struct KernelPlan {
  ir::Method method = ir::Method::ExponentialEuler; // the protocol's
  int lanes = 1;                                    // SIMD lanes of the fused kernels (1: scalar)
  std::optional<ir::Kernel> fused;                  // next state, then every output
  std::optional<ir::Kernel> stateOnly;              // next state only: steps that record nothing
  std::optional<ir::Kernel> plain;                  // the model's kernel (a copy: the plan owns its kernels)
  // A tree's native code: the model's kernel computed by kind of piece, `pieceLanes` pieces at
  // once (the interpreter runs `plain` itself).
  std::shared_ptr<const PieceSplit> pieces;
  int pieceLanes = 1;

  struct Entry {
    std::string label; // what the kernel is for, as --emit prints it
    const ir::Kernel *kernel;
    int lanes;
  };
  /// Every kernel of the plan in the order it is compiled: fused, state-only, plain (or, for a
  /// split tree, each part's kernel of each kind of piece, then the rest).
  std::vector<Entry> entries() const;
};

/// The kernels `use` needs for `model`. With KernelUse::Lanes and a method lanes cannot take
/// (adaptive, or a clamp), the plan is the scalar Run plan (lanes == 1).
KernelPlan planKernels(const ir::Model &model, KernelUse use, int lanes = 1);

/// Compiles a kernel for `lanes` SIMD lanes (1: scalar), or returns nullptr with `error`.
using KernelCompiler = std::function<KernelFn(const ir::Kernel &, int lanes, std::string &error)>;

/// A plan's kernels ready to call: all native when `compile` is given and every kernel compiles,
/// otherwise all interpreted (lane kernels need native code). Copying gives another thread its
/// own interpreters, which hold scratch values, while native code is shared.
class PlannedKernels {
public:
  PlannedKernels(KernelPlan plan, const KernelCompiler &compile);
  PlannedKernels(const PlannedKernels &other);
  PlannedKernels &operator=(const PlannedKernels &) = delete;
  ~PlannedKernels();

  const KernelPlan &plan() const { return *plan_; }
  bool native() const { return native_; }
  const std::string &compileError() const { return compileError_; } // why not native
  KernelRef plain() const { return plain_; }
  FusedStep fusedStep() const;     // scalar plans only
  LaneKernels laneKernels() const; // native lane plans only

private:
  void interpret();
  void compilePieces(const KernelCompiler &compile);
  void startPieces(); // this copy's runner over the shared native piece kernels

  std::shared_ptr<const KernelPlan> plan_;
  bool native_ = false;
  std::string compileError_;
  KernelRef plain_, fused_, stateOnly_;
  std::vector<std::unique_ptr<Interpreter>> interpreters_;
  std::vector<std::vector<PieceRunner::ClassKernel>> pieceKernels_; // native code, shared by copies
  KernelRef pieceRest_;
  std::unique_ptr<PieceRunner> pieceRunner_;
};

} // namespace saltpan
