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
#include <optional>
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

  /// The model hash (ModelHash.h) of the loaded program, "unknown" if it cannot be had;
  /// computed on first use (after compileFile) and kept, so callers never re-format the source.
  const std::string &modelHash() const;

private:
  mutable std::optional<std::string> modelHash_; // set by modelHash(), from the main thread
};

/// Runs every stage on the file at `path`; stops after the first stage with errors.
void compileFile(const std::string &path, Compilation &c);
/// The same on in-memory text named `path` (tests, fuzzing).
void compileText(const std::string &path, std::string text, Compilation &c);

} // namespace saltpan
