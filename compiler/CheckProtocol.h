// CheckProtocol.h - Stage 8a: a protocol's own settings, checked on the model lowered for it.
//
// The method (known, and able to step the lowered cell), step, tolerance, duration and recording
// interval, and the counts a run derives from them. Record targets are checked by Lower.
#pragma once
#include "AST.h"
#include "IR.h"

namespace saltpan {
class DiagnosticEngine;
class Evaluator;

/// Checks protocol `p` against `lowered`, the model Lower built for it. Returns false if it
/// reported an error; the model then must not be run.
bool checkProtocol(const ast::ProtocolDecl &p, const ir::Model &lowered, Evaluator &evaluator, DiagnosticEngine &diags);
} // namespace saltpan
