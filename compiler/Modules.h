// Modules.h - Stage 2: loads the root spec and every module it uses, each file once.
//
// `use std.x` names an embedded stdlib module; `use "file.saltpan"` a path relative to the
// using file, read only inside its folder or the module search path (SALTPAN_MODULE_PATH).
// A cycle of uses is an error that lists the chain.
#pragma once
#include "AST.h"

#include <string>
#include <vector>

namespace saltpan {
class DiagnosticEngine;
class SourceManager;

/// Loads `root` and its uses into `program` (dependencies first, root last).
/// Returns false when any file could not be read or parsed (all reported).
bool loadProgram(const SourceFile &root, SourceManager &sources, DiagnosticEngine &diags,
                 ast::Program &program);

struct StdModule {
  const char *name; // "std.ions"
  const char *path; // "stdlib/ions.saltpan", how diagnostics name it
  const char *text;
};
/// The embedded standard library.
const std::vector<StdModule> &stdModules();
} // namespace saltpan
