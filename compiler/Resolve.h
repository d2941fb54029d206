// Resolve.h - Stage 3: name resolution.
//
// Builds one namespace from every module of the program, binds every name, concentration,
// call, membrane entry and expectation argument to its declaration, and rejects names used where they have no
// meaning (V inside a function, a channel used as a number). CheckUnits relies on it.
#pragma once
#include "AST.h"

#include <map>
#include <string>

namespace saltpan {
class DiagnosticEngine;

/// The program's declarations by name, and its single temperature (if any).
struct SymbolTable {
  std::map<std::string, ast::Decl *> byName;
  ast::TemperatureDecl *temperature = nullptr;
  ast::ModelDecl *model = nullptr; // the root's header
  bool chainTooDeep = false;       // set by Resolve: later stages would recurse too deeply
};

/// How many constants and functions a chain of uses may pass through. Checking and lowering
/// follow such chains recursively; this bound keeps them far from the end of the stack, also
/// under AddressSanitizer, whose frames are larger.
constexpr size_t maxDependencyDepth = 256;

/// Binds every name in the program. Returns false if it reported an error.
bool resolveNames(ast::Program &program, SymbolTable &symbols, DiagnosticEngine &diags);
} // namespace saltpan
