// CheckCables.cpp - Stage 8b: pieces against the length constant.
#include "CheckCables.h"

#include "Decimal.h"
#include "Diagnostics.h"
#include "Interpret.h"

#include <cmath>

namespace saltpan {

bool checkCables(AnalyzedModel &model, const ir::Model &lowered, DiagnosticEngine &diags) {
  if (model.cables.empty() || lowered.compartments.size() != model.compartments.size())
    return true;
  Interpreter kernel(lowered.kernel);
  std::vector<double> out(lowered.kernel.outputs.size());
  kernel.run(lowered.initialState.data(), lowered.params.data(), 0, out.data());
  auto um = [](double metres) { return shortestDecimal(tidyDecimal(metres * 1e6)) + " um"; };
  for (CableValues &cable : model.cables) {
    const ir::Compartment &first = lowered.compartments[cable.first];
    double g = out[static_cast<size_t>(first.gOutput)]; // S/m2, the conductance channels at rest
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
