// CheckCables.h - Stage 8b: whether each cable is cut finely enough for its length constant at
// rest (which needs the lowered kernel: the membrane's conductance at the initial state).
#pragma once
#include "Analyze.h"
#include "IR.h"

namespace saltpan {
class DiagnosticEngine;

/// Warns for each cable whose pieces are longer than its length constant at rest,
/// lambda = sqrt(d / (4 Ri G)), G the membrane's conductance density at the initial state of
/// `lowered` (any lowering of `model`). Returns false if it reported an error (it reports none).
/// Fills each cable's CableValues::lengthConstant.
bool checkCables(AnalyzedModel &model, const ir::Model &lowered, DiagnosticEngine &diags);

/// Each cable's membrane at the initial state of `lowered` (any lowering of `model`): its
/// conductance density and capacitance, which cutting by the length constant needs.
CableMembranes cableMembranes(const AnalyzedModel &model, const ir::Model &lowered);

} // namespace saltpan
