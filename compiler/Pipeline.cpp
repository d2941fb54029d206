// Pipeline.cpp - parse and load, resolve, units, analyze, charge, physics, lower and check each
// protocol, expectations, sweeps: in that order.
#include "Pipeline.h"

#include "CheckCables.h"
#include "CheckCharge.h"
#include "CheckPhysics.h"
#include "CheckProtocol.h"
#include "CheckUnits.h"
#include "Expect.h"
#include "Lower.h"
#include "ModelHash.h"
#include "Modules.h"
#include "Sweep.h"

#include <filesystem>

namespace saltpan {

namespace {

// A cable cut by its length constant needs its membrane at rest, which needs a lowered model:
// a first, quiet analysis cuts it into one piece and is lowered to find the membrane; the
// analysis that counts (and reports) then cuts it. Without such a cable, one analysis.
bool analyzeCutting(Compilation &c) {
  if (!cutsByLengthConstant(c.symbols))
    return analyze(c.program, c.symbols, c.evaluator, c.diags, c.model);
  std::optional<CableMembranes> membranes;
  {
    DiagnosticEngine quiet;
    AnalyzedModel provisional;
    ir::Model lowered;
    if (analyze(c.program, c.symbols, c.evaluator, quiet, provisional) &&
        lowerModel(c.program, provisional, c.evaluator, nullptr, quiet, lowered))
      membranes = cableMembranes(provisional, lowered);
  }
  return analyze(c.program, c.symbols, c.evaluator, c.diags, c.model, membranes ? &*membranes : nullptr);
}

void run(const SourceFile &root, Compilation &c) {
  if (!loadProgram(root, c.sources, c.diags, c.program))
    return;
  // Resolve and CheckUnits both run before stopping: a name error leaves its expression
  // "unknown", which CheckUnits never reports again.
  bool resolved = resolveNames(c.program, c.symbols, c.diags);
  // Unit checking follows chains of constants recursively; Resolve bounded their depth.
  bool units = !c.symbols.chainTooDeep && checkUnits(c.program, c.evaluator, c.diags);
  if (!resolved || !units)
    return;
  if (!analyzeCutting(c))
    return;
  bool charge = checkCharge(c.program, c.model, c.diags);
  bool physics = checkPhysics(c.program, c.model, c.evaluator, c.diags);
  if (!charge || !physics)
    return;
  // Every protocol is lowered once, so `check` finds what `run` would refuse, and then its
  // settings are checked on what was lowered for it (joined compartments, the timing).
  bool lowered = true;
  for (const ast::ProtocolDecl *p : protocols(c.program)) {
    ir::Model model;
    bool ok = lowerModel(c.program, c.model, c.evaluator, p, c.diags, model);
    ok = lowerable(c.model) && checkProtocol(*p, model, c.evaluator, c.diags) && ok;
    if (ok)
      c.lowered.emplace(p, std::move(model));
    else
      lowered = false;
  }
  if (lowered && !c.model.cables.empty()) // at rest: the model without stimuli
    if (const ir::Model *rest = c.unstimulated())
      checkCables(c.model, *rest, c.diags);
  bool expectations = lowered && checkExpectations(c, c.diags);
  bool sweeps = expectations && checkSweeps(c, c.diags);
  c.checked = lowered && expectations && sweeps && c.diags.errorCount() == 0;
}

} // namespace

const std::string &Compilation::modelHash() const {
  if (!modelHash_) {
    modelHash_ = "unknown";
    if (program.root && program.root->file) {
      DiagnosticEngine quiet; // `saltpan hash` reports why a module has no canonical form
      if (auto h = hashProgram(program, program.root->file->path(), quiet))
        modelHash_ = h->hash;
    }
  }
  return *modelHash_;
}

Compilation::Unstimulated &Compilation::lowerUnstimulated() {
  if (!unstimulated_) {
    unstimulated_.emplace();
    unstimulated_->lowered = lowerModel(program, model, evaluator, nullptr, unstimulated_->diags, unstimulated_->model);
  }
  return *unstimulated_;
}

const ir::Model *Compilation::unstimulated() {
  Unstimulated &u = lowerUnstimulated();
  return u.lowered ? &u.model : nullptr;
}

const DiagnosticEngine &Compilation::unstimulatedDiagnostics() { return lowerUnstimulated().diags; }

void compileFile(const std::string &path, Compilation &c) {
  std::error_code ec;
  if (std::filesystem::is_directory(path, ec)) {
    c.diags.error({}, "'" + path + "' is a directory, not a spec file");
    return;
  }
  std::string error;
  const SourceFile *file = c.sources.load(path, error);
  if (!file) {
    c.diags.error({}, "cannot read '" + path + "': " + error);
    return;
  }
  run(*file, c);
}

void compileText(const std::string &path, std::string text, Compilation &c) {
  run(*c.sources.add(path, std::move(text)), c);
}

} // namespace saltpan
