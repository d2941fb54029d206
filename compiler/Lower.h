// Lower.h - Stage 8: a checked model and one of its protocols -> ir::Model.
//
// Constants, concentrations, reversal potentials and the temperature are folded into
// numbers; functions are inlined; Q10 factors multiply rates; each placed channel becomes
// gates (states) plus its share of the compartment's linearised membrane current; pumps,
// GHK currents and injected currents go into the part that is not linear in V.
// Needs every earlier stage to have passed.
#pragma once
#include "AST.h"
#include "IR.h"

namespace saltpan {
class DiagnosticEngine;
class Evaluator;
struct AnalyzedModel;

/// Lowers the model for `protocol` (nullptr: no stimulus, record every V). Returns false
/// if it reported an error (a missing initial V, an injection that ends before it starts...).
/// The protocol's own settings and records are judged afterwards, by checkProtocol.
bool lowerModel(const ast::Program &program, const AnalyzedModel &model, Evaluator &evaluator,
                const ast::ProtocolDecl *protocol, DiagnosticEngine &diags, ir::Model &out);

/// Whether the model can be lowered at all: it has a temperature and a compartment. When it
/// has not, lowerModel says so and lowers nothing, for any protocol.
bool lowerable(const AnalyzedModel &model);

/// Every protocol declared in the program, in order.
std::vector<const ast::ProtocolDecl *> protocols(const ast::Program &program);
} // namespace saltpan
