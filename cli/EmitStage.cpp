// EmitStage.cpp - `saltpan check --emit STAGE [--protocol NAME] FILE`: one stage's output, read
// from the compilation (never recomputed), so what is shown is what `run` uses.
#include "Commands.h"

#include "FixedStep.h"
#include "Fuse.h"
#include "JIT.h"
#include "Lower.h"
#include "Pipeline.h"
#include "parse/Parse.h"

#include <cstdio>

namespace saltpan::cli {

namespace {

void printDiagnostics(const DiagnosticEngine &diags, bool colour) {
  for (const Diagnostic &d : diags.all())
    std::fputs(renderText(d, colour).c_str(), stderr);
}

struct NamedKernel {
  std::string label;
  const ir::Kernel *kernel;
};

// The kernels a run of `model` compiles, in the order it compiles them.
std::vector<NamedKernel> runKernels(const ir::Model &model, std::vector<ir::Kernel> &storage, bool fusedOnly) {
  storage.clear();
  storage.reserve(2);
  if (model.protocol.method == ir::Method::ExponentialEuler) {
    if (auto fused = fuseExponentialEuler(model, model.protocol.step)) {
      storage.push_back(std::move(*fused));
      if (model.pools.empty() && model.protocol.every > model.protocol.step * 1.5)
        if (auto stateOnly = fuseExponentialEuler(model, model.protocol.step, false))
          storage.push_back(std::move(*stateOnly));
    }
  }
  std::vector<NamedKernel> out;
  if (!storage.empty())
    out.push_back({"fused exponential Euler step (next state, then every output)", &storage[0]});
  if (storage.size() > 1)
    out.push_back({"fused exponential Euler step, next state only (steps between recordings)", &storage[1]});
  if (!fusedOnly && (storage.empty() || StepGrid(model).meetsEvents()))
    out.push_back({storage.empty() ? "model kernel" : "model kernel (steps that meet a stimulus edge)", &model.kernel});
  return out;
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
  ir::Model unstimulated;
  const ir::Model *model = nullptr;
  if (protocol) {
    auto it = c.lowered.find(protocol);
    if (it == c.lowered.end()) {
      std::fprintf(stderr, "saltpan: internal error: protocol '%s' was not lowered\n", protocol->name.c_str());
      return InternalFault;
    }
    model = &it->second;
  } else {
    if (!lowerModel(c.program, c.model, c.evaluator, nullptr, c.diags, unstimulated)) {
      printDiagnostics(c.diags, colour);
      return BadInput;
    }
    model = &unstimulated;
  }
  if (stage == "ir") {
    std::fputs(ir::dump(*model).c_str(), stdout);
    return Ok;
  }
  std::vector<ir::Kernel> storage;
  std::vector<NamedKernel> kernels = runKernels(*model, storage, stage == "fused-ir");
  if (stage == "fused-ir") {
    if (kernels.empty()) {
      std::fprintf(stderr,
                   "saltpan: error: %s has no fused kernel: method %s%s steps the model kernel (see --emit ir)\n",
                   protocol ? ("protocol '" + protocol->name + "'").c_str() : "the model without a protocol",
                   ir::methodName(model->protocol.method), clamped(*model) ? " with a voltage clamp" : "");
      return BadUsage;
    }
    for (const NamedKernel &k : kernels)
      std::printf("kernel %s\n%s", k.label.c_str(), ir::dumpKernel(*k.kernel).c_str());
    return Ok;
  }
  std::string error;
  auto jit = JIT::create(error);
  if (!jit) {
    std::fprintf(stderr, "saltpan: internal error: the JIT failed: %s\n", error.c_str());
    return InternalFault;
  }
  for (const NamedKernel &k : kernels) {
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
