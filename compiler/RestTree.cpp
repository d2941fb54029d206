// RestTree.cpp - steady states of trees of joined compartments (cables) and their stability,
// each tree solved as one system; see Rest.h.
#include "Rest.h"
#include "Rest_Internal.h"

#include "Derivative.h"
#include "FixedStep.h"
#include "Interpret.h"
#include "Tree.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <optional>
#include <string>
#include <unordered_map>

namespace saltpan::rest {

namespace {

constexpr double startScale = 1e-3;    // the membrane currents' share where each continuation starts
constexpr double slopeStep = 1e-6;     // V: central differences of the steady-state currents
constexpr double sameState = 1e-7;     // V: two continuations that end this close found one state
constexpr double roundingFloor = 1e-9; // V: a Newton step this small is accepted when no smaller comes

// The whole model's state with every gate at its steady value at its own compartment's V, and
// the membrane currents then. A compartment's membrane current and gates depend on its own states
// only, so one pass of the kernel gives every compartment's at once.
class TreeSystem {
public:
  explicit TreeSystem(const ir::Model &model)
      : model_(model), tree_(model), interpreter_(model.kernel), y_(model.initialState),
        out_(model.kernel.outputs.size()), gates_(model.compartments.size()), probes_(model.compartments.size()) {
    std::unordered_map<std::string, size_t> index;
    for (size_t i = 0; i < model.compartments.size(); ++i)
      index[model.compartments[i].name] = i;
    auto owner = [&](const std::string &name) -> long {
      auto found = index.find(name.substr(0, name.find('.')));
      return found == index.end() || name.find('.') == std::string::npos ? -1 : static_cast<long>(found->second);
    };
    for (const ir::Gate &g : model.gates)
      if (long c = owner(g.name); c >= 0)
        gates_[static_cast<size_t>(c)].push_back(&g);
    for (const ir::Probe &p : model.probes)
      if (long c = p.entryCurrent ? owner(p.name) : -1; c >= 0)
        probes_[static_cast<size_t>(c)].push_back(&p);
  }

  const ir::Model &model() const { return model_; }
  const Tree &tree() const { return tree_; }
  const std::vector<const ir::Gate *> &gates(size_t c) const { return gates_[c]; }
  const std::vector<const ir::Probe *> &probes(size_t c) const { return probes_[c]; }
  const std::vector<double> &state() const { return y_; }
  const std::vector<double> &outputs() const { return out_; }

  // Sets the potentials of `comps` to v[c] + shift, every gate to its steady value there.
  void settle(const std::vector<size_t> &comps, const std::vector<double> &v, double shift) {
    for (size_t c : comps)
      y_[static_cast<size_t>(model_.compartments[c].voltageState)] = v[c] + shift;
    run();
    for (const ir::Gate &g : model_.gates)
      y_[static_cast<size_t>(g.state)] = out_[static_cast<size_t>(g.infOutput)];
    run();
  }

  // A/m2, outward, from the last settle.
  double current(size_t c) const {
    DoubleMath math;
    return membraneCurrent(
        math, model_.compartments[c], [this](int s) { return y_[static_cast<size_t>(s)]; },
        [this](int slot) { return out_[static_cast<size_t>(slot)]; });
  }

  // The local states of compartment c: V, then its gates.
  std::vector<int> localStates(size_t c) const {
    std::vector<int> s{model_.compartments[c].voltageState};
    for (const ir::Gate *g : gates_[c])
      s.push_back(g->state);
    return s;
  }

private:
  void run() { interpreter_.run(y_.data(), model_.params.data(), 0.0, out_.data()); }

