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

  /// The model without a protocol (no stimuli, every V recorded) that steady states and
  /// sweep parameters are read from: lowered on first use (after compileFile) and kept.
  /// nullptr when it cannot be lowered; what lowering reported is unstimulatedDiagnostics().
  const ir::Model *unstimulated();
  const DiagnosticEngine &unstimulatedDiagnostics();

private:
  struct Unstimulated {
    ir::Model model;
    DiagnosticEngine diags; // kept apart: most callers do not report them
    bool lowered = false;
  };
  // Both set on first use, from the main thread.
  mutable std::optional<std::string> modelHash_;
  std::optional<Unstimulated> unstimulated_;
  Unstimulated &lowerUnstimulated();
};

/// Runs every stage on the file at `path`; stops after the first stage with errors.
void compileFile(const std::string &path, Compilation &c);
/// The same on in-memory text named `path` (tests, fuzzing).
void compileText(const std::string &path, std::string text, Compilation &c);

} // namespace saltpan
