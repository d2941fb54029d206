// Derivative.h - the model's time derivative and the classical RK4 step, written once over an
// arithmetic: doubles for the C++ steppers and the rest solver (FixedStep.cpp), IR nodes for
// the fused RK4 kernel (Fuse.cpp). Both compute the same operations in the same order, so a
// fused step gives the C++ step's numbers bit for bit.
#pragma once
#include "IR.h"

#include <cstddef>

namespace saltpan {

/// Plain double arithmetic, the `Math` of the C++ steppers.
struct DoubleMath {
  using Value = double;
  static double constant(double x) { return x; }
  static double add(double a, double b) { return a + b; }
  static double sub(double a, double b) { return a - b; }
  static double mul(double a, double b) { return a * b; }
  static double div(double a, double b) { return a / b; }
  static double neg(double a) { return -a; }
};

/// The membrane current density of compartment c (A/m2, outward): G V - GE + Iother, from the
/// states `y(s)` and the kernel outputs `out(slot)` at them.
template <class Math, class State, class Output>
typename Math::Value membraneCurrent(Math &m, const ir::Compartment &c, State y, Output out) {
  return m.add(m.sub(m.mul(out(c.gOutput), y(c.voltageState)), out(c.geOutput)), out(c.iOtherOutput));
}

/// dy/dt of every state into `dydt`, from the states `y(s)`, the kernel outputs `out(slot)` at
/// them and each compartment's capacitance `capacitance(c)` (F/m2). A clamp is the caller's:
/// a clamped potential does not move.
template <class Math, class State, class Output, class Capacitance>
void timeDerivative(Math &m, const ir::Model &model, State y, Output out, Capacitance capacitance,
                    typename Math::Value *dydt) {
  for (const ir::Gate &g : model.gates)
    dydt[g.state] = m.div(m.sub(out(g.infOutput), y(g.state)), out(g.tauOutput));
  for (const ir::Pool &pool : model.pools)
    dydt[pool.state] = out(pool.derivativeOutput);
  for (const ir::Compartment &c : model.compartments)
    dydt[c.voltageState] = m.div(m.neg(membraneCurrent(m, c, y, out)), capacitance(c));
  // Axial currents between joined compartments, as densities of each end's membrane.
  for (const ir::Junction &j : model.junctions) {
    const ir::Compartment &parent = model.compartments[static_cast<size_t>(j.parent)];
    const ir::Compartment &child = model.compartments[static_cast<size_t>(j.child)];
    auto flow = m.mul(m.constant(j.conductance), m.sub(y(child.voltageState), y(parent.voltageState))); // A
    auto &dParent = dydt[parent.voltageState], &dChild = dydt[child.voltageState];
    dParent = m.add(dParent, m.div(flow, m.mul(m.constant(parent.area), capacitance(parent))));
    dChild = m.sub(dChild, m.div(flow, m.mul(m.constant(child.area), capacitance(child))));
  }
}

/// One classical RK4 step of length h over n states, y advanced in place. `slope(stage, states,
/// time, dydt)` writes the derivative at (states, time) for stage 0..3 (stage 0 is at y and
/// `start`; the caller may reuse what it knows there); stages 1 and 2 are at `half`, stage 3
/// at `end`. `k1`..`k4` and `tmp` hold n values each.
template <class Math, class Slope>
void rungeKutta4Step(Math &m, size_t n, typename Math::Value *y, double h, typename Math::Value start,
                     typename Math::Value half, typename Math::Value end, Slope slope, typename Math::Value *k1,
                     typename Math::Value *k2, typename Math::Value *k3, typename Math::Value *k4,
                     typename Math::Value *tmp) {
  auto along = [&](const typename Math::Value *k, double by) { // tmp = y + by * k
    for (size_t i = 0; i < n; ++i)
      tmp[i] = m.add(y[i], m.mul(m.constant(by), k[i]));
  };
  slope(0, y, start, k1);
  along(k1, 0.5 * h);
  slope(1, tmp, half, k2);
  along(k2, 0.5 * h);
  slope(2, tmp, half, k3);
  along(k3, h);
  slope(3, tmp, end, k4);
  auto two = m.constant(2), sixth = m.constant(h / 6);
  for (size_t i = 0; i < n; ++i)
    y[i] = m.add(y[i], m.mul(sixth, m.add(m.add(m.add(k1[i], m.mul(two, k2[i])), m.mul(two, k3[i])), k4[i])));
}

} // namespace saltpan
