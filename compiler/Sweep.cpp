// Sweep.cpp - Stage 12, computing half: SweepEvaluator computes sweep points (SweepCheck.cpp checks and plans).
#include "Sweep.h"

#include "Diagnostics.h"
#include "KernelPlan.h"
#include "LaneSimulate.h"
#include "Pipeline.h"
#include "Rest.h"
#include "Run.h"
#include "RunSettings.h"
#include "Simulate.h"
#include "SweepSupport.h"

#include <cmath>
#include <map>
#include <optional>
#include <set>

namespace saltpan {

using namespace ast;

// ---- computing points ----

struct SweepEvaluator::Impl {
  struct ProtocolRun {
    ir::Model model;
    std::vector<int> axisParam; // parameter index of each axis
    std::vector<PlannedKernels> kernels; // one per worker (interpreters hold scratch values)
    bool lanes() const { return kernels.front().plan().lanes > 1; }
  };
  Compilation &c;
  const SweepPlan &plan;
  SweepEngine engine;
  int lanes = 1;
  std::vector<ProtocolRun> runs;
  ir::Model restModel;
  std::vector<int> restParam;
  std::string error, description;

  Impl(Compilation &comp, const SweepPlan &p, SweepEngine e) : c(comp), plan(p), engine(e) {}

  std::vector<double> paramsFor(const ir::Model &m, const std::vector<int> &axisParam, size_t point) const {
    std::vector<double> params = m.params;
    for (size_t a = 0; a < axisParam.size(); ++a)
      params[static_cast<size_t>(axisParam[a])] = plan.points[point][a];
    return params;
  }

  void measureRun(size_t protocol, const Trace &trace, sweep::PointResult &r) {
    const ProtocolRun &run = runs[protocol];
    for (size_t k = 0; k < plan.measures.size(); ++k) {
      const SweepMeasure &m = plan.measures[k];
      if (m.protocol != static_cast<int>(protocol))
        continue;
      std::string why;
      auto v = traceMeasure(*m.decl, m.args, run.model, trace, why);
      r.measures[k] = v ? *v * m.unit.scale : NAN;
    }
  }

  void evaluateRest(size_t point, sweep::PointResult &r) {
    ir::Model m = restModel;
    m.params = paramsFor(restModel, restParam, point);
    std::vector<rest::CompartmentRest> analysis;
    try {
      analysis = rest::steadyStatesOfEach(m, &c.model);
    } catch (const std::exception &e) {
      sweep::addFailure(r, std::string("steady states: ") + e.what());
      return;
    }
    for (size_t k = 0; k < plan.measures.size(); ++k) {
      const SweepMeasure &sm = plan.measures[k];
      if (sm.protocol >= 0)
        continue;
      std::string why;
      auto v = restMeasure(analysis, sm.decl->args[0].path, sm.decl->measure == "input_resistance", why);
      r.measures[k] = v ? *v * sm.unit.scale : NAN;
    }
  }

  void evaluateScalar(size_t protocol, size_t point, sweep::PointResult &r, int worker) {
    ProtocolRun &run = runs[protocol];
    std::vector<double> params = paramsFor(run.model, run.axisParam, point);
    SimulationFailure failure;
    SimulationStats stats;
    const PlannedKernels &kernels = run.kernels[std::min(static_cast<size_t>(worker), run.kernels.size() - 1)];
    Trace trace = simulatePlanned(run.model, params, kernels, failure, &stats);
    if (failure.failed)
      sweep::addFailure(r, sweep::failureText(plan.protocols[protocol]->name, failure));
    else
      measureRun(protocol, trace, r);
  }