  const ir::Model &model_;
  Tree tree_;
  Interpreter interpreter_;
  std::vector<double> y_, out_;
  std::vector<std::vector<const ir::Gate *>> gates_;
  std::vector<std::vector<const ir::Probe *>> probes_;
};

// The connected trees: compartments grouped by their root, each group increasing.
std::vector<std::vector<size_t>> treesOf(const Tree &tree, size_t n) {
  std::vector<long> root(n, -1);
  std::vector<size_t> path;
  for (size_t i = 0; i < n; ++i) {
    size_t at = i;
    while (root[at] < 0 && tree.parent(at) >= 0) {
      path.push_back(at);
      at = static_cast<size_t>(tree.parent(at));
    }
    long r = root[at] >= 0 ? root[at] : static_cast<long>(at);
    root[at] = r;
    for (size_t p : path)
      root[p] = r;
    path.clear();
  }
  std::vector<std::vector<size_t>> trees;
  std::vector<long> slot(n, -1);
  for (size_t i = 0; i < n; ++i) {
    size_t r = static_cast<size_t>(root[i]);
    if (slot[r] < 0) {
      slot[r] = static_cast<long>(trees.size());
      trees.emplace_back();
    }
    trees[static_cast<size_t>(slot[r])].push_back(i);
  }
  return trees;
}

// The tree's reduced system (V only, gates at their steady values): the current each piece loses,
// scale * area * I(V) + the axial currents out of it (A), and its Jacobian in Tree::solve's form.
class TreeNewton {
public:
  TreeNewton(TreeSystem &sys, const std::vector<size_t> &comps) : sys_(sys), comps_(comps) {
    size_t n = sys.model().compartments.size();
    diag_.assign(n, 1);
    up_.assign(n, 0);
    low_.assign(n, 0);
    rhs_.assign(n, 0);
    slope_.assign(n, 0);
    current_.assign(n, 0);
    weight_.assign(n, 0);
    // A lone patch may have no area: its current is balanced per unit area.
    for (size_t c : comps)
      weight_[c] = comps.size() > 1 ? sys.model().compartments[c].area : 1;
  }

  // Evaluates at v: residuals into rhs_, the matrix into diag_/up_/low_, slopes and currents.
  void evaluate(const std::vector<double> &v, double scale) {
    sys_.settle(comps_, v, slopeStep);
    for (size_t c : comps_)
      slope_[c] = sys_.current(c);
    sys_.settle(comps_, v, -slopeStep);
    for (size_t c : comps_)
      slope_[c] = (slope_[c] - sys_.current(c)) / (2 * slopeStep);
    sys_.settle(comps_, v, 0);
    for (size_t c : comps_) {
      current_[c] = sys_.current(c);
      rhs_[c] = scale * weight_[c] * current_[c];
      diag_[c] = scale * weight_[c] * slope_[c];
    }
    for (size_t c : comps_) {
      int p = sys_.tree().parent(c);
      if (p < 0)
        continue;
      double g = sys_.tree().conductance(c), flow = g * (v[c] - v[static_cast<size_t>(p)]);
      rhs_[c] += flow;
      rhs_[static_cast<size_t>(p)] -= flow;
      diag_[c] += g;
      diag_[static_cast<size_t>(p)] += g;
      up_[c] = low_[c] = -g;
    }
  }

  // Newton's method from v at `scale`; false when it does not converge.
  bool solve(std::vector<double> &v, double scale, double tolerance) {
    double last = std::numeric_limits<double>::infinity();
    for (int iteration = 0; iteration < 30; ++iteration) {
      evaluate(v, scale);
      sys_.tree().solve(diag_.data(), up_.data(), low_.data(), rhs_.data());
      double biggest = 0;
      for (size_t c : comps_)
        biggest = std::max(biggest, std::fabs(rhs_[c]));
      if (!std::isfinite(biggest))
        return false;
      // A step is at most 10 mV, so a far start does not leap past the steady state.
      double damp = biggest > 0.01 ? 0.01 / biggest : 1;
      for (size_t c : comps_)
        v[c] -= damp * rhs_[c];
      last = biggest;
      if (biggest <= tolerance)
        return true;
    }
    return last <= roundingFloor;
  }

