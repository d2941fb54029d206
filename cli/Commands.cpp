// Commands.cpp - `saltpan check` and `saltpan show`: options, output and exit codes.
#include "Commands.h"
#include "Version.h"

#include "Lower.h"
#include "Pipeline.h"
#include "Show.h"
#include "SpecFiles.h"
#include "TraceOutput.h"
#include "parse/Parse.h"

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <unistd.h>

namespace saltpan::cli {

namespace {

const char *checkHelp = R"(usage: saltpan check [options] PATH...

Checks each spec (for a directory, every *.saltpan below it whose name does not start with
'_') and every module it uses: syntax, names, units of every expression,
valences and charge (electroneutrality, pump stoichiometry), and physical plausibility
(temperatures, capacitances, concentrations, reversal potentials, gate kinetics).

options:
  --format text|json      diagnostics as text on stderr (default) or one JSON document on stdout
  --warnings-as-errors    fail (exit 65) when there are warnings
  --color auto|always|never  colour text diagnostics (default: auto, when stderr is a terminal)
  --emit STAGE            print one stage's output for FILE instead of checking:
                            tokens    the token stream
                            ast       the syntax tree
                            resolved  every module's tree with what each name is bound to
                                      and each expression's dimension
                            values    every value computed before lowering, in SI
                            ir        the lowered IR (states, parameters, probes, kernel)
                            fused-ir  the fused step kernels a run compiles
                            llvm      LLVM IR of every kernel a run compiles, optimised
                                      for this CPU as the JIT compiles it
                            llvm-unoptimised  the same before the optimiser
  --protocol NAME         with --emit ir, fused-ir, llvm or llvm-unoptimised: the protocol
                          whose model is shown (default: FILE's first; the model without
                          stimuli when there is none)
  --version               print the version
  --help                  show this help

exit status: 0 no errors, 64 bad usage, 65 errors (or warnings with --warnings-as-errors),
             70 internal fault
)";

const char *showHelp = R"(usage: saltpan show [options] FILE

Prints the resolved model: temperature; for every compartment and ion the inside and
outside concentrations, the valence and the Nernst potential at the model temperature;
each membrane entry with its density and reversal potential (Nernst, GHK or as
written); the GHK resting potential of each compartment from its ungated permeability
channels; each pump's net charge moved outward per cycle. Conventions: V is inside minus
outside, membrane current is positive outward.

options:
  --format text|json  readable summary (default) or JSON (keys in docs/language.md)
  -o FILE             write to FILE (atomically) instead of standard output
  --version           print the version
  --help              show this help

exit status: 0 success, 64 bad usage, 65 the spec has errors, 70 internal fault,
             73 the output file could not be written or is an input
)";

struct Options {
  std::vector<std::string> files;
  std::string format = "text";
  std::string emit;
  std::string protocol; // --emit of a lowered stage: which protocol's model
  std::string output;
  std::string color = "auto";
  bool werror = false;
  bool help = false;
  bool version = false;
};

// Returns an exit code when parsing must stop, or -1 to go on. --help and --version are kept
// for after the loop: an option refused anywhere on the line wins over them.
int parseOptions(const std::vector<std::string> &args, Options &o, const char *help, bool allowCheckOptions) {
  OptionParser parser;
  parser.flag("--help", o.help);
  parser.flag("-h", o.help);
  parser.flag("--version", o.version);
  parser.value("--format", oneOf(o.format, {"text", "json"}, "--format must be 'text' or 'json', not '{}'"));
  if (allowCheckOptions) {
    parser.flag("--warnings-as-errors", o.werror);
    parser.value("--color", oneOf(o.color, {"auto", "always", "never"}, "--color must be 'auto', 'always' or 'never'"));
    parser.value("--emit", [&](const std::string &v) -> std::string {
      o.emit = v;
      return isEmitStage(v) ? ""
                            : "--emit must be one of tokens, ast, resolved, values, ir, fused-ir, llvm or "
                              "llvm-unoptimised, not '" +
                                  v + "'";
    });
    parser.value("--protocol", o.protocol);
  } else {
    parser.value("-o", o.output);
  }
  parser.positional(o.files);
  parser.endOfOptions();
  if (auto code = parser.parse(args, [&](const std::string &message) { return usageError("saltpan", message, help); }))
    return *code;
  if (o.help) {
    std::fputs(help, stdout);
    return Ok;
  }
  if (o.version)
    return printVersion();
  if (o.files.empty())
    return usageError("saltpan", "no spec file given", help);
  return -1;
}

void printDiagnostics(const DiagnosticEngine &diags, bool colour) {
  for (const Diagnostic &d : diags.all())
    std::fputs(renderText(d, colour).c_str(), stderr);
}

} // namespace

int usageError(const std::string &who, const std::string &message, const char *help) {
  std::fprintf(stderr, "%s: %s\n\n%s", who.c_str(), message.c_str(), help);
  return BadUsage;
}

bool useColour(const std::string &setting) {
  if (setting == "always")
    return true;
  if (setting == "never")
    return false;
  return isatty(fileno(stderr)) && std::getenv("NO_COLOR") == nullptr;
}

bool compileAndReport(const std::string &path, Compilation &c, bool colour) {
  compileFile(path, c);
  printDiagnostics(c.diags, colour);
  return c.diags.errorCount() == 0;
}

int printVersion() {
  std::printf("saltpan %s\n", SALTPAN_VERSION);
  return Ok;
}

void addHelpAndVersion(OptionParser &parser, const char *help) {
  parser.stop({"--help", "-h"}, [help] {
    std::fputs(help, stdout);
    return Ok;
  });
  parser.stop({"--version"}, printVersion);
}

