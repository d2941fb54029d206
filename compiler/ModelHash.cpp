// ModelHash.cpp - the model hash over canonical forms (see ModelHash.h).
#include "ModelHash.h"
#include "Version.h"

#include "Diagnostics.h"
#include "Modules.h"
#include "Sha256.h"
#include "parse/Format.h"

#include <filesystem>

namespace saltpan {

namespace {

// A module's name as hashed: std modules by name, the root as "(root)", other files by
// their path relative to the root's directory, so moving the whole model keeps the hash.
std::string hashedName(const ast::Module &module, const ast::Program &program, const std::string &rootPath) {
  if (&module == program.root)
    return "(root)";
  for (const StdModule &m : stdModules())
    if (module.name == m.name)
      return module.name;
  namespace fs = std::filesystem;
  fs::path base = fs::path(rootPath).parent_path();
  if (base.empty())
    return fs::path(module.name).lexically_normal().generic_string();
  fs::path relative = fs::path(module.name).lexically_relative(base);
  return (relative.empty() ? fs::path(module.name) : relative).generic_string();
}

} // namespace

std::optional<ModelHash> hashProgram(const ast::Program &program, const std::string &rootPath,
                                     DiagnosticEngine &diags) {
  ModelHash out;
  Sha256 whole;
  whole.update("saltpan-hash 1\nversion " + std::string(SALTPAN_VERSION) + "\n");
  for (const auto &module : program.modules) {
    std::optional<std::string> bare = bareSpec(*module->file, diags);
    if (!bare)
      return std::nullopt;
    std::string name = hashedName(*module, program, rootPath);
    // Length-prefixed, so no two different module lists digest the same bytes.
    whole.update("module " + std::to_string(name.size()) + " " + name + " " + std::to_string(bare->size()) + "\n");
    whole.update(*bare);
    out.modules.push_back({name, "sha256:" + sha256Hex(*bare)});
  }
  out.hash = "sha256:" + toHex(whole.digest());
  return out;
}

} // namespace saltpan