  // The largest current density a piece leaves unbalanced (A/m2), after evaluate(v, 1).
  double maxResidual() const {
    double r = 0;
    for (size_t c : comps_)
      r = std::max(r, std::fabs(rhs_[c] / weight_[c]));
    return r;
  }

  // The tree's input resistance at compartment `at` (ohm), after evaluate(v, 1): the potential
  // change for a small steady current of 1 A injected there.
  std::optional<double> inputResistance(size_t at) const {
    std::vector<double> diag = diag_, rhs(diag_.size(), 0);
    rhs[at] = 1;
    sys_.tree().solve(diag.data(), up_.data(), low_.data(), rhs.data());
    double area = sys_.model().compartments[at].area;
    if (!std::isfinite(rhs[at]) || !(area > 0))
      return std::nullopt;
    return rhs[at] * weight_[at] / area; // a lone patch's system is per unit area
  }

  double current(size_t c) const { return current_[c]; } // A/m2
  double slope(size_t c) const { return slope_[c]; }     // S/m2

private:
  TreeSystem &sys_;
  const std::vector<size_t> &comps_;
  std::vector<double> diag_, up_, low_, rhs_, slope_, current_, weight_;
};

// Follows the isopotential tree's steady state at v0 to the tree itself (membrane currents
// scaled from startScale to 1). The reason when it stops on the way.
std::optional<std::string> continueToTree(TreeNewton &newton, const std::vector<size_t> &comps, double v0,
                                          std::vector<double> &v, double tolerance) {
  for (size_t c : comps)
    v[c] = v0;
  double scale = startScale, ratio = 10;
  if (!newton.solve(v, scale, tolerance))
    return std::string("Newton's method does not converge near the isopotential tree");
  std::vector<double> saved;
  while (scale < 1) {
    double next = std::min(1.0, scale * ratio);
    saved = v;
    if (newton.solve(v, next, tolerance)) {
      scale = next;
      ratio = std::min(ratio * 2, 10.0);
      continue;
    }
    v = saved;
    ratio = std::sqrt(ratio);
    if (ratio < 1 + 1e-4) {
      char buf[160];
      std::snprintf(buf, sizeof buf,
                    "the continuation stops at a fold: the steady state disappears with the membrane currents at "
                    "%.6g of their value",
                    scale);
      return std::string(buf);
    }
  }
  return std::nullopt;
}

// The dense Jacobian of every state of the tree (V and gates of each piece, axial coupling
// included) at the settled state, by central differences of the membrane and gate equations
// (one state of every piece moved at once: a piece's equations see only its own states) and the
// axial terms, which are linear, written exactly.
std::vector<double> treeJacobian(TreeSystem &sys, const std::vector<size_t> &comps, const std::vector<double> &v,
                                 size_t n) {
  const ir::Model &m = sys.model();
  ir::Model membraneOnly = m; // the derivative without the axial currents
  membraneOnly.junctions.clear();
  std::vector<std::vector<int>> local;
  std::vector<size_t> offset, column(m.compartments.size(), 0);
  size_t widest = 0, next = 0;
  for (size_t c : comps) {
    local.push_back(sys.localStates(c));
    offset.push_back(next);
    column[c] = next;
    next += local.back().size();
    widest = std::max(widest, local.back().size());
  }
  sys.settle(comps, v, 0);
  const std::vector<double> base = sys.state();
  Interpreter interpreter(m.kernel);
  std::vector<double> y, out(m.kernel.outputs.size()), plus(base.size()), minus(base.size());
  std::vector<double> jac(n * n, 0);
  const double step = 1e-7; // 0.1 uV for V, 1e-7 of a gate's range
  for (size_t k = 0; k < widest; ++k) {
    for (double sign : {1.0, -1.0}) {
      y = base;
      for (const std::vector<int> &s : local)
        if (k < s.size())
          y[static_cast<size_t>(s[k])] += sign * step;
      interpreter.run(y.data(), m.params.data(), 0.0, out.data());
      stateDerivative(membraneOnly, m.params.data(), y.data(), out.data(), sign > 0 ? plus.data() : minus.data());
    }
    for (size_t t = 0; t < local.size(); ++t) {
      if (k >= local[t].size())
        continue;
      for (size_t r = 0; r < local[t].size(); ++r) {
        size_t s = static_cast<size_t>(local[t][r]);
        jac[(offset[t] + r) * n + offset[t] + k] = (plus[s] - minus[s]) / (2 * step);
      }
    }
  }
  for (const ir::Junction &j : m.junctions) {
    size_t c = static_cast<size_t>(j.child), p = static_cast<size_t>(j.parent);
    if (!std::binary_search(comps.begin(), comps.end(), c))
      continue;
    auto byCharge = [&](size_t at) {
      const ir::Compartment &comp = m.compartments[at];
      return j.conductance / (comp.area * m.params[static_cast<size_t>(comp.capacitanceParam)]);
    };
    size_t vc = column[c], vp = column[p];
    jac[vc * n + vc] -= byCharge(c);
    jac[vc * n + vp] += byCharge(c);
    jac[vp * n + vp] -= byCharge(p);
    jac[vp * n + vc] += byCharge(p);
  }
  return jac;
}

std::vector<CableSpan> cablesOf(const ir::Model &model, const AnalyzedModel *analysis,
                                const std::vector<size_t> &comps) {
  std::vector<CableSpan> spans;
  if (!analysis || analysis->compartments.size() != model.compartments.size())
    return spans;
  for (size_t i = 0; i < model.compartments.size(); ++i)
    if (analysis->compartments[i].name != model.compartments[i].name)
      return spans; // not the analysis of this model: no names rather than wrong ones
  for (const CableValues &cable : analysis->cables) {
    if (!cable.decl || !cable.decl->cable || cable.pieces == 0 ||
        !std::binary_search(comps.begin(), comps.end(), cable.first))
      continue;
    const ast::CableShape &shape = *cable.decl->cable;
    spans.push_back(
        {cable.decl->name, shape.parentDecl ? shape.parent : std::string(), cable.first, cable.pieces, cable.length});
  }
  return spans;
}

bool inCable(const std::vector<CableSpan> &cables, size_t c) {
  for (const CableSpan &s : cables)
    if (c >= s.first && c < s.first + s.pieces)
      return true;
  return false;
}

} // namespace

std::vector<TreeRest> findTreeSteadyStates(const ir::Model &model, const AnalyzedModel *analysis, const Options &o) {
  TreeSystem sys(model);
  std::vector<TreeRest> result;
  std::vector<double> v(model.compartments.size(), 0);
  for (const std::vector<size_t> &comps : treesOf(sys.tree(), model.compartments.size())) {
    TreeRest tr;
    tr.compartments = comps;
    tr.cables = cablesOf(model, analysis, comps);
    for (size_t c : comps)
      tr.states += 1 + sys.gates(c).size();
    for (size_t c : comps)
      v[c] = model.initialState[static_cast<size_t>(model.compartments[c].voltageState)];

    // The isopotential tree: its whole membrane current at one V, per unit area for a lone patch.
    auto total = [&](double at) {
      for (size_t c : comps)
        v[c] = at;
      sys.settle(comps, v, 0);
      double sum = 0;
      for (size_t c : comps)
        sum += sys.current(c) * (comps.size() > 1 ? model.compartments[c].area : 1);
      return sum;
    };
    std::vector<double> starts = scanRoots(total, o);

    TreeNewton newton(sys, comps);
    for (double v0 : starts) {
      if (auto why = continueToTree(newton, comps, v0, v, o.tolerance)) {
        tr.lost.push_back({v0, *why});
        continue;
      }
      bool known = false;
      for (const TreeSteadyState &s : tr.steadyStates) {
        double gap = 0;
        for (size_t k = 0; k < comps.size(); ++k)
          gap = std::max(gap, std::fabs(s.pieces[k].v - v[comps[k]]));
        known = known || gap < sameState;
      }
      if (known)
        continue;

      TreeSteadyState s;
      s.isopotentialV = v0;
      newton.evaluate(v, 1);
      s.maxResidual = newton.maxResidual();
      sys.settle(comps, v, 0);
      for (size_t c : comps) {
        PieceRest p;
        p.name = model.compartments[c].name;
        p.v = v[c];
        std::string prefix = p.name + ".";
        for (const ir::Gate *g : sys.gates(c))
          p.gates.push_back({g->name.substr(prefix.size()), sys.state()[static_cast<size_t>(g->state)]});
        for (const ir::Probe *r : sys.probes(c))
          if (auto entry = entryOf(*r, prefix))
            p.currents.push_back({*entry, sys.outputs()[static_cast<size_t>(r->output)] * r->scale});
        p.membraneCurrent = newton.current(c) * 100; // A/m2 -> uA/cm2
        p.slopeConductance = newton.slope(c);
        s.pieces.push_back(std::move(p));
      }
      // Input resistances where a user injects: each lone compartment, each cable's far end.
      for (size_t k = 0; k < comps.size(); ++k) {
        bool farEnd = false;
        for (const CableSpan &span : tr.cables)
          farEnd = farEnd || comps[k] == span.first + span.pieces - 1;
        if (farEnd || !inCable(tr.cables, comps[k]))
          s.pieces[k].inputResistance = newton.inputResistance(comps[k]);
      }
      if (tr.states <= maxStatesForEigenvalues) {
        s.stabilityAssessed = true;
        s.eigenvalues = eigenvalues(treeJacobian(sys, comps, v, tr.states), static_cast<int>(tr.states));
        s.maxRealEigenvalue = -std::numeric_limits<double>::infinity();
        for (auto e : s.eigenvalues)
          s.maxRealEigenvalue = std::max(s.maxRealEigenvalue, e.real());
        s.stable = s.maxRealEigenvalue < 0;
      }
      tr.steadyStates.push_back(std::move(s));
    }
    std::sort(tr.steadyStates.begin(), tr.steadyStates.end(),
              [](const TreeSteadyState &a, const TreeSteadyState &b) { return a.pieces[0].v < b.pieces[0].v; });
    result.push_back(std::move(tr));
  }
  return result;
}

} // namespace saltpan::rest

