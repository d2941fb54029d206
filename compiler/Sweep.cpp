// Sweep.cpp - Stage 12: validating sweeps, planning their points, computing them.
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

namespace {

constexpr uint64_t maxPoints = 100000000; // 1e8: beyond this a sweep is a typo, not a plan

// The lowered model whose parameters a sweep's axes name: its first measured protocol's,
// or the stimulus-free lowering for steady-state measures.
const ir::Model *parameterModel(Compilation &c, const SweepDecl &s) {
  for (auto &m : s.measures)
    if (m->target) {
      auto it = c.lowered.find(m->target);
      if (it != c.lowered.end())
        return &it->second;
    }
  return c.unstimulated();
}

bool isWholeNumber(double v, double low, double high) { return v == std::floor(v) && v >= low && v <= high; }

class SweepChecker {
public:
  SweepChecker(Compilation &c, DiagnosticEngine &diags) : c_(c), diags_(diags) {}

  void check(const SweepDecl &s) {
    if (s.axes.empty())
      diags_.error(s.nameRange, "sweep '" + s.name + "' varies nothing; add 'vary PARAMETER from A to B points N'");
    if (s.measures.empty())
      diags_.error(s.nameRange, "sweep '" + s.name + "' measures nothing; add 'measure PROTOCOL: MEASURE(...)'");
    for (auto &m : s.measures)
      measure(*m);
    const ir::Model *model = parameterModel(c_, s);
    if (!model)
      return;
    bool sampled = s.design != SampleDesign::Grid;
    if (sampled) {
      if (!isWholeNumber(s.samples, 1, static_cast<double>(maxPoints)))
        diags_.error(s.sampleRange, "the sample size must be a whole number from 1 to 100000000");
      if (!isWholeNumber(s.seed, 0, 9007199254740992.0))
        diags_.error(s.sampleRange, "the seed must be a whole number from 0 to 2^53");
    }
    std::map<std::string, SourceRange> seen;
    for (const SweepAxis &a : s.axes) {
      auto [it, fresh] = seen.emplace(a.parameter, a.parameterRange);
      if (!fresh) {
        auto &d = diags_.error(a.parameterRange, "'" + a.parameter + "' is varied twice");
        DiagnosticEngine::note(d, it->second, "first varied here");
        continue;
      }
      axis(s, a, *model, sampled);
    }
    if (!sampled && diags_.errorCount() == 0) {
      std::vector<sweep::Axis> axes = planAxes(s);
      if (sweep::gridSize(axes, maxPoints) == 0)
        diags_.error(s.nameRange, "sweep '" + s.name + "' has more than 100000000 points");
    }
  }

  std::vector<sweep::Axis> planAxes(const SweepDecl &s) {
    std::vector<sweep::Axis> axes;
    for (const SweepAxis &a : s.axes) {
      sweep::Axis x;
      if (a.values.empty()) {
        x.from = value(a.from.get());
        x.to = value(a.to.get());
        x.points = static_cast<long>(a.points);
        x.logarithmic = a.logarithmic;
      } else
        for (auto &v : a.values)
          x.values.push_back(value(v.get()));
      axes.push_back(std::move(x));
    }
    return axes;
  }

private:
  Compilation &c_;
  DiagnosticEngine &diags_;

  double value(const Expr *e) { return e ? c_.evaluator.evaluate(*e, {}).value_or(NAN) : NAN; }

  void measure(const ExpectDecl &m) {
    if (!checkMeasure(c_, m, diags_))
      return;
    bool steady = m.measure == "rest" || m.measure == "input_resistance";
    if (!measuredOnRun(m) && !steady) {
      auto &d = diags_.error(m.measureRange, "'" + m.measure + "' does not change from point to point of a sweep");
      DiagnosticEngine::note(d, {},
                             "a sweep measures protocol runs, rest and input_resistance; test fixed "
                             "properties with 'expect'");
    } else if (m.measure.rfind("snapshot_", 0) == 0)
      diags_.error(m.measureRange, "'" + m.measure + "' compares with one snapshot and cannot be swept");
  }

  // A swept value passes the checks a written one does (RunSettings' implausibleParameter).
  bool plausible(const ir::Model &model, size_t param, const Expr *e) {
    if (auto why = implausibleParameter(model, param, value(e))) {
      diags_.error(e->range, *why);
      return false;
    }
    return true;
  }

