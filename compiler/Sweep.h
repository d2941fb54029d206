// Sweep.h - Stage 12: sweeps. checkSweeps (SweepCheck.cpp, run by every `saltpan check`) validates each
// sweep declaration against the lowered model: parameters that exist, values in their
// dimensions, a grid or a sample design that makes sense, measures a run or a steady state
// can give. planSweep (SweepCheck.cpp) turns a valid declaration into its points and columns,
// and SweepEvaluator (Sweep.cpp) computes points, in SIMD lanes where it can.
#pragma once
#include "AST.h"
#include "Expect.h"
#include "KernelPlan.h"
#include "SweepPoints.h"
#include "SweepTable.h"

#include <functional>
#include <memory>
#include <string>
#include <vector>

namespace saltpan {
class DiagnosticEngine;
struct Compilation;

/// Returns false if it reported an error.
bool checkSweeps(Compilation &c, DiagnosticEngine &diags);

/// Every sweep declared in the root file, in order.
std::vector<const ast::SweepDecl *> rootSweeps(const ast::Program &program);

struct SweepMeasure {
  const ast::ExpectDecl *decl = nullptr;
  DisplayUnit unit;
  MeasureArgs args;
  int protocol = -1; // index into SweepPlan::protocols; -1 for rest and input_resistance
};

struct SweepPlan {
  const ast::SweepDecl *decl = nullptr;
  std::vector<std::string> parameters; // lowered parameter names, one per axis
  std::vector<DisplayUnit> parameterUnits;
  std::vector<sweep::Point> points; // SI, one value per axis
  std::vector<SweepMeasure> measures;
  std::vector<const ast::ProtocolDecl *> protocols; // each point runs these
  bool needsRest = false;
  std::string design; // grid, latin_hypercube, uniform
};

/// The points and columns of a sweep that checkSweeps accepted.
SweepPlan planSweep(Compilation &c, const ast::SweepDecl &sweep);

/// What the plan's measures of `protocol` read, in measure order (sweep::recordOnly takes it).
std::vector<std::string> recordedBy(const SweepPlan &plan, const ast::ProtocolDecl *protocol);

enum class SweepEngine { Batched, Scalar, Interpreter };

/// Computes the measures of sweep points: per protocol, one lowered model whose record list
/// holds what the measures need, and its kernels compiled once (shared by every thread).
class SweepEvaluator {
public:
  /// With no `compile`, the interpreter is used. `lanes` is the batched engine's width.
  SweepEvaluator(Compilation &c, const SweepPlan &plan, SweepEngine engine, const KernelCompiler &compile, int lanes,
                 int threads);
  ~SweepEvaluator();
  /// False with `error` when a kernel could not be compiled.
  bool ready(std::string &error) const;
  /// How the points are computed, for the outputs: "batched, 8 lanes", "scalar", ...
  const std::string &description() const;
  /// Points per evaluate() call (the lane count when batched).
  size_t batch() const;
  /// Fills `out` for the plan's points `indices` (into plan.points).
  void evaluate(const std::vector<size_t> &indices, std::vector<sweep::PointResult> &out, int worker);

private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

} // namespace saltpan
