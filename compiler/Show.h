// Show.h - the resolved model as text or JSON (`saltpan show`): Analyze's AnalyzedModel, and the steady
// states of each compartment (Rest.h) beside the GHK potential of its ungated permeabilities.
#pragma once
#include "Rest.h"

#include <string>
#include <vector>

namespace saltpan {
struct Compilation;

/// What `show` found at rest: lone compartments' steady states (`each`), and, when compartments
/// are joined, each tree's steady states (`trees`, found on `model`, which names the pieces).
/// Both are empty when the model could not be analysed.
struct ShownRest {
  std::vector<rest::CompartmentRest> each;
  std::vector<rest::TreeRest> trees;
  const ir::Model *model = nullptr;
};

/// JSON document; keys are documented in docs/language.md ("saltpan show").
std::string showJson(const Compilation &c, const ShownRest &rest);
/// A readable summary with the same content.
std::string showText(const Compilation &c, const ShownRest &rest);
} // namespace saltpan
