// EmitStage.cpp - `saltpan check --emit STAGE [--protocol NAME] FILE`: one stage's output, read
// from the compilation (never recomputed), so what is shown is what `run` uses.
#include "Commands.h"

#include "FixedStep.h"
#include "JIT.h"
#include "KernelPlan.h"
#include "Lower.h"
#include "ModelFile.h"
#include "Pipeline.h"
#include "parse/Parse.h"

#include <cstdio>
#include <set>

namespace saltpan::cli {

namespace {

void printDiagnostics(const DiagnosticEngine &diags, bool colour) {
  for (const Diagnostic &d : diags.all())
    std::fputs(renderText(d, colour).c_str(), stderr);
}

bool clamped(const ir::Model &model) {
  for (const ir::Compartment &c : model.compartments)
    if (c.clampedOutput >= 0)
      return true;
  return false;
}

} // namespace

bool isEmitStage(const std::string &stage) {
  for (const char *s : emitStages)
    if (stage == s)
      return true;
  return false;
}

int emitStage(const std::string &stage, const std::string &protocolName, const std::string &path, bool colour) {
  if (stage == "tokens" || stage == "ast") {
    // The front end alone, so a file that later stages reject can still be looked at.
    Compilation c;
    std::string error;
    const SourceFile *file = c.sources.load(path, error);
    if (!file) {
      std::fprintf(stderr, "saltpan: cannot read '%s': %s\n", path.c_str(), error.c_str());
      return BadInput;
    }
    if (stage == "tokens") {
      std::fputs(dumpTokens(*file).c_str(), stdout);
      return Ok;
    }
    auto module = parse(*file, c.diags);
    printDiagnostics(c.diags, colour);
    if (!module)
      return BadInput;
    std::fputs(ast::dump(*module).c_str(), stdout);
    return c.diags.errorCount() ? BadInput : Ok;
  }

  Compilation c;
  compileFile(path, c);
  printDiagnostics(c.diags, colour);
  if (c.diags.errorCount() > 0)
    return BadInput;
  if (stage == "resolved") {
    std::fputs(ast::dumpResolved(c.program).c_str(), stdout);
    return Ok;
  }
  if (stage == "values") {
    std::fputs(dumpValues(c.model).c_str(), stdout);
    return Ok;
  }

  // The lowered stages: the chosen protocol's model as check lowered it (the first protocol
  // by default), or the model without stimuli when the spec has no protocol.
  auto all = protocols(c.program);
  const ast::ProtocolDecl *protocol = nullptr;
  if (!protocolName.empty()) {
    protocol = namedProtocol(c, protocolName, path);
    if (!protocol)
      return BadUsage;
  } else if (!all.empty()) {
    // The spec's own first protocol; a spec whose only protocols are in modules it uses shows
    // the first of those.
    protocol = all.front();
    for (const ast::ProtocolDecl *p : all)
      if (p->range.begin.file == c.program.root->file) {
        protocol = p;
        break;
      }
  }
  const ir::Model *model = nullptr;
  if (protocol) {
    if (!(model = loweredModel(c, *protocol)))
      return InternalFault;
  } else if (!(model = c.unstimulated())) {
    printDiagnostics(c.diags, colour);
    printDiagnostics(c.unstimulatedDiagnostics(), colour);
    return BadInput;
  }
  if (stage == "ir") {
    std::fputs(ir::dump(*model).c_str(), stdout);
    return Ok;
  }
  // The kernels a run of the protocol compiles, in that order; for the fused IR also those a
  // sweep steps its lanes with (their IR is the same at any lane count).
  std::vector<KernelPlan> plans{planKernels(*model, KernelUse::Run)};
  if (stage == "fused-ir")
    plans.push_back(planKernels(*model, KernelUse::Lanes, 2));
  std::vector<KernelPlan::Entry> kernels;
  std::set<uint64_t> seen;
  for (const KernelPlan &plan : plans)
    for (const KernelPlan::Entry &e : plan.entries())
      if ((stage != "fused-ir" || e.kernel != (plan.plain ? &*plan.plain : nullptr)) &&
          seen.insert(kernelFingerprint(*e.kernel)).second)
        kernels.push_back(e);
  if (stage == "fused-ir") {
    if (kernels.empty()) {
      std::fprintf(stderr,
                   "saltpan: error: %s has no fused kernel: method %s%s steps the model kernel (see --emit ir)\n",
                   protocol ? ("protocol '" + protocol->name + "'").c_str() : "the model without a protocol",
                   ir::methodName(model->protocol.method), clamped(*model) ? " with a voltage clamp" : "");
      return BadUsage;
    }
    for (const KernelPlan::Entry &k : kernels)
      std::printf("kernel %s\n%s", k.label.c_str(), ir::dumpKernel(*k.kernel).c_str());
    return Ok;
  }
  std::string error;
  auto jit = JIT::create(error);
  if (!jit) {
    std::fprintf(stderr, "saltpan: internal error: the JIT failed: %s\n", error.c_str());
    return InternalFault;
  }
  for (const KernelPlan::Entry &k : kernels) {
    if (!jit->compile(*k.kernel, error)) {
      std::fprintf(stderr, "saltpan: internal error: the JIT failed: %s\n", error.c_str());
      return InternalFault;
    }
    std::printf("; saltpan kernel: %s\n", k.label.c_str());
    std::fputs((stage == "llvm" ? jit->lastIR() : jit->lastUnoptimisedIR()).c_str(), stdout);
  }
  return Ok;
}

} // namespace saltpan::cli