namespace saltpan::rest {

std::vector<CompartmentRest> steadyStatesOfEach(const ir::Model &model, const AnalyzedModel *analysis,
                                                const Options &o) {
  if (model.junctions.empty())
    return findSteadyStates(model, analysis, o);
  std::vector<CompartmentRest> result;
  for (const TreeRest &tree : findTreeSteadyStates(model, analysis, o))
    for (size_t k = 0; k < tree.compartments.size(); ++k) {
      CompartmentRest cr;
      cr.name = model.compartments[tree.compartments[k]].name;
      for (const TreeSteadyState &s : tree.steadyStates) {
        const PieceRest &piece = s.pieces[k];
        SteadyState one;
        one.v = piece.v;
        // Above the eigenvalue limit a tree's only steady state is taken as its rest; with
        // several and no stability, none is (the measure then says so).
        one.stable = s.stabilityAssessed ? s.stable : tree.steadyStates.size() == 1;
        one.maxRealEigenvalue = s.maxRealEigenvalue;
        one.gates = piece.gates;
        one.currents = piece.currents;
        one.totalCurrent = piece.membraneCurrent;
        one.slopeConductance = piece.slopeConductance;
        one.inputResistance = piece.inputResistance;
        cr.steadyStates.push_back(std::move(one));
      }
      result.push_back(std::move(cr));
    }
  return result;
}

} // namespace saltpan::rest