  void evaluateLanes(size_t protocol, const std::vector<size_t> &points, std::vector<sweep::PointResult> &out) {
    ProtocolRun &run = runs[protocol];
    std::vector<std::vector<double>> params;
    for (size_t l = 0; l < static_cast<size_t>(lanes); ++l) // a short batch repeats its last point
      params.push_back(paramsFor(run.model, run.axisParam, points[std::min(l, points.size() - 1)]));
    LaneRun result = simulateLanes(run.model, params, run.kernels.front().laneKernels());
    for (size_t k = 0; k < points.size(); ++k) {
      if (result.failures[k].failed)
        sweep::addFailure(out[k], sweep::failureText(plan.protocols[protocol]->name, result.failures[k]));
      else
        measureRun(protocol, result.traces[k], out[k]);
    }
  }
};

SweepEvaluator::SweepEvaluator(Compilation &c, const SweepPlan &plan, SweepEngine engine, const KernelCompiler &compile,
                               int lanes, int threads)
    : impl_(std::make_unique<Impl>(c, plan, compile ? engine : SweepEngine::Interpreter)) {
  Impl &im = *impl_;
  if (im.engine == SweepEngine::Batched)
    im.lanes = lanes;
  size_t workers = static_cast<size_t>(std::max(1, threads));
  bool anyLanes = false, anyScalar = false;
  for (const ProtocolDecl *p : plan.protocols) {
    Impl::ProtocolRun run;
    run.model = c.lowered.at(p);
    // Record only what the measures read: fewer columns, and often the state-only kernel.
    sweep::recordOnly(run.model, recordedBy(plan, p));
    for (const std::string &name : plan.parameters)
      run.axisParam.push_back(run.model.findParam(name));
    KernelCompiler native = im.engine == SweepEngine::Interpreter ? KernelCompiler() : compile;
    run.kernels.reserve(workers); // `kernels` below refers into it while the copies are added
    run.kernels.emplace_back(planKernels(run.model, KernelUse::Lanes, im.engine == SweepEngine::Batched ? im.lanes : 1),
                             native);
    const PlannedKernels &kernels = run.kernels.front();
    if (native && !kernels.native() && im.error.empty())
      im.error =
          std::string(run.lanes() ? "cannot compile the lane kernel of protocol '" : "cannot compile protocol '") +
          p->name + "': " + kernels.compileError();
    (run.lanes() ? anyLanes : anyScalar) = true;
    // Native code is shared by every worker; interpreters are not.
    for (size_t w = 1; w < workers && !kernels.native(); ++w)
      run.kernels.push_back(kernels);
    im.runs.push_back(std::move(run));
  }
  if (plan.needsRest) {
    if (const ir::Model *unstimulated = c.unstimulated())
      im.restModel = *unstimulated;
    for (const std::string &name : plan.parameters)
      im.restParam.push_back(im.restModel.findParam(name));
  }
  if (im.engine == SweepEngine::Interpreter)
    im.description = "interpreter";
  else if (anyLanes)
    im.description = "batched, " + std::to_string(im.lanes) + " lanes" +
                     (anyScalar ? " (scalar where the method is adaptive or a clamp is used)" : "");
  else
    im.description = "scalar";
}

SweepEvaluator::~SweepEvaluator() = default;

bool SweepEvaluator::ready(std::string &error) const {
  error = impl_->error;
  return error.empty();
}

const std::string &SweepEvaluator::description() const { return impl_->description; }

size_t SweepEvaluator::batch() const { return static_cast<size_t>(std::max(1, impl_->lanes)); }

void SweepEvaluator::evaluate(const std::vector<size_t> &indices, std::vector<sweep::PointResult> &out, int worker) {
  Impl &im = *impl_;
  for (sweep::PointResult &r : out)
    r.measures.assign(im.plan.measures.size(), NAN);
  for (size_t p = 0; p < im.runs.size(); ++p) {
    if (im.runs[p].lanes()) {
      im.evaluateLanes(p, indices, out);
      continue;
    }
    for (size_t k = 0; k < indices.size(); ++k)
      im.evaluateScalar(p, indices[k], out[k], worker);
  }
  if (im.plan.needsRest)
    for (size_t k = 0; k < indices.size(); ++k)
      im.evaluateRest(indices[k], out[k]);
}

} // namespace saltpan
