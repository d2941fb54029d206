// Expect.h - Stage 11: expectations. checkExpectations (ExpectCheck.cpp, run by every `saltpan check`)
// validates each expectation: a known measure, arguments of the right kind, expected values
// in the measure's dimension. runExpectations (ExpectMeasure.cpp, run by `saltpan test`) measures each one, running
// protocols and steady-state searches as needed, and compares.
#pragma once
#include "AST.h"
#include "DisplayUnits.h"
#include "Rest.h"
#include "Run.h"
#include "Units.h"

#include <cmath>

#include <functional>
#include <optional>
#include <string>
#include <vector>

namespace saltpan {
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

/// Validates one measure (of an expectation or a sweep) as checkExpectations does.
bool checkMeasure(Compilation &c, const ast::ExpectDecl &e, DiagnosticEngine &diags);
/// The dimension of a valid measure's value.
std::optional<Dimension> measuredDimension(const Compilation &c, const ast::ExpectDecl &e);
/// The unit a valid measure's value is shown in: its dimension's display unit, except that a
/// conduction velocity reads in m/s (a permeability, of the same dimension, in cm/s).
DisplayUnit measuredUnit(const Compilation &c, const ast::ExpectDecl &e);
/// Whether the measure is taken on a protocol's run (spike_count, peak, ...).
bool measuredOnRun(const ast::ExpectDecl &e);

/// A measure's arguments, evaluated once: the threshold or the time (SI), the probes of its
/// traces (a path, or at a place along a cable its piece's: "dend[44].V") and, for
/// conduction_velocity, the path distance between its two places (m, piece centre to centre).
struct MeasureArgs {
  double value = NAN;
  std::vector<std::string> traces;
  double distance = NAN;
};
/// The arguments of a measure that checkMeasure accepted.
MeasureArgs measureArgs(Compilation &c, const ast::ExpectDecl &e);
/// A run measure (not a snapshot comparison) of trace `t` recorded from `model`. Pure: safe
/// to call from several threads.
std::optional<double> traceMeasure(const ast::ExpectDecl &e, const MeasureArgs &args, const ir::Model &model,
                                   const Trace &t, std::string &why);
/// `rest` (or with `resistance`, `input_resistance`) of a compartment from a steady-state
/// analysis: the one stable steady state.
std::optional<double> restMeasure(const std::vector<rest::CompartmentRest> &analysis, const std::string &compartment,
                                  bool resistance, std::string &why);

/// Every expectation of the program, in declaration order.
std::vector<const ast::ExpectDecl *> expectations(const ast::Program &program);
} // namespace saltpan