  void axis(const SweepDecl &s, const SweepAxis &a, const ir::Model &model, bool sampled) {
    int p = model.findParam(a.parameter);
    if (p < 0) {
      auto &d = diags_.error(a.parameterRange, "there is no parameter '" + a.parameter + "' to vary");
      std::string names;
      for (const std::string &n : model.paramNames)
        names += (names.empty() ? "" : ", ") + n;
      DiagnosticEngine::note(d, {}, "the parameters are " + names);
      return;
    }
    const Dimension &dim = model.paramDims[static_cast<size_t>(p)];
    auto same = [&](const Expr *e) {
      if (e && e->type.known && e->type.dim != dim) {
        diags_.error(e->range, "values of '" + a.parameter + "' must be " + describeDimension(dim) + ", got " +
                                   describeDimension(e->type.dim));
        return false;
      }
      return e != nullptr;
    };
    if (!a.values.empty()) {
      if (sampled)
        diags_.error(a.range, "a sampled sweep draws from ranges; give '" + a.parameter + "' a range, not values");
      for (auto &v : a.values)
        if (same(v.get()))
          plausible(model, static_cast<size_t>(p), v.get());
      return;
    }
    bool ok = same(a.from.get()) & same(a.to.get());
    // `points 0` is written but not positive: test whether the clause is there, not its value.
    bool givenPoints = a.pointsRange.valid();
    if (sampled && givenPoints)
      diags_.error(a.pointsRange, "a sampled sweep takes its point count from 'sample'; drop 'points'");
    if (!sampled && !givenPoints) {
      diags_.error(a.range, "a grid needs the number of points along '" + a.parameter + "': add 'points N'");
      return;
    }
    if (!sampled && !isWholeNumber(a.points, 1, static_cast<double>(maxPoints))) {
      diags_.error(a.pointsRange, "the number of points must be a whole number from 1 to 100000000");
      return;
    }
    if (!ok)
      return;
    if (!plausible(model, static_cast<size_t>(p), a.from.get()) ||
        !plausible(model, static_cast<size_t>(p), a.to.get()))
      return;
    double from = value(a.from.get()), to = value(a.to.get());
    // Points are spaced by (to - from), which must stay finite too.
    if (!std::isfinite(to - from)) {
      diags_.error(a.range, "the range of '" + a.parameter + "' is too wide to represent in base units");
      return;
    }
    if (!sampled && a.points == 1 && from != to)
      diags_.error(a.pointsRange, "one point cannot span a range; use 'points 2' or more, or 'values'");
    if (a.logarithmic && !(from * to > 0))
      diags_.error(a.range, "a logarithmic range needs two ends of the same sign, neither zero");
    (void)s;
  }
};

} // namespace

std::vector<const SweepDecl *> rootSweeps(const Program &program) {
  std::vector<const SweepDecl *> out;
  for (auto &d : program.root->decls)
    if (auto *s = dyn_cast<SweepDecl>(d.get()))
      out.push_back(s);
  return out;
}

bool checkSweeps(Compilation &c, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  SweepChecker checker(c, diags);
  for (auto &m : c.program.modules)
    for (auto &d : m->decls)
      if (auto *s = dyn_cast<SweepDecl>(d.get()))
        checker.check(*s);
  return diags.errorCount() == before;
}

SweepPlan planSweep(Compilation &c, const SweepDecl &s) {
  SweepPlan plan;
  plan.decl = &s;
  DiagnosticEngine quiet;
  SweepChecker checker(c, quiet);
  std::vector<sweep::Axis> axes = checker.planAxes(s);
  const ir::Model *model = parameterModel(c, s);
  for (const SweepAxis &a : s.axes) {
    plan.parameters.push_back(a.parameter);
    int p = model->findParam(a.parameter);
    plan.parameterUnits.push_back(displayUnit(model->paramDims[static_cast<size_t>(p)]));
  }
  switch (s.design) {
  case SampleDesign::Grid:
    plan.design = "grid";
    plan.points = sweep::grid(axes);
    break;
  case SampleDesign::LatinHypercube:
    plan.design = "latin_hypercube";
    plan.points = sweep::latinHypercube(axes, static_cast<uint64_t>(s.samples), static_cast<uint64_t>(s.seed));
    break;
  case SampleDesign::Uniform:
    plan.design = "uniform";
    plan.points = sweep::uniform(axes, static_cast<uint64_t>(s.samples), static_cast<uint64_t>(s.seed));
    break;
  }
  for (auto &m : s.measures) {
    SweepMeasure sm;
    sm.decl = m.get();
    sm.unit = displayUnit(measuredDimension(c, *m).value_or(Dimension::none()));
    if (m->args.size() > 1 && m->args[1].value)
      sm.args.value = c.evaluator.evaluate(*m->args[1].value, {}).value_or(NAN);
    if (m->target) {
      auto it = std::find(plan.protocols.begin(), plan.protocols.end(), m->target);
      sm.protocol = static_cast<int>(it - plan.protocols.begin());
      if (it == plan.protocols.end())
        plan.protocols.push_back(m->target);
    } else
      plan.needsRest = true;
    plan.measures.push_back(std::move(sm));
  }
  return plan;
}

std::vector<std::string> recordedBy(const SweepPlan &plan, const ProtocolDecl *protocol) {
  std::vector<std::string> paths;
  for (const SweepMeasure &m : plan.measures)
    if (m.decl->target == protocol)
      paths.push_back(m.decl->args[0].path);
  return paths;
}

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
      analysis = rest::findSteadyStates(m, &c.model);
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
