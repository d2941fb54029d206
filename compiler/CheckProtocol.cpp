// CheckProtocol.cpp - Stage 8a: after each protocol is lowered, its method and timing.
#include "CheckProtocol.h"

#include "Diagnostics.h"
#include "Evaluate.h"
#include "RunSettings.h"

namespace saltpan {

using namespace ast;

namespace {

constexpr size_t largestRosenbrockTree = 400;

class ProtocolChecker {
public:
  ProtocolChecker(const ir::Model &lowered, Evaluator &evaluator, DiagnosticEngine &diags)
      : lowered_(lowered), evaluator_(evaluator), diags_(diags) {}

  void check(const ProtocolDecl &p) {
    size_t errorsBefore = diags_.errorCount();
    if (p.method == IntegrationMethod::Unknown) {
      auto &d = diags_.error(p.methodRange, "unknown method '" + p.methodText + "'");
      DiagnosticEngine::note(d, {}, "the methods are " + integrationMethodNames());
    }
    // An unknown name leaves the default of a written method, exponential Euler.
    bool exponentialEuler = p.method == IntegrationMethod::ExponentialEuler || p.method == IntegrationMethod::Unknown;
    if (exponentialEuler && !lowered_.junctions.empty()) {
      auto &d = diags_.error(p.methodRange,
                             "exponential_euler steps each compartment alone; this cell's compartments are joined");
      DiagnosticEngine::note(d, {}, "use crank_nicolson (the default for joined compartments) or backward_euler");
    }
    // Rosenbrock factors the dense Jacobian of every state at each step: O(n^3), minutes a step
    // for a large tree, where the implicit tree methods take O(n).
    if (p.method == IntegrationMethod::Rosenbrock && !lowered_.junctions.empty() &&
        lowered_.stateNames.size() > largestRosenbrockTree) {
      auto &d = diags_.error(p.methodRange, "rosenbrock solves a dense system of all " +
                                                std::to_string(lowered_.stateNames.size()) +
                                                " states at every step; a tree may have at most " +
                                                std::to_string(largestRosenbrockTree) + " for it");
      DiagnosticEngine::note(d, {}, "use crank_nicolson (the default for joined compartments) or backward_euler");
    }
    if (p.step)
      if (auto v = time(p.step.get()); !v || *v <= 0)
        diags_.error(p.step->range, "the step must be positive");
    if (p.tolerance)
      if (auto v = time(p.tolerance.get()); !v || *v <= 0 || *v >= 1)
        diags_.error(p.tolerance->range, "the tolerance must lie between 0 and 1");
    if (!p.duration)
      diags_.error(p.nameRange, "protocol '" + p.name + "' has no duration");
    else if (auto v = time(p.duration.get()); !v || *v <= 0)
      diags_.error(p.duration->range, "the duration must be positive");
    if (p.every)
      if (auto v = time(p.every.get()); !v || *v <= 0)
        diags_.error(p.every->range, "the recording interval must be positive");
    if (diags_.errorCount() == errorsBefore && p.duration)
      timing(p);
  }

private:
  const ir::Model &lowered_;
  Evaluator &evaluator_;
  DiagnosticEngine &diags_;

  std::optional<double> time(const Expr *e) { return e ? evaluator_.evaluate(*e, {}) : std::nullopt; }

  // The counts a run derives from its timing (steps, samples) must be whole and bounded, or
  // the steppers would stop early or record the wrong samples while claiming success.
  void timing(const ProtocolDecl &p) {
    auto problem = checkTiming(lowered_.protocol);
    if (!problem)
      return;
    using Field = TimingProblem::Field;
    const Expr *at = problem->field == Field::Step    ? p.step.get()
                     : problem->field == Field::Every ? (p.every ? p.every.get() : p.step.get())
                                                      : p.duration.get();
    auto &d = diags_.error(at ? at->range : p.duration->range, problem->message);
    if (!problem->note.empty())
      DiagnosticEngine::note(d, {}, problem->note);
    if (problem->field == Field::Duration && p.step)
      DiagnosticEngine::note(d, p.step->range, "the step is given here");
    if (problem->field == Field::Every && !p.every)
      DiagnosticEngine::note(d, {}, "without 'every', the recording interval is the step");
  }
};

} // namespace

bool checkProtocol(const ProtocolDecl &p, const ir::Model &lowered, Evaluator &evaluator, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  ProtocolChecker(lowered, evaluator, diags).check(p);
  return diags.errorCount() == before;
}

} // namespace saltpan
