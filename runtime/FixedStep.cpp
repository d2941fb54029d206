// FixedStep.cpp - the one implementation of the fixed-step methods and of their step grid.
#include "FixedStep.h"

#include "Derivative.h"
#include "PieceSplit.h"

#include <algorithm>
#include <cassert>
#include <cmath>

namespace saltpan {

std::vector<double> eventTimes(const ir::Kernel &kernel) {
  const std::vector<ir::Node> &nodes = kernel.nodes();
  std::vector<double> events;
  auto is = [&](ir::NodeId id, ir::Op op) { return id >= 0 && nodes[static_cast<size_t>(id)].op == op; };
  for (const ir::Node &n : nodes) {
    if (n.op != ir::Op::Ge && n.op != ir::Op::Lt && n.op != ir::Op::Gt && n.op != ir::Op::Le)
      continue;
    if (is(n.a, ir::Op::Time) && is(n.b, ir::Op::Const))
      events.push_back(nodes[static_cast<size_t>(n.b)].constant);
    else if (is(n.b, ir::Op::Time) && is(n.a, ir::Op::Const))
      events.push_back(nodes[static_cast<size_t>(n.a)].constant);
  }
  std::sort(events.begin(), events.end());
  events.erase(std::unique(events.begin(), events.end()), events.end());
  return events;
}

StepGrid::StepGrid(const ir::Model &model) : dt_(model.protocol.step), events_(eventTimes(model.kernel)) {
  steps_ = std::lround(model.protocol.duration / dt_);
  every_ = std::max(1L, std::lround(model.protocol.every / dt_));
}

double StepGrid::time(long i) const {
  double t = static_cast<double>(i) * dt_;
  // An edge written as a whole number of steps may differ from i * dt by rounding (10 us is
  // not a double): it is that grid time, so the step starts exactly on the edge.
  double tolerance = 1e-9 * dt_;
  auto it = std::lower_bound(events_.begin(), events_.end(), t - tolerance);
  return it != events_.end() && *it <= t + tolerance ? *it : t;
}

bool StepGrid::smooth(long i) const {
  double start = time(i), end = std::max(time(i + 1), start + dt_);
  auto it = std::upper_bound(events_.begin(), events_.end(), start);
  return it == events_.end() || *it > end;
}

std::span<const double> StepGrid::cuts(long i) const {
  auto first = std::upper_bound(events_.begin(), events_.end(), time(i));
  auto last = std::lower_bound(first, events_.end(), time(i + 1));
  return {first, last};
}

bool StepGrid::meetsEvents() const {
  if (steps_ <= 0)
    return false;
  auto it = std::upper_bound(events_.begin(), events_.end(), time(0));
  return it != events_.end() && *it <= std::max(time(steps_), time(steps_ - 1) + dt_);
}

bool StepGrid::isEvent(double t) const { return std::binary_search(events_.begin(), events_.end(), t); }

double StepGrid::nextBreak(double t, double until) const {
  auto it = std::upper_bound(events_.begin(), events_.end(), t);
  return it != events_.end() && *it < until ? *it : until;
}

namespace {
// A potential beyond this means the integration has gone wrong, not the membrane.
constexpr double maxPotential = 2.0; // volts
} // namespace

bool healthyState(const ir::Model &m, const double *y, size_t stride, double t, SimulationFailure &failure) {
  auto fail = [&](size_t state, const char *reason) {
    failure.failed = true;
    failure.time = t;
    failure.variable = m.stateNames[state];
    failure.reason = reason;
    return false;
  };
  for (size_t i = 0; i < m.stateNames.size(); ++i)
    if (!std::isfinite(y[i * stride]))
      return fail(i, "became NaN or infinite; the step may be too large for this model, or a rate divides by zero");
  for (const ir::Compartment &c : m.compartments)
    if (std::fabs(y[static_cast<size_t>(c.voltageState) * stride]) > maxPotential)
      return fail(static_cast<size_t>(c.voltageState),
                  "left the range of +-2 V; the step may be too large, or a current has the wrong sign");
  return true;
}

bool holdClamps(const ir::Model &m, double *y, const double *out) {
  bool moved = false;
  for (const ir::Compartment &c : m.compartments)
    if (c.clampedOutput >= 0 && out[c.clampedOutput] != 0 && y[c.voltageState] != out[c.commandOutput]) {
      y[c.voltageState] = out[c.commandOutput];
      moved = true;
    }
  return moved;
}

void stateDerivative(const ir::Model &m, const double *p, const double *y, const double *out, double *dydt) {
  DoubleMath math;
  timeDerivative(
      math, m, [y](int s) { return y[s]; }, [out](int slot) { return out[slot]; },
      [p](const ir::Compartment &c) { return p[c.capacitanceParam]; }, dydt);
  for (const ir::Compartment &c : m.compartments)
    if (c.clampedOutput >= 0 && out[c.clampedOutput] != 0)
      dydt[c.voltageState] = 0;
}

FixedStepper::FixedStepper(const ir::Model &model, const double *params, KernelRef kernel, SimulationStats *stats)
    : m_(model), p_(params), kernel_(kernel), stats_(stats) {
  size_t n = model.stateNames.size();
  for (auto *v : {&k1_, &k2_, &k3_, &k4_, &tmp_})
    v->assign(n, 0);
  scratch_.assign(model.kernel.outputs.size(), 0);
  bool implicit =
      model.protocol.method == ir::Method::BackwardEuler || model.protocol.method == ir::Method::CrankNicolson;
  // An implicit step reads gates' rates at its start and currents after the gates have moved.
  startPart_ = implicit ? KernelPart::Rates : KernelPart::Dynamics;
  if (implicit) {
    tree_ = std::make_shared<const Tree>(model);
    for (auto *v : {&diag_, &rhs_, &up_, &low_, &axialDiag_, &axialUp_, &axialLow_})
      v->assign(model.compartments.size(), 0);
    const std::vector<ir::Compartment> &cs = model.compartments;
    for (size_t i = 0; i < cs.size(); ++i) {
      clamps_ |= cs[i].clampedOutput >= 0;
      int p = tree_->parent(i);
      if (p < 0)
        continue;
      double g = tree_->conductance(i), parentArea = cs[static_cast<size_t>(p)].area;
      axialDiag_[i] += g / cs[i].area;
      axialUp_[i] = -g / cs[i].area;
      axialDiag_[static_cast<size_t>(p)] += g / parentArea;
      axialLow_[i] = -g / parentArea;
    }
    wholeSteps_ = kernel.pieces && kernel.pieces->prepared(KernelPart::Step);
    if (wholeSteps_) {
      next_.assign(n + model.kernel.outputs.size(), 0);
      for (const ir::Gate &g : model.gates)
        moved_.push_back(g.state);
      for (const ir::Pool &pool : model.pools)
        moved_.push_back(pool.state);
    }
  }
}

void FixedStepper::evaluate(const double *y, double t, double *out, KernelPart part) {
  kernel_(y, p_, t, out, part);
  if (stats_)
    ++stats_->kernelCalls;
}

void FixedStepper::settle(double *y, double *out, double t, bool all) {
  KernelPart part = all ? KernelPart::All : startPart_;
  evaluate(y, t, out, part);
  if (holdClamps(m_, y, out))
    evaluate(y, t, out, part);
}

void FixedStepper::rk4Step(double *y, const double *out, double t, double h, double end) {
  DoubleMath math;
  auto slope = [&](int stage, const double *states, double time, double *dydt) {
    if (stage > 0) // the first stage is at the step's start, where `out` holds the outputs
      evaluate(states, time, scratch_.data(), KernelPart::Dynamics);
    stateDerivative(m_, p_, states, stage > 0 ? scratch_.data() : out, dydt);
  };
  rungeKutta4Step(math, k1_.size(), y, h, t, t + 0.5 * h, end, slope, k1_.data(), k2_.data(), k3_.data(), k4_.data(),
                  tmp_.data());
}

// Gates first (Rush-Larsen, rates at the step's start), then V relaxed exactly with the
// conductances of the new gates and the stimulus at the step's middle. Read as a staggered
// scheme (gates at half steps), it is second order in V; freezing the old gates instead, as
// the plain Rush-Larsen ordering does, is first order.
bool FixedStepper::gatesAndPools(double *y, const double *out, double t, double h) {
  for (const ir::Pool &pool : m_.pools) // forward Euler; their currents change slowly
    y[pool.state] += h * out[pool.derivativeOutput];
  for (const ir::Gate &g : m_.gates) {
    double inf = out[g.infOutput], tau = out[g.tauOutput];
    y[g.state] = inf + (y[g.state] - inf) * std::exp(-h / tau);
  }
  auto clamped = [&](const ir::Compartment &c) { return c.clampedOutput >= 0 && out[c.clampedOutput] != 0; };
  if (std::all_of(m_.compartments.begin(), m_.compartments.end(), clamped))
    return false;                            // every potential is held by its clamp; set again at the next step's start
  evaluate(y, t + 0.5 * h, scratch_.data(), KernelPart::Currents); // new gates and pools, old potentials
  return true;
}

void FixedStepper::exponentialEulerStep(double *y, const double *out, double t, double h) {
  assert(m_.junctions.empty() && "exponential Euler steps each compartment alone");
  if (!gatesAndPools(y, out, t, h))
    return;
  auto clamped = [&](const ir::Compartment &c) { return c.clampedOutput >= 0 && out[c.clampedOutput] != 0; };
  for (const ir::Compartment &c : m_.compartments) {
    if (clamped(c))
      continue;
    double g = scratch_[c.gOutput], ge = scratch_[c.geOutput], other = scratch_[c.iOtherOutput];
    double &v = y[c.voltageState];
    v = exponentialEulerVoltage(v, g, ge, other, p_[c.capacitanceParam], h);
  }
}

// The gates as exponential Euler moves them, then every potential at once from the linear
// system of the membranes (linearised with the new gates, stimulus at the step's middle) and the
// axial conductances: backward Euler over the step, or Crank-Nicolson as backward Euler over
// half the step and extrapolation to its end (second order in V; the gates are staggered half a
// step, as in exponential Euler). The tree's elimination solves it in O(N).
void FixedStepper::implicitStep(double *y, const double *out, double t, double h) {
  if (gatesAndPools(y, out, t, h))
    solveVoltages(y, out, scratch_.data(), h);
}

void FixedStepper::wholeImplicitStep(double *y, double t, double h, double *injected) {
  evaluate(y, t, next_.data(), KernelPart::Step);
  for (int s : moved_)
    y[s] = next_[static_cast<size_t>(s)];
  const double *currents = next_.data() + m_.stateNames.size();
  if (injected)
    for (size_t c = 0; c < m_.compartments.size(); ++c)
      injected[c] += currents[m_.compartments[c].injectedOutput] * h;
  solveVoltages(y, nullptr, currents, h);
}

void FixedStepper::solveVoltages(double *y, const double *out, const double *currents, double h) {
  bool crank = m_.protocol.method == ir::Method::CrankNicolson;
  double span = crank ? 0.5 * h : h;
  const std::vector<ir::Compartment> &cs = m_.compartments;
  for (size_t i = 0; i < cs.size(); ++i) { // the axial terms are the run's constants
    const ir::Compartment &c = cs[i];
    double capacitance = p_[c.capacitanceParam] / span;
    diag_[i] = capacitance + currents[c.gOutput] + axialDiag_[i];
    rhs_[i] = capacitance * y[c.voltageState] + currents[c.geOutput] - currents[c.iOtherOutput];
  }
  const double *up = axialUp_.data(), *low = axialLow_.data();
  if (clamps_) {
    auto clamped = [&](size_t i) { return cs[i].clampedOutput >= 0 && out[cs[i].clampedOutput] != 0; };
    up_ = axialUp_;
    low_ = axialLow_;
    for (size_t i = 0; i < cs.size(); ++i) {
      if (clamped(i)) { // a clamped row is V = its held value
        diag_[i] = 1;
        rhs_[i] = y[cs[i].voltageState];
        up_[i] = 0;
      }
      if (int p = tree_->parent(i); p >= 0 && clamped(static_cast<size_t>(p)))
        low_[i] = 0; // the clamped parent's row holds no child
    }
    up = up_.data();
    low = low_.data();
  }
  tree_->solve(diag_.data(), up, low, rhs_.data());
  for (size_t i = 0; i < cs.size(); ++i) {
    double &v = y[cs[i].voltageState];
    v = crank ? 2 * rhs_[i] - v : rhs_[i];
  }
}

void FixedStepper::piece(double *y, const double *out, double t, double h, double end, double *injected) {
  if (injected)
    for (size_t c = 0; c < m_.compartments.size(); ++c)
      injected[c] += out[m_.compartments[c].injectedOutput] * h;
  switch (m_.protocol.method) {
  case ir::Method::RungeKutta4: rk4Step(y, out, t, h, end); break;
  case ir::Method::ExponentialEuler: exponentialEulerStep(y, out, t, h); break;
  case ir::Method::BackwardEuler:
  case ir::Method::CrankNicolson: implicitStep(y, out, t, h); break;
  case ir::Method::DormandPrince:
  case ir::Method::Rosenbrock: assert(!"adaptive methods take no fixed step"); break;
  }
}

void FixedStepper::step(const StepGrid &grid, long i, double *y, double *out, double *injected) {
  double start = grid.time(i);
  if (grid.smooth(i)) { // as a fused kernel takes it: a whole dt from the start
    if (wholeSteps_)
      wholeImplicitStep(y, start, grid.step(), injected);
    else
      piece(y, out, start, grid.step(), start + grid.step(), injected);
    return;
  }
  std::span<const double> cuts = grid.cuts(i);
  double from = start, last = grid.time(i + 1);
  for (size_t k = 0; k <= cuts.size(); ++k) {
    double to = k < cuts.size() ? cuts[k] : last;
    if (k > 0)
      settle(y, out, from, false); // just after the edge: the new stimulus, the new clamp command
    // A stage at the piece's end sees what held before the edge there.
    double end = grid.isEvent(to) ? std::nextafter(to, from) : to;
    piece(y, out, from, to - from, end, injected);
    from = to;
  }
}

FixedRun::FixedRun(const ir::Model &model, const double *params, KernelRef plain, FusedStep fused,
                   SimulationStats *stats)
    : m_(model), p_(params), fused_(fused), stats_(stats), grid_(model), stepper_(model, params, plain, stats),
      out_(model.kernel.outputs.size()) {
  if (fused_.available)
    next_.assign(model.stateNames.size() + out_.size(), 0);
}

void FixedRun::begin(long i, double *y, bool outputs) {
  step_ = i;
  fusedStep_ = fused_.available && grid_.smooth(i);
  if (fusedStep_)
    callFused(y, outputs);
  else if (outputs || !stepper_.stepsWhole(grid_, i))
    stepper_.settle(y, out_.data(), grid_.time(i), outputs);
}

void FixedRun::end(double *y) {
  step_ = grid_.steps();
  fusedStep_ = false;
  if (fused_.available) // a fused kernel holds no clamp, and its outputs are the model kernel's
    callFused(y, true);
  else
    stepper_.settle(y, out_.data(), grid_.time(step_));
}

void FixedRun::callFused(const double *y, bool outputs) {
  fusedOutputs_ = outputs || !fused_.hasStateOnly;
  (fusedOutputs_ ? fused_.kernel : fused_.stateOnly)(y, p_, grid_.time(step_), next_.data());
  if (stats_)
    ++stats_->kernelCalls;
  if (outputs)
    std::copy(next_.begin() + static_cast<long>(m_.stateNames.size()), next_.end(), out_.begin());
}

void FixedRun::finish(double *y, double *injected) {
  if (!fusedStep_) {
    stepper_.step(grid_, step_, y, out_.data(), injected);
    return;
  }
  size_t n = m_.stateNames.size();
  std::copy(next_.begin(), next_.begin() + static_cast<long>(n), y);
  // Only a charge balance needs the injected charge, and it has no state-only kernel.
  if (injected && !fused_.hasStateOnly)
    for (size_t c = 0; c < m_.compartments.size(); ++c)
      injected[c] += next_[n + static_cast<size_t>(m_.compartments[c].injectedOutput)] * grid_.step();
}

} // namespace saltpan