const ast::ProtocolDecl *namedProtocol(const Compilation &c, const std::string &name, const std::string &file) {
  auto all = protocols(c.program);
  for (const ast::ProtocolDecl *p : all)
    if (p->name == name)
      return p;
  std::string names;
  for (const ast::ProtocolDecl *p : all)
    names += (names.empty() ? "" : ", ") + p->name;
  std::fprintf(stderr, "saltpan: error: there is no protocol '%s' in '%s'%s%s\n", name.c_str(), file.c_str(),
               names.empty() ? "" : "; it has ", names.c_str());
  return nullptr;
}

const ir::Model *loweredModel(const Compilation &c, const ast::ProtocolDecl &protocol) {
  auto it = c.lowered.find(&protocol);
  if (it != c.lowered.end())
    return &it->second;
  std::fprintf(stderr, "saltpan: internal error: protocol '%s' was not lowered\n", protocol.name.c_str());
  return nullptr;
}

std::string outputClash(const std::vector<NamedFile> &outputs, const SourceManager &sources) {
  std::vector<NamedFile> named, inputs;
  for (const NamedFile &f : outputs)
    if (!f.path.empty())
      named.push_back(f);
  std::vector<std::string> paths = sources.paths();
  for (size_t i = 0; i < paths.size(); ++i)
    inputs.push_back({i == 0 ? "the spec" : "the spec file", paths[i]});
  return findOutputClash(named, inputs);
}

int checkCommand(const std::vector<std::string> &args) {
  Options o;
  if (int code = parseOptions(args, o, checkHelp, true); code >= 0)
    return code;
  if (!o.protocol.empty() && o.emit.empty())
    return usageError("saltpan", "--protocol chooses what --emit shows; give --emit too", checkHelp);
  if (!o.emit.empty()) {
    if (o.files.size() != 1)
      return usageError("saltpan", "--emit takes exactly one file", checkHelp);
    return emitStage(o.emit, o.protocol, o.files[0], useColour(o.color));
  }
  // A directory stands for every spec below it, as for `saltpan test`; files are read as given.
  std::vector<std::string> files;
  for (const std::string &path : o.files) {
    std::error_code ec;
    if (!std::filesystem::is_directory(path, ec)) {
      files.push_back(path);
      continue;
    }
    std::string error;
    std::vector<UnreadableFolder> unreadable;
    std::vector<std::string> found = discoverSpecs({path}, unreadable, error);
    for (const UnreadableFolder &u : unreadable)
      std::fprintf(stderr, "saltpan: error: %s\n", u.text().c_str());
    if (!unreadable.empty())
      return BadInput;
    if (found.empty()) {
      std::fprintf(stderr, "saltpan: error: %s\n",
                   error.empty() ? ("no spec files (*.saltpan) in '" + path + "'").c_str() : error.c_str());
      return BadInput; // as for a file that cannot be read: nothing was checked
    }
    files.insert(files.end(), found.begin(), found.end());
  }
  o.files = files;
  // Diagnostics point into their compilation's files, so keep every compilation alive.
  std::vector<std::unique_ptr<Compilation>> compilations;
  std::vector<Diagnostic> all;
  size_t errors = 0, warnings = 0;
  bool colour = useColour(o.color);
  for (const std::string &path : o.files) {
    auto c = std::make_unique<Compilation>();
    compileFile(path, *c);
    errors += c->diags.errorCount();
    warnings += c->diags.warningCount();
    if (o.format == "json")
      all.insert(all.end(), c->diags.all().begin(), c->diags.all().end());
    else
      printDiagnostics(c->diags, colour);
    compilations.push_back(std::move(c));
  }
  if (o.format == "json")
    std::fputs(renderJson(all).c_str(), stdout);
  bool failed = errors > 0 || (o.werror && warnings > 0);
  if (o.format == "text" && o.files.size() > 1)
    std::fprintf(stderr, "%zu file%s checked: %zu error%s, %zu warning%s\n", o.files.size(),
                 o.files.size() == 1 ? "" : "s", errors, errors == 1 ? "" : "s", warnings, warnings == 1 ? "" : "s");
  return failed ? BadInput : Ok;
}

int showCommand(const std::vector<std::string> &args) {
  Options o;
  if (int code = parseOptions(args, o, showHelp, false); code >= 0)
    return code;
  if (o.files.size() != 1)
    return usageError("saltpan", "show takes exactly one spec file", showHelp);
  Compilation c;
  if (!compileAndReport(o.files[0], c, useColour()))
    return BadInput;
  if (std::string clash = outputClash({{"-o", o.output}}, c.sources); !clash.empty()) {
    std::fprintf(stderr, "saltpan: error: %s\n", clash.c_str());
    return CannotWrite;
  }
  // The true rest beside the GHK potential: steady states of the model without a protocol.
  // Joined compartments rest together: each tree is solved as one system.
  ShownRest steady;
  // A model that cannot be lowered is still shown, without its rest.
  if (const ir::Model *model = c.unstimulated()) {
    try {
      if (model->junctions.empty())
        steady.each = rest::findSteadyStates(*model, &c.model);
      else
        steady.trees = rest::findTreeSteadyStates(*model, &c.model);
      steady.model = model;
    } catch (const std::exception &) {
      steady = {};
    }
  }
  std::string text = o.format == "json" ? showJson(c, steady) : showText(c, steady);
  if (o.output.empty()) {
    std::fputs(text.c_str(), stdout);
    return Ok;
  }
  std::string error;
  if (!writeFileAtomically(o.output, text, error)) {
    std::fprintf(stderr, "saltpan: %s\n", error.c_str());
    return CannotWrite;
  }
  return Ok;
}

} // namespace saltpan::cli
