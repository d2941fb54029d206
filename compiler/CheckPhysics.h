// CheckPhysics.h - Stage 7: physical plausibility.
//
// Values a modeller would want flagged: non-positive concentrations or sizes, temperatures
// and capacitances outside their usual ranges, hand-written reversal potentials that the
// stated concentrations contradict, and gate kinetics that leave their range anywhere
// from -150 to +100 mV. Reads Analyze's values.
#pragma once
#include "AST.h"

namespace saltpan {
class DiagnosticEngine;
class Evaluator;
struct AnalyzedModel;

/// Returns false if it reported an error (warnings do not count).
bool checkPhysics(const ast::Program &program, const AnalyzedModel &model, Evaluator &evaluator,
                  DiagnosticEngine &diags);
} // namespace saltpan
