// CheckUnits.h - Stage 4: unit checking.
//
// Infers a dimension for every expression and checks each against what its place in the
// spec requires (a gate's opening rate is 1/time, a density a conductance per area...).
// Needs Resolve (every name bound); Analyze and the physics checks rely on its result.
#pragma once
#include "AST.h"

namespace saltpan {
class DiagnosticEngine;
class Evaluator;

/// Sets Expr::type on every expression. Returns false if it reported an error.
bool checkUnits(ast::Program &program, Evaluator &evaluator, DiagnosticEngine &diags);
} // namespace saltpan
