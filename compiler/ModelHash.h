// ModelHash.h - the SHA-256 that names a model exactly: the tool version, then every module
// the spec uses (in load order) as its canonical form without comments. Reformatting and
// comment edits keep it; any changed number changes it. `saltpan hash` prints it, and every
// report and JSON output carries it.
#pragma once
#include "AST.h"

#include <optional>
#include <string>
#include <utility>
#include <vector>

namespace saltpan {
class DiagnosticEngine;

struct ModelHash {
  std::string hash; // "sha256:<64 hex digits>"
  std::vector<std::pair<std::string, std::string>> modules; // (hashed name, its own hash)
};

/// Hashes a loaded program whose root file is `rootPath`; nullopt (with diagnostics) when
/// a module cannot be put in canonical form.
std::optional<ModelHash> hashProgram(const ast::Program &program, const std::string &rootPath, DiagnosticEngine &diags);
} // namespace saltpan
