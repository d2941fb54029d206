// Parse.h - Stage 1: text -> AST. The only stage that sees ANTLR; its types stop here.
#pragma once
#include "../AST.h"

#include <memory>

namespace saltpan {
class DiagnosticEngine;

/// Parses one file. Returns nullptr when the file has syntax errors (all reported);
/// otherwise a module whose semantic slips found while building (unknown units, repeated
/// clauses) are reported and marked in the tree.
std::unique_ptr<ast::Module> parse(const SourceFile &file, DiagnosticEngine &diags);

/// One token as the lexer sees it, for `saltpan check --emit tokens`.
std::string dumpTokens(const SourceFile &file);
} // namespace saltpan
