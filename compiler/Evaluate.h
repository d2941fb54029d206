// Evaluate.h - evaluates checked expressions to numbers in coherent SI.
//
// Used by Analyze for every static value (concentrations, densities, geometry) and by
// CheckPhysics to sample gate kinetics over a voltage range. Needs Resolve and CheckUnits.
#pragma once
#include "AST.h"

#include <functional>
#include <map>
#include <optional>
#include <string>

namespace saltpan {

/// What the surroundings of an expression provide. Missing pieces make evaluation fail.
struct EvalEnv {
  std::optional<double> V; // membrane potential, volts
  std::optional<double> T; // temperature, kelvin
  /// Concentration of an ion on one side (mol/m^3), or nullopt if the compartment lacks it.
  std::function<std::optional<double>(const ast::IonDecl *, ast::Side)> concentration;
  /// Reversal potential of an ion (volts), or nullopt.
  std::function<std::optional<double>(const ast::IonDecl *)> reversal;
};

struct EvalFailure {
  SourceRange range;
  std::string reason; // "needs the membrane potential", "division by zero", ...
  const ast::IonDecl *missingIon = nullptr; // set when a concentration or reversal was missing
};

class Evaluator {
public:
  /// Evaluates `e`; on failure returns nullopt and, if given, fills `failure`.
  std::optional<double> evaluate(const ast::Expr &e, const EvalEnv &env, EvalFailure *failure = nullptr);
  /// Value of a constant, computed once.
  std::optional<double> constant(const ast::ConstDecl &c, EvalFailure *failure = nullptr);

private:
  struct Frame;
  double eval(const ast::Expr &e, const EvalEnv &env, const Frame *frame);
  std::map<const ast::ConstDecl *, std::optional<double>> constants_;
  EvalFailure failure_;
};

} // namespace saltpan
