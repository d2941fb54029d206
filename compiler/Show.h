// Show.h - the resolved model as text or JSON (`brine show`). Reads Analyze's Model only.
#pragma once
#include <string>

namespace brine {
struct Compilation;

/// JSON document; keys are documented in docs/language.md ("brine show").
std::string showJson(const Compilation &c);
/// A readable summary with the same content.
std::string showText(const Compilation &c);
} // namespace brine
