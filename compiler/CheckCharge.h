// CheckCharge.h - Stage 6: charge and stoichiometry.
//
// Valences, the ions channels carry and pumps move, the current a pump's cycle implies,
// and the electroneutrality of every solution. Reads Analyze's values.
#pragma once
#include "AST.h"

namespace saltpan {
class DiagnosticEngine;
struct AnalyzedModel;

/// Returns false if it reported an error (warnings do not count).
bool checkCharge(const ast::Program &program, const AnalyzedModel &model, DiagnosticEngine &diags);
} // namespace saltpan
