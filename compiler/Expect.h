// Expect.h - Stage 11: expectations. checkExpectations (run by every `brine check`)
// validates each expectation: a known measure, arguments of the right kind, expected values
// in the measure's dimension. runExpectations (run by `brine test`) measures each one, running
// protocols and steady-state searches as needed, and compares.
#pragma once
#include "AST.h"
#include "Run.h"

#include <functional>
#include <optional>
#include <string>
#include <vector>

namespace brine {
class DiagnosticEngine;
struct Compilation;

/// Returns false if it reported an error.
bool checkExpectations(Compilation &c, DiagnosticEngine &diags);

struct ExpectResult {
  const ast::ExpectDecl *decl = nullptr;
  bool passed = false;
  std::optional<double> measured; // SI
  std::string measuredText;       // "68.216 Hz", or why nothing could be measured
  std::string expectedText;       // "67 Hz to 69 Hz", "-64.996 mV within 0.001 mV"
};

/// Measures and judges every expectation of the program, in declaration order. Protocols
/// run once each; `compile` (may be empty) makes their kernels native.
std::vector<ExpectResult> runExpectations(Compilation &c, const KernelCompiler &compile);

/// Every expectation of the program, in declaration order.
std::vector<const ast::ExpectDecl *> expectations(const ast::Program &program);
} // namespace brine
