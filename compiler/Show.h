// Show.h - the resolved model as text or JSON (`saltpan show`): Analyze's AnalyzedModel, and the steady
// states of each compartment (Rest.h) beside the GHK potential of its ungated permeabilities.
#pragma once
#include "Rest.h"

#include <string>
#include <vector>

namespace saltpan {
struct Compilation;

/// JSON document; keys are documented in docs/language.md ("saltpan show"). `steady` holds
/// each compartment's steady states (empty when the model could not be analysed).
std::string showJson(const Compilation &c, const std::vector<rest::CompartmentRest> &steady);
/// A readable summary with the same content.
std::string showText(const Compilation &c, const std::vector<rest::CompartmentRest> &steady);
} // namespace saltpan
