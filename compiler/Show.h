// Show.h - the resolved model as text or JSON (`saltpan show`). Reads Analyze's Model only.
#pragma once
#include <string>

namespace saltpan {
struct Compilation;

/// JSON document; keys are documented in docs/language.md ("saltpan show").
std::string showJson(const Compilation &c);
/// A readable summary with the same content.
std::string showText(const Compilation &c);
} // namespace saltpan
