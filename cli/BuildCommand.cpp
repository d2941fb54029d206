// BuildCommand.cpp - `saltpan build`: a checked spec as a standalone executable or a shared
// library: every protocol lowered, its kernels emitted as one object (EmitObject.h) and linked
// with `c++` against the runtime archives, which hold no LLVM and no ANTLR.
#include "Commands.h"
#include "Version.h"

#include "EmitObject.h"
#include "KernelPlan.h"
#include "Lower.h"
#include "ModelFile.h"
#include "Pipeline.h"
#include "SafeWrite.h"
#include "Sweep.h"
#include "TraceOutput.h"

#include <algorithm>
#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <optional>
#include <set>
#include <spawn.h>
#include <sstream>
#include <sys/wait.h>
#include <unistd.h>

// The build tree's archives and header (configure time); see compiler/CMakeLists.txt.
#ifndef SALTPAN_LINK_DRIVER
#define SALTPAN_LINK_DRIVER "c++"
#endif
#ifndef SALTPAN_LINK_FLAGS
#define SALTPAN_LINK_FLAGS ""
#endif

extern char **environ;

namespace saltpan::cli {

namespace fs = std::filesystem;

namespace {

const char *buildHelp = R"(usage: saltpan build [options] FILE

Checks FILE, lowers every protocol, compiles the model to native code for this machine's CPU
(the code `saltpan run` would run) and links it with `c++` into a program that needs neither
LLVM nor saltpan when it runs.

Without --shared the program runs the model's protocols and takes the options of `saltpan run`
(--protocol, --set, --duration, --every, -o); its CSV and JSON outputs are byte for byte those
of `saltpan run`. `PROGRAM --help` lists its protocols and parameters. `PROGRAM sweep` runs the
spec's sweeps, planned here, and writes what `saltpan sweep --engine scalar` writes; sweeps that
measure rest or input_resistance are left out (with a note), as the program has no
steady-state search.

With --shared it is a shared library with the C interface in saltpan_model.h, which is copied
next to it (see docs/embedding.md).

The result runs only on CPUs with the features of the one that built it.

options:
  -o FILE        the output (default: FILE's name without .saltpan, or libNAME.so with --shared);
                 written atomically; never the spec itself. A library's file name is its
                 soname, so it may not start with '@' or '-' nor hold commas, spaces, quotes,
                 backslashes or control characters
  --shared       build a shared library instead of an executable
  --version      print the version
  --help         show this help

exit status: 0 success, 64 bad usage, 65 the spec has errors, 70 internal fault (also when
             the runtime archives or the C++ compiler driver cannot be found, or linking fails),
             73 the output could not be written or is the spec

environment: SALTPAN_CXX  the C++ compiler driver that links (default: c++ on PATH; in a
                        sanitizer build of saltpan, the compiler that built it)

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

int usage(const std::string &message) { return usageError("saltpan build: error", message, buildHelp); }

int fault(const std::string &message) {
  std::fprintf(stderr, "saltpan build: error: %s\n", message.c_str());
  return InternalFault;
}

// Where a moved or installed saltpan keeps its runtime: PREFIX/bin/saltpan, PREFIX/lib/saltpan/.
fs::path besideSaltpan(const std::string &file) {
  std::error_code ec;
  fs::path self = fs::read_symlink("/proc/self/exe", ec);
  return ec ? fs::path() : self.parent_path() / ".." / "lib" / "saltpan" / file;
}

// The installed copy first, so a moved saltpan uses its own runtime; then the build tree's.
std::optional<std::string> findRuntimeFile(const std::string &file, const char *builtAt, std::string &searched) {
  for (fs::path candidate : {besideSaltpan(file), fs::path(builtAt)}) {
    if (candidate.empty())
      continue;
    std::error_code ec;
    if (fs::is_regular_file(candidate, ec))
      return fs::weakly_canonical(candidate, ec).string();
    searched += "\n  " + candidate.lexically_normal().string();
  }
  return std::nullopt;
}

std::optional<std::string> findOnPath(const std::string &program) {
  if (program.find('/') != std::string::npos)
    return access(program.c_str(), X_OK) == 0 ? std::optional(program) : std::nullopt;
  const char *path = std::getenv("PATH");
  std::stringstream dirs(path ? path : "");
  for (std::string dir; std::getline(dirs, dir, ':');) {
    std::string candidate = (dir.empty() ? "." : dir) + "/" + program;
    if (access(candidate.c_str(), X_OK) == 0)
      return candidate;
  }
  return std::nullopt;
}

// Runs argv[0] with no shell in between (paths with spaces need no quoting); the child's
// output goes to saltpan's standard error.
bool runProgram(const std::vector<std::string> &argv, std::string &error) {
  std::vector<char *> raw;
  for (const std::string &a : argv)
    raw.push_back(const_cast<char *>(a.c_str()));
  raw.push_back(nullptr);
  posix_spawn_file_actions_t actions;
  posix_spawn_file_actions_init(&actions);
  posix_spawn_file_actions_adddup2(&actions, STDERR_FILENO, STDOUT_FILENO);
  pid_t pid;
  int spawned = posix_spawn(&pid, argv[0].c_str(), &actions, nullptr, raw.data(), environ);
  posix_spawn_file_actions_destroy(&actions);
  if (spawned != 0) {
    error = "cannot start '" + argv[0] + "': " + std::strerror(spawned);
    return false;
  }
  int status = 0;
  while (waitpid(pid, &status, 0) < 0)
    if (errno != EINTR) {
      error = "cannot wait for '" + argv[0] + "'";
      return false;
    }
  if (!WIFEXITED(status) || WEXITSTATUS(status) != 0) {
    std::string command;
    for (const std::string &a : argv)
      command += (command.empty() ? "" : " ") + a;
    error = "linking failed: " + command;
    return false;
  }
  return true;
}

std::optional<std::string> readBinary(const std::string &path) {
  std::ifstream in(path, std::ios::binary);
  if (!in)
    return std::nullopt;
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

// A private directory for the object and the link, removed however the build ends.
struct ScratchDirectory {
  fs::path path;
  ScratchDirectory() {
    // Absolute, so no path handed to the driver can start with '@' or '-'.
    std::error_code ec;
    fs::path base = fs::absolute(fs::temp_directory_path(ec), ec);
    std::string pattern = (base / "saltpan-build-XXXXXX").string();
    if (mkdtemp(pattern.data()))
      path = pattern;
  }
  ~ScratchDirectory() {
    std::error_code ec;
    if (!path.empty())
      fs::remove_all(path, ec);
  }
};

struct Kernels {
  std::vector<KernelPlan> plans; // they own the kernels
  std::vector<EmittedKernel> all;
};

// Every kernel a run (Run.cpp) and the C interface can ask for under any --duration and
// --every: KernelPlan's kernels for a built model, each once.
void collectKernels(const std::vector<const ir::Model *> &models, Kernels &kernels) {
  for (const ir::Model *m : models)
    kernels.plans.push_back(planKernels(*m, KernelUse::Built));
  // The model kernels first, then the fused ones, as the object's table has always listed them.
  std::set<uint64_t> seen;
  for (bool plain : {true, false})
    for (const KernelPlan &plan : kernels.plans) // `plans` no longer grows: pointers stay valid
      for (const KernelPlan::Entry &e : plan.entries())
        if ((plan.plain && e.kernel == &*plan.plain) == plain &&
            seen.insert(kernelFingerprint(*e.kernel, e.lanes)).second)
          kernels.all.push_back({e.kernel, e.lanes});
}

// The root sweeps whose measures all come from protocol runs, planned as `saltpan sweep` plans
// them. A steady-state measure needs the compiler's search, which the runtime does not have.
void bundleSweeps(Compilation &c, ModelBundle &bundle) {
  std::vector<const ast::ProtocolDecl *> decls = protocols(c.program);
  for (const ast::SweepDecl *s : rootSweeps(c.program)) {
    const ast::ExpectDecl *steady = nullptr;
    for (auto &m : s->measures)
      if (!m->target && !steady)
        steady = m.get();
    if (steady) {
      std::fprintf(stderr,
                   "saltpan build: note: sweep '%s' is not built in: '%s' needs a steady-state search, which only "
                   "`saltpan sweep` does\n",
                   s->name.c_str(), steady->measure.c_str());
      continue;
    }
    SweepPlan plan = planSweep(c, *s);
    BundledSweep b;
    b.name = s->name;
    b.design = plan.design;
    b.points = plan.points;
    for (size_t a = 0; a < plan.parameters.size(); ++a)
      b.parameters.push_back({plan.parameters[a], plan.parameterUnits[a].name, plan.parameterUnits[a].scale});
    for (const ast::ProtocolDecl *p : plan.protocols) {
      BundledSweep::Protocol bp;
      bp.protocol = static_cast<int>(std::find(decls.begin(), decls.end(), p) - decls.begin());
      for (const std::string &name : plan.parameters)
        bp.parameters.push_back(bundle.protocols[static_cast<size_t>(bp.protocol)].findParam(name));
      b.protocols.push_back(std::move(bp));
    }
    for (const SweepMeasure &m : plan.measures)
      b.measures.push_back({{m.decl->text, m.unit.name, m.unit.scale},
                            b.protocols[static_cast<size_t>(m.protocol)].protocol,
                            m.decl->measure,
                            m.decl->args[0].path,
                            m.args.value});
    bundle.sweeps.push_back(std::move(b));
  }
}

struct BuildOptions {
  std::string file, output;
  bool shared = false;
};

} // namespace

int buildCommand(const std::vector<std::string> &args) {
  BuildOptions o;
  OptionParser parser;
  addHelpAndVersion(parser, buildHelp);
  parser.flag("--shared", o.shared);
  parser.value("-o", o.output).ifMissing("-o needs a file name");
  parser.positional(o.file, "build takes one spec file");
  if (auto code = parser.parse(args, usage))
    return *code;
  if (o.file.empty())
    return usage("no spec file given");
  std::string stem = fs::path(o.file).stem().string();
  bool defaultOutput = o.output.empty();
  if (defaultOutput)
    o.output = o.shared ? "lib" + stem + ".so" : stem;
  std::string header;
  if (o.shared) {
    header = (fs::path(o.output).parent_path() / "saltpan_model.h").string();
    // The library's file name becomes its soname, an argument the linker reads.
    std::string soname = fs::path(o.output).filename().string();
    if (std::string why = linkerSpecialCharacter(soname); !why.empty())
      return usage("the library name '" + soname + "' (its soname) has " + why + "; choose another name with -o");
  }
  std::vector<NamedFile> outputs = {{defaultOutput ? "the output" : "-o", o.output}};
  if (o.shared)
    outputs.push_back({"the header", header});
  if (std::string clash = findOutputClash(outputs, {{"the spec", o.file}}); !clash.empty()) {
    std::fprintf(stderr, "saltpan build: error: %s%s\n", clash.c_str(),
                 defaultOutput && stem == fs::path(o.file).filename().string()
                     ? " (the spec's name has no .saltpan extension; name the output with -o)"
                     : "");
    return CannotWrite;
  }

  Compilation c;
  compileFile(o.file, c);
  for (const Diagnostic &d : c.diags.all())
    std::fputs(renderText(d).c_str(), stderr);
  if (c.diags.errorCount() > 0 || !c.checked)
    return BadInput;
  ModelBundle bundle;
  bundle.toolVersion = SALTPAN_VERSION;
  bundle.modelHash = c.modelHash();
  bundle.source = fs::path(o.file).filename().string();
  for (const ast::ProtocolDecl *p : protocols(c.program)) {
    auto lowered = c.lowered.find(p);
    if (lowered == c.lowered.end())
      return fault("protocol '" + p->name + "' was not lowered");
    bundle.protocols.push_back(lowered->second);
  }
  if (bundle.protocols.empty()) {
    std::fprintf(stderr, "saltpan build: error: '%s' has no protocol to build\n", o.file.c_str());
    return BadUsage;
  }
  bundleSweeps(c, bundle);

  // Find everything the link needs before the slow part.
  struct Needed {
    const char *file, *builtAt;
  };
  std::vector<Needed> needed = {
      {o.shared ? "libsaltpan_capi.a" : "libsaltpan_standalone_main.a",
       o.shared ? SALTPAN_CAPI_ARCHIVE : SALTPAN_STANDALONE_MAIN_ARCHIVE},
      {"libsaltpan_standalone.a", SALTPAN_STANDALONE_ARCHIVE},
      {"libsaltpan_runtime.a", SALTPAN_RUNTIME_ARCHIVE},
      {"libsaltpan_support.a", SALTPAN_SUPPORT_ARCHIVE},
  };
  if (o.shared)
    needed.push_back({"saltpan_model.h", SALTPAN_MODEL_HEADER});
  std::vector<std::string> found;
  for (const Needed &n : needed) {
    std::string searched;
    auto path = findRuntimeFile(n.file, n.builtAt, searched);
    if (!path)
      return fault(std::string("cannot find the runtime file '") + n.file + "'; looked in:" + searched);
    found.push_back(*path);
  }
  const char *chosen = std::getenv("SALTPAN_CXX");
  std::string driverName = chosen && *chosen ? chosen : SALTPAN_LINK_DRIVER;
  auto driver = findOnPath(driverName);
  if (!driver)
    return fault("cannot find the C++ compiler driver '" + driverName +
                 "' on PATH; it links the model (on Debian: apt-get install g++; SALTPAN_CXX names another)");

  ScratchDirectory scratch;
  if (scratch.path.empty())
    return fault("cannot create a temporary directory in " + fs::temp_directory_path().string());
  Kernels kernels;
  std::vector<const ir::Model *> models;
  for (const ir::Model &m : bundle.protocols)
    models.push_back(&m);
  collectKernels(models, kernels);
  std::string object = (scratch.path / "model.o").string(), linked = (scratch.path / "linked").string();
  std::string error;
  if (!emitModelObject(kernels.all, writeModelBundle(bundle), object, error))
    return fault(error);

  std::vector<std::string> link = {*driver};
  if (o.shared) {
    // Only the C interface is exported; the runtime's C++ symbols stay inside the library.
    std::string exports = (scratch.path / "exports.map").string();
    if (!writeFileAtomically(exports, "{\n  global: saltpan_model_*;\n  local: *;\n};\n", error))
      return fault(error);
    // -Bsymbolic: the library's own calls stay inside it even when another model library
    // that exports the same names is loaded first. Paths and names reach the linker only as
    // arguments of their own (-Xlinker), never inside a -Wl, list that the driver splits at
    // commas: a TMPDIR or a file name with a comma stays one argument.
    link.insert(link.end(), {"-shared", "-Wl,-Bsymbolic", "-Xlinker", "--version-script", "-Xlinker", exports,
                             "-Xlinker", "-soname", "-Xlinker", fs::path(o.output).filename().string()});
  }
  link.insert(link.end(), {"-o", linked, object});
  if (o.shared)
    link.insert(link.end(), {"-Wl,--whole-archive", found[0], "-Wl,--no-whole-archive"});
  else
    link.push_back(found[0]);
  link.insert(link.end(), {found[1], found[2], found[3], "-lm", "-lpthread"});
  std::stringstream extra(SALTPAN_LINK_FLAGS); // the sanitizers the archives were built with
  for (std::string flag; extra >> flag;)
    link.push_back(flag);
  if (!runProgram(link, error))
    return fault(error);

  auto bytes = readBinary(linked);
  if (!bytes)
    return fault("cannot read the linked file '" + linked + "'");
  WriteOptions program;
  program.executable = true;
  if (!writeFileAtomically(o.output, *bytes, error, program)) {
    std::fprintf(stderr, "saltpan build: error: %s\n", error.c_str());
    return CannotWrite;
  }
  if (o.shared) {
    auto text = readBinary(found[4]);
    if (!text)
      return fault("cannot read '" + found[4] + "'");
    if (!writeFileAtomically(header, *text, error)) {
      std::fprintf(stderr, "saltpan build: error: %s\n", error.c_str());
      return CannotWrite;
    }
  }
  std::fprintf(stderr, "built %s: %s '%s', %zu protocol%s, %zu sweep%s, %zu kernel%s%s%s\n", o.output.c_str(),
               o.shared ? "shared library of" : "executable of", bundle.protocols.front().name.c_str(),
               bundle.protocols.size(), bundle.protocols.size() == 1 ? "" : "s", bundle.sweeps.size(),
               bundle.sweeps.size() == 1 ? "" : "s", kernels.all.size(), kernels.all.size() == 1 ? "" : "s",
               header.empty() ? "" : "; header ", header.c_str());
  return Ok;
}

} // namespace saltpan::cli
