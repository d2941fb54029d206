// SnapshotCommand.cpp - `saltpan snapshot`: records a model's protocols into reference files
// that expectations compare later runs with (snapshot_max_error, snapshot_rms_error).
#include "Commands.h"
#include "Version.h"

#include "JIT.h"
#include "Lower.h"
#include "Pipeline.h"
#include "Run.h"

#include <cstdio>
#include <filesystem>

namespace saltpan::cli {

namespace {

const char *snapshotHelp = R"(usage: saltpan snapshot [options] FILE

Runs each protocol declared in FILE (or the one named, which may come from a used file) and
writes its recorded quantities to
<stem>.<protocol>.snapshot.csv beside FILE: comment lines starting with '#' (tool version,
model, protocol, method, step), a header "time (ms),soma.V (mV),...", then one row per
recorded sample with 12 significant digits, so a snapshot diffs line by line. Expectations
compare later runs with it:

  expect step10: snapshot_max_error(axon.V, "squid_axon_1952.step10.snapshot.csv") < 1e-6 mV

options:
  --protocol NAME          only this protocol
  --engine jit|interpreter native code (default) or the reference interpreter
  --version                print the version
  --help                   show this help

exit status: 0 success, 64 bad usage, 65 the spec has errors or a run failed, 70 internal
             fault, 73 a snapshot could not be written
)";

} // namespace

int snapshotCommand(const std::vector<std::string> &args) {
  std::string file, only, engine = "jit";
  OptionParser parser;
  addHelpAndVersion(parser, snapshotHelp);
  parser.value("--protocol", only).separateOnly();
  parser.value("--engine", engine).separateOnly();
  parser.positional(file, "snapshot takes one spec file");
  if (auto code =
          parser.parse(args, [](const std::string &message) { return usageError("saltpan", message, snapshotHelp); }))
    return *code;
  if (file.empty() || (engine != "jit" && engine != "interpreter"))
    return usageError("saltpan", file.empty() ? "no spec file given" : "--engine must be 'jit' or 'interpreter'",
                      snapshotHelp);
  Compilation c;
  if (!compileAndReport(file, c, false))
    return BadInput;
  KernelCompiler compile;
  std::unique_ptr<JIT> jit;
  if (engine == "jit")
    compile = [&jit](const ir::Kernel &k, int lanes, std::string &error) -> KernelFn {
      if (!jit)
        jit = JIT::create(error);
      return jit ? jit->compile(k, lanes, error) : nullptr;
    };
  std::filesystem::path spec(file);
  size_t written = 0;
  for (const ast::ProtocolDecl *p : protocols(c.program)) {
    // By default the root file's own protocols; a used model's need --protocol.
    bool own = false;
    for (auto &d : c.program.root->decls)
      own = own || d.get() == p;
    if (only.empty() ? !own : p->name != only)
      continue;
    const ir::Model &model = c.lowered.at(p);
    RunOutcome run = runModel(model, model.params, compile);
    if (run.failure.failed) {
      std::fprintf(stderr, "saltpan: error: protocol '%s' failed at t = %.6g ms: '%s' %s\n", p->name.c_str(),
                   run.failure.time * 1e3, run.failure.variable.c_str(), run.failure.reason.c_str());
      return BadInput;
    }
    const Trace &t = run.trace;
    char buf[160];
    std::string text = "# saltpan " + std::string(SALTPAN_VERSION) + " snapshot of model " +
                       (model.name.empty() ? "(unnamed)" : model.name) + ", protocol " + p->name + "\n";
    std::snprintf(buf, sizeof buf, "# method %s, step %.9g ms, duration %.9g ms\n",
                  ir::methodName(model.protocol.method), model.protocol.step * 1e3, model.protocol.duration * 1e3);
    text += buf;
    text += "# model " + c.modelHash() + "\n";
    text += "# research modelling output; not for clinical or diagnostic decisions\n";
    text += "time (ms)";
    for (size_t col = 0; col < t.columns(); ++col)
      text += "," + t.names[col] + " (" + t.units[col] + ")";
    text += "\n";
    for (size_t r = 0; r < t.time.size(); ++r) {
      std::snprintf(buf, sizeof buf, "%.10g", t.time[r] * 1e3);
      text += buf;
      for (size_t col = 0; col < t.columns(); ++col) {
        std::snprintf(buf, sizeof buf, ",%.12g", t.at(r, col));
        text += buf;
      }
      text += "\n";
    }
    std::filesystem::path out = spec.parent_path() / (spec.stem().string() + "." + p->name + ".snapshot.csv");
    std::string error;
    if (!writeFileAtomically(out.string(), text, error)) {
      std::fprintf(stderr, "saltpan: %s\n", error.c_str());
      return CannotWrite;
    }
    std::fprintf(stderr, "wrote %s (%zu samples of %zu %s)\n", out.string().c_str(), t.time.size(), t.columns(),
                 t.columns() == 1 ? "quantity" : "quantities");
    ++written;
  }
  if (written == 0) {
    std::fprintf(stderr, "saltpan: error: '%s' has %s\n", file.c_str(),
                 only.empty() ? "no protocol" : ("no protocol '" + only + "'").c_str());
    return BadUsage;
  }
  return Ok;
}

} // namespace saltpan::cli
