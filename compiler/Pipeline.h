// Pipeline.h - the one place where the order of the stages is written.
#pragma once
#include "AST.h"
#include "Analyze.h"
#include "Diagnostics.h"
#include "Evaluate.h"
#include "IR.h"
#include "Resolve.h"
#include "Source.h"

#include <map>
#include <string>

namespace saltpan {

/// Everything one compilation of a spec produces, owned together.
struct Compilation {
  SourceManager sources;
  DiagnosticEngine diags;
  ast::Program program;
  SymbolTable symbols;
  Evaluator evaluator;
  AnalyzedModel model;
  std::map<const ast::ProtocolDecl *, ir::Model> lowered; // every protocol, lowered by check
  bool checked = false; // every stage ran without errors
};

/// Runs every stage on the file at `path`; stops after the first stage with errors.
void compileFile(const std::string &path, Compilation &c);
/// The same on in-memory text named `path` (tests, fuzzing).
void compileText(const std::string &path, std::string text, Compilation &c);

} // namespace saltpan
