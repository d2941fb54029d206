// SweepCheck.cpp - Stage 12, checking half: checkSweeps validates every sweep declaration against
// the lowered model, and planSweep turns a valid one into its points and columns.
#include "Sweep.h"

#include "Diagnostics.h"
#include "Nearest.h"
#include "Pipeline.h"
#include "RunSettings.h"

#include <algorithm>
#include <cmath>
#include <map>

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
      std::vector<std::string> near = nearestNames(a.parameter, model.paramNames);
      std::string hint;
      for (const std::string &n : near)
        hint += (hint.empty() ? "did you mean " : " or ") + ("'" + n + "'");
      if (!hint.empty())
        DiagnosticEngine::note(d, {}, hint + "?");
      // A large tree has thousands: list a short model's, point to the listing otherwise.
      constexpr size_t listed = 24;
      std::string names;
      for (size_t i = 0; i < model.paramNames.size() && i < listed; ++i)
        names += (names.empty() ? "" : ", ") + model.paramNames[i];
      if (model.paramNames.size() > listed)
        DiagnosticEngine::note(d, {},
                               "the model has " + std::to_string(model.paramNames.size()) + " parameters, " + names +
                                   ", ...; 'saltpan check --emit ir FILE' lists them all");
      else
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
    sm.unit = measuredUnit(c, *m);
    sm.args = measureArgs(c, *m);
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
      paths.insert(paths.end(), m.args.traces.begin(), m.args.traces.end());
  return paths;
}

} // namespace saltpan
