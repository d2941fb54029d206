// Format.h - the canonical layout of a spec (`saltpan fmt`) and its comment-free form (`saltpan
// hash`). Works on the token stream and parse tree, so it lives in parse/; no ANTLR types here.
#pragma once
#include <optional>
#include <string>

namespace saltpan {
class DiagnosticEngine;
class SourceFile;

/// The file in canonical layout (docs/language.md, "Canonical layout"), every comment kept.
/// Returns nullopt when the file has syntax errors (reported to `diags`). Idempotent.
std::optional<std::string> formatSpec(const SourceFile &file, DiagnosticEngine &diags);

/// The canonical layout with no comments, no kept blank lines and no kept line breaks: a
/// function of the tokens alone, so reformatting the file or editing its comments does not
/// change it. Returns nullopt when the file has syntax errors (reported to `diags`).
std::optional<std::string> bareSpec(const SourceFile &file, DiagnosticEngine &diags);

} // namespace saltpan
