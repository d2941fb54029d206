// CheckCables.cpp - Stage 8b: pieces against the length constant.
#include "CheckCables.h"

#include "Decimal.h"
#include "Diagnostics.h"
#include "Interpret.h"

#include <cmath>

namespace saltpan {

CableMembranes cableMembranes(const AnalyzedModel &model, const ir::Model &lowered) {
  CableMembranes membranes;
  if (model.cables.empty() || lowered.compartments.size() != model.compartments.size())
    return membranes;
  Interpreter kernel(lowered.kernel);
  std::vector<double> out(lowered.kernel.outputs.size());
  kernel.run(lowered.initialState.data(), lowered.params.data(), 0, out.data());
  for (const CableValues &cable : model.cables) {
    const ir::Compartment &first = lowered.compartments[cable.first];
    CableMembraneAtRest &m = membranes[cable.decl];
    m.conductance = out[static_cast<size_t>(first.gOutput)]; // the conducting channels at rest
    m.capacitance = model.compartments[cable.first].capacitance.value_or(0);
  }
  return membranes;
}

bool checkCables(AnalyzedModel &model, const ir::Model &lowered, DiagnosticEngine &diags) {
  CableMembranes membranes = cableMembranes(model, lowered);
  auto um = [](double metres) { return shortestDecimal(tidyDecimal(metres * 1e6)) + " um"; };
  for (CableValues &cable : model.cables) {
    auto found = membranes.find(cable.decl);
    double g = found == membranes.end() ? 0 : found->second.conductance; // S/m2
    if (!(g > 0))
      continue;
    double lambda = std::sqrt(cable.diameterAt(0.5 * cable.pieceLength()) / (4 * cable.axialResistivity * g));
    cable.lengthConstant = lambda;
    if (cable.pieceLength() <= lambda)
      continue;
    const ast::CableShape &shape = *cable.decl->cable;
    auto &d = diags.warning(shape.piecesRange.valid() ? shape.piecesRange : cable.decl->nameRange,
                            "the pieces of cable '" + cable.decl->name + "' are " + um(cable.pieceLength()) +
                                " long, longer than its length constant at rest, " + um(lambda));
    DiagnosticEngine::note(d, {},
                           "a potential changes along a piece but the piece holds one value; pieces under a "
                           "tenth of the length constant are common practice");
  }
  return true;
}

} // namespace saltpan
