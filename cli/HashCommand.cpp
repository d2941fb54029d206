// HashCommand.cpp - `saltpan hash`: one SHA-256 naming a model exactly, whatever its layout.
//
// Digests the tool version, then each module the spec loads (dependencies first, the root
// last): its name and its bare canonical form (parse/Format.h), which has no comments and no
// layout left. Reformatting or editing comments keeps the hash; changing any token changes it.
#include "Commands.h"
#include "Version.h"

#include "Diagnostics.h"
#include "ModelHash.h"
#include "Modules.h"
#include "Sha256.h"
#include "Source.h"
#include "parse/Format.h"

#include <cstdio>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <unistd.h>

namespace saltpan::cli {

namespace {

const char *hashHelp = R"(usage: saltpan hash [options] FILE

Prints a SHA-256 that identifies the model in FILE: it covers the saltpan version and, for
FILE and every module it uses (standard modules by name, other files by their path relative
to FILE's directory), the canonical form without comments. Reformatting a spec or editing
its comments leaves the hash unchanged; changing any number, unit or name changes it.

output: sha256:<64 hex digits>  FILE

options:
  --format text|json  the line above (default), or {"file", "hash", "version", "modules"}
                      where each module has its "name" and its own "hash"
  --version           print the version
  --help              show this help

exit status: 0 success, 64 bad usage, 65 the spec or a module it uses has syntax errors or
             cannot be read, 70 internal fault
)";

int usage(const std::string &message) { return usageError("saltpan", message, hashHelp); }

} // namespace

int hashCommand(const std::vector<std::string> &args) {
  std::vector<std::string> files;
  std::string format = "text";
  OptionParser parser;
  addHelpAndVersion(parser, hashHelp);
  parser.value("--format", oneOf(format, {"text", "json"}, "--format must be 'text' or 'json', not '{}'"))
      .ifMissing("--format needs a value: 'text' or 'json'");
  parser.positional(files);
  parser.endOfOptions();
  if (auto code = parser.parse(args, usage))
    return *code;
  if (files.empty())
    return usage("no spec file given");
  if (files.size() != 1)
    return usage("hash takes exactly one spec file");

  bool colour = useColour();
  SourceManager sources;
  DiagnosticEngine diags;
  std::string error;
  const SourceFile *root = sources.load(files[0], error);
  if (!root) {
    std::fprintf(stderr, "saltpan: cannot read '%s': %s\n", files[0].c_str(), error.c_str());
    return BadInput;
  }
  ast::Program program;
  bool loaded = loadProgram(*root, sources, diags, program);
  if (!loaded) {
    // Only what stopped the loading is worth showing; `saltpan check` reports the rest.
    for (const Diagnostic &d : diags.all())
      std::fputs(renderText(d, colour).c_str(), stderr);
    return BadInput;
  }

  std::optional<ModelHash> hashed = hashProgram(program, root->path(), diags);
  if (!hashed) {
    for (const Diagnostic &d : diags.all())
      std::fputs(renderText(d, colour).c_str(), stderr);
    return BadInput;
  }
  std::string hash = hashed->hash;
  nlohmann::json modules = nlohmann::json::array();
  for (auto &[name, moduleHash] : hashed->modules)
    modules.push_back({{"name", name}, {"hash", moduleHash}});
  if (format == "json") {
    nlohmann::json out{{"file", files[0]}, {"hash", hash}, {"version", SALTPAN_VERSION}, {"modules", modules}};
    std::printf("%s\n", out.dump(2).c_str());
  } else {
    std::printf("%s  %s\n", hash.c_str(), files[0].c_str());
  }
  return Ok;
}

} // namespace saltpan::cli
