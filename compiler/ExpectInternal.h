// ExpectInternal.h - what the two halves of stage 11 (ExpectCheck.cpp, ExpectMeasure.cpp) share;
// not a public header: the table of measures, and how a measure's arguments and dimension are read.
#pragma once
#include "AST.h"
#include "Analyze.h"
#include "Expect.h"
#include "IR.h"
#include "Units.h"

#include <optional>
#include <string>
#include <vector>

namespace saltpan {
struct Compilation;
}

namespace saltpan::expectation {

enum class Arg { Ion, Compartment, Pump, Trace, Threshold, Time, File };

struct MeasureSpec {
  const char *name;
  bool protocol; // measured on a protocol's run
  std::vector<Arg> args;
  size_t required;       // leading args that must be given
  const char *dimension; // "voltage", "area", "none", "rate", "time", "resistance", or "trace"
  const char *description;
};

/// Every measure an expectation or a sweep can name.
const std::vector<MeasureSpec> &measureSpecs();
/// The measure called `name`, or nullptr.
const MeasureSpec *findMeasure(const std::string &name);
/// What Analyze computed for the compartment an argument names, or nullptr when it names none.
const CompartmentValues *compartmentOf(const AnalyzedModel &m, const ast::ExpectArg &a);
/// The model lowered for protocol `p`, or nullptr.
const ir::Model *loweredFor(const Compilation &c, const ast::ProtocolDecl *p);
/// The dimension a measure's value has, or nullopt when it cannot be known (reported).
std::optional<Dimension> measureDimension(const Compilation &c, const ast::ExpectDecl &e, const MeasureSpec &spec);

} // namespace saltpan::expectation
