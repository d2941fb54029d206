// KernelPlan.cpp - Stage 9: the one choice of kernels, and making them callable.
#include "KernelPlan.h"

#include "FixedStep.h"
#include "Fuse.h"
#include "Interpret.h"

#include <algorithm>

namespace saltpan {

namespace {

bool fixedStep(const ir::Model &model) {
  return model.protocol.method == ir::Method::ExponentialEuler || model.protocol.method == ir::Method::RungeKutta4;
}

// A fused step is one straight-line function over every compartment; past this many joined
// ones LLVM's optimiser takes far longer than the run (its cost grows faster than linearly).
constexpr size_t largestFusedTree = 64;

bool implicitMethod(ir::Method m) { return m == ir::Method::BackwardEuler || m == ir::Method::CrankNicolson; }

// A tree's kernel by kind of piece: the parts its method's stepper asks for (FixedStep.cpp).
void splitTree(const ir::Model &model, KernelPlan &plan) {
  if (!plan.plain || model.junctions.empty())
    return;
  // A smooth implicit step is one pass over the pieces (Step); steps split at an edge read
  // the rates, move the gates, then read the currents.
  std::vector<KernelPart> parts =
      implicitMethod(model.protocol.method)
          ? std::vector<KernelPart>{KernelPart::Rates, KernelPart::Currents, KernelPart::Step}
          : std::vector<KernelPart>{KernelPart::Dynamics};
  if (std::optional<PieceSplit> split = splitByPiece(model, parts, model.protocol.step)) {
    plan.pieces = std::make_shared<const PieceSplit>(std::move(*split));
    plan.pieceLanes = hostVectorLanes();
  }
}

KernelPlan scalarPlan(const ir::Model &model, KernelUse use) {
  KernelPlan plan;
  plan.method = model.protocol.method;
  const ir::Protocol &proto = model.protocol;
  if (proto.method == ir::Method::ExponentialEuler)
    plan.fused = fuseExponentialEuler(model, proto.step);
  // Steps that record nothing need only the next state; with dynamic concentrations every
  // step's injected current enters the charge balance, so they keep the full kernel. A built
  // model may be run with any recording interval, so it carries the state-only kernel anyway.
  bool sparseRecording = use == KernelUse::Built || proto.every > proto.step * 1.5;
  if (plan.fused && model.pools.empty() && sparseRecording)
    plan.stateOnly = fuseExponentialEuler(model, proto.step, false);
  // Steps that meet a stimulus edge are split by the general stepper, with the model's kernel;
  // a built model may be run for longer, over edges its protocol's duration does not reach.
  if (!plan.fused || use == KernelUse::Built || StepGrid(model).meetsEvents())
    plan.plain = model.kernel;
  splitTree(model, plan);
  return plan;
}

} // namespace

std::vector<KernelPlan::Entry> KernelPlan::entries() const {
  std::vector<Entry> out;
  std::string step = lanes > 1 ? std::string("fused ") + ir::methodName(method) + " step for sweep lanes"
                               : "fused exponential Euler step";
  if (fused)
    out.push_back({step + " (next state, then every output)", &*fused, lanes});
  if (stateOnly)
    out.push_back({step + ", next state only (steps between recordings)", &*stateOnly, lanes});
  if (plain && !pieces)
    out.push_back({fused ? "model kernel (steps that meet a stimulus edge)" : "model kernel", &*plain, 1});
  if (pieces) {
    for (KernelPart part : allParts)
      for (const PieceClass &cls : pieces->classes(part))
        out.push_back({std::string("piece kernel, ") + kernelPartName(part) + ", of " + cls.firstName +
                           (cls.members.size() > 1 ? " and " + std::to_string(cls.members.size() - 1) + " more" : ""),
                       &cls.kernel, pieceLanes});
    if (pieces->rest)
      out.push_back({"outputs no compartment owns", &*pieces->rest, 1});
  }
  return out;
}

KernelPlan planKernels(const ir::Model &model, KernelUse use, int lanes) {
  if (use != KernelUse::Lanes || lanes < 2 || !fixedStep(model) || model.compartments.size() > largestFusedTree)
    return scalarPlan(model, use == KernelUse::Lanes ? KernelUse::Run : use);
  // Lanes step with the fused exponential Euler or RK4 step; a model neither can fuse (a clamp)
  // runs point by point.
  KernelPlan plan;
  plan.method = model.protocol.method;
  double dt = model.protocol.step;
  if (model.protocol.method == ir::Method::ExponentialEuler) {
    plan.fused = fuseExponentialEuler(model, dt, true);
    plan.stateOnly = fuseExponentialEuler(model, dt, false);
  } else {
    plan.fused = fuseRungeKutta4(model, dt, true);
    plan.stateOnly = fuseRungeKutta4(model, dt, false);
  }
  if (!plan.fused || !plan.stateOnly)
    return scalarPlan(model, KernelUse::Run);
  plan.lanes = lanes;
  // Steps split at an event run the scalar stepper with the model's kernel, as scalar points do.
  if (StepGrid(model).meetsEvents())
    plan.plain = model.kernel;
  return plan;
}

PlannedKernels::PlannedKernels(KernelPlan plan, const KernelCompiler &compile)
    : plan_(std::make_shared<const KernelPlan>(std::move(plan))) {
  if (compile) {
    native_ = true;
    auto build = [&](const std::optional<ir::Kernel> &k, int width, KernelRef &into) {
      if (k && native_) {
        into.native = compile(*k, width, compileError_);
        native_ = into.native != nullptr;
      }
    };
    build(plan_->fused, plan_->lanes, fused_);
    build(plan_->stateOnly, plan_->lanes, stateOnly_);
    if (plan_->pieces)
      compilePieces(compile);
    else
      build(plan_->plain, 1, plain_);
  }
  if (!native_)
    interpret();
}

void PlannedKernels::compilePieces(const KernelCompiler &compile) {
  const PieceSplit &split = *plan_->pieces;
  pieceKernels_.assign(kernelPartCount, {});
  for (int part = 0; part < kernelPartCount && native_; ++part)
    for (const PieceClass &cls : split.parts[part]) {
      KernelFn fn = compile(cls.kernel, plan_->pieceLanes, compileError_);
      native_ = fn != nullptr;
      if (!native_)
        return;
      pieceKernels_[part].push_back({KernelRef{fn, nullptr, nullptr}, plan_->pieceLanes});
    }
  if (split.rest) {
    pieceRest_.native = compile(*split.rest, 1, compileError_);
    native_ = pieceRest_.native != nullptr;
  }
  if (native_)
    startPieces();
}

void PlannedKernels::startPieces() {
  pieceRunner_ = std::make_unique<PieceRunner>(plan_->pieces, pieceKernels_, pieceRest_);
  plain_ = KernelRef{nullptr, nullptr, pieceRunner_.get()};
}

PlannedKernels::PlannedKernels(const PlannedKernels &other)
    : plan_(other.plan_), native_(other.native_), compileError_(other.compileError_), plain_(other.plain_),
      fused_(other.fused_), stateOnly_(other.stateOnly_), pieceKernels_(other.pieceKernels_),
      pieceRest_(other.pieceRest_) {
  if (!native_)
    interpret();
  else if (plan_->pieces)
    startPieces();
}

PlannedKernels::~PlannedKernels() = default;

void PlannedKernels::interpret() {
  interpreters_.clear();
  pieceRunner_.reset();
  auto make = [&](const std::optional<ir::Kernel> &k, KernelRef &into) {
    into = {};
    if (k && plan_->lanes == 1) {
      interpreters_.push_back(std::make_unique<Interpreter>(*k));
      into.interpreter = interpreters_.back().get();
    }
  };
  make(plan_->fused, fused_);
  make(plan_->stateOnly, stateOnly_);
  make(plan_->plain, plain_);
}

FusedStep PlannedKernels::fusedStep() const {
  FusedStep step;
  step.available = plan_->fused.has_value();
  step.kernel = fused_;
  step.hasStateOnly = plan_->stateOnly.has_value();
  step.stateOnly = stateOnly_;
  return step;
}

LaneKernels PlannedKernels::laneKernels() const {
  return LaneKernels{plan_->lanes, fused_.native, stateOnly_.native, plain_.native};
}

} // namespace saltpan
