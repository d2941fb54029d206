// Modules.cpp - Stage 2: follows `use` declarations, parsing each module once.
#include "Modules.h"

#include "Diagnostics.h"
#include "parse/Parse.h"

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <map>

namespace saltpan {

const std::vector<StdModule> &stdModules() {
  static const std::vector<StdModule> modules = {
#include "stdlib.inc"
  };
  return modules;
}

namespace {

namespace fs = std::filesystem;

// Loading follows uses recursively; this bound keeps it far from the end of the stack, also
// under AddressSanitizer, whose frames are larger.
constexpr size_t maxModuleDepth = 64; // each level is a deep load frame: safe under ASan in 1 MiB

class Loader {
public:
  Loader(SourceManager &sources, DiagnosticEngine &diags, ast::Program &program)
      : sources_(sources), diags_(diags), program_(program) {}

  bool loadRoot(const SourceFile &root) {
    ast::Module *m = load(root, keyOf(root.path()), root.path());
    program_.root = m;
    // An empty file checks nothing; saying so beats a silent pass on the wrong file.
    if (m && m->decls.empty()) {
      SourceLoc start = root.locAtOffset(0);
      diags_.error({start, start}, "'" + root.path() + "' declares nothing");
      ok_ = false;
    }
    return m != nullptr && ok_;
  }

private:
  enum class State { Loading, Done };
  SourceManager &sources_;
  DiagnosticEngine &diags_;
  ast::Program &program_;
  std::map<std::string, State> state_;
  std::vector<std::pair<std::string, const ast::UseDecl *>> stack_; // the chain of uses being followed
  bool ok_ = true;

  static std::string keyOf(const std::string &path) {
    std::error_code ec;
    fs::path canonical = fs::weakly_canonical(fs::path(path), ec);
    return ec ? path : canonical.string();
  }

  ast::Module *load(const SourceFile &file, const std::string &key, const std::string &name) {
    state_[key] = State::Loading;
    std::unique_ptr<ast::Module> module = parse(file, diags_);
    if (!module) {
      ok_ = false;
      state_[key] = State::Done;
      return nullptr;
    }
    module->name = name;
    for (auto &decl : module->decls)
      if (auto *use = ast::dyn_cast<ast::UseDecl>(decl.get()))
        follow(*use, file, name);
    state_[key] = State::Done;
    program_.modules.push_back(std::move(module));
    return program_.modules.back().get();
  }

  void follow(const ast::UseDecl &use, const SourceFile &from, const std::string &fromName) {
    std::string key, name;
    const SourceFile *file = nullptr;
    if (use.isPath) {
      fs::path target = modulePath(use, from);
      if (target.empty())
        return;
      name = target.lexically_normal().string();
      key = keyOf(name);
      if (auto it = state_.find(key); it != state_.end()) {
        if (it->second == State::Loading)
          reportCycle(use, fromName, name);
        return;
      }
      std::error_code ec;
      if (fs::is_directory(target, ec)) {
        diags_.error(use.targetRange, "'" + name + "' is a directory, not a spec file");
        ok_ = false;
        return;
      }
      if (!fs::is_regular_file(target, ec)) {
        diags_.error(use.targetRange, "cannot find '" + use.target + "' (looked for '" + name + "')");
        ok_ = false;
        return;
      }
      std::string error;
      file = sources_.load(name, error);
      if (!file) {
        diags_.error(use.targetRange, "cannot read '" + name + "': " + error);
        ok_ = false;
        return;
      }
    } else {
      key = name = use.target;
      if (auto it = state_.find(key); it != state_.end()) {
        if (it->second == State::Loading)
          reportCycle(use, fromName, name);
        return;
      }
      const StdModule *found = nullptr;
      for (const StdModule &m : stdModules())
        if (use.target == m.name)
          found = &m;
      if (!found) {
        auto &d = diags_.error(use.targetRange, "there is no module '" + use.target + "'");
        std::string list;
        for (const StdModule &m : stdModules())
          list += (list.empty() ? "" : ", ") + std::string(m.name);
        const StdModule *meant = nullptr;
        for (const StdModule &m : stdModules())
          if ("std." + use.target == m.name)
            meant = &m;
        if (meant)
          DiagnosticEngine::note(d, {}, "did you mean 'use " + std::string(meant->name) + "'?");
        else if (use.target.rfind("std.", 0) == 0)
          DiagnosticEngine::note(d, {}, "the standard modules are " + list);
        else
          DiagnosticEngine::note(d, {}, "to use a file, write its path in quotes: use \"" + use.target + ".saltpan\"");
        ok_ = false;
        return;
      }
      file = sources_.find(found->path);
      if (!file)
        file = sources_.add(found->path, found->text);
    }
    if (stack_.size() >= maxModuleDepth) {
      auto &d = diags_.error(use.targetRange,
                             "modules use each other more than " + std::to_string(maxModuleDepth) + " deep here");
      DiagnosticEngine::note(d, stack_.front().second->targetRange,
                             "the chain of uses starts in '" + stack_.front().first + "' here");
      ok_ = false;
      return;
    }
    stack_.push_back({fromName, &use});
    load(*file, key, name);
    stack_.pop_back();
  }

  // Where `use "PATH"` in `from` points: PATH in the folder of `from`, else in a folder of the
  // module search path (SALTPAN_MODULE_PATH). A module outside those folders (an absolute path,
  // `..` or a symbolic link that leads out), or one that is not a spec file, is refused: a spec
  // from elsewhere must not make saltpan read (and quote in a diagnostic) any file it likes.
  // Empty when refused (reported).
  fs::path modulePath(const ast::UseDecl &use, const SourceFile &from) {
    // A text saltpan wrote itself ("<command line>": `sweep --vary` uses the spec the user
    // named) reads the file it names.
    if (from.path().rfind('<', 0) == 0)
      return fs::path(use.target);
    std::vector<fs::path> folders = {fs::path(from.path()).parent_path()};
    for (const std::string &extra : moduleSearchPath())
      folders.emplace_back(extra);
    fs::path written(use.target);
    fs::path target = folders.front() / written;
    std::error_code ec;
    if (written.is_relative() && !fs::exists(target, ec))
      for (size_t i = 1; i < folders.size(); ++i)
        if (fs::exists(folders[i] / written, ec)) {
          target = folders[i] / written;
          break;
        }
    auto inside = [&](const fs::path &folder) {
      fs::path base = fs::weakly_canonical(folder.empty() ? fs::path(".") : folder, ec);
      fs::path real = fs::weakly_canonical(target.empty() ? fs::path(".") : target, ec);
      auto b = base.begin(), r = real.begin();
      for (; b != base.end() && r != real.end(); ++b, ++r)
        if (*b != *r)
          return false;
      return b == base.end() && r != real.end();
    };
    if (std::none_of(folders.begin(), folders.end(), inside)) {
      auto &d =
          diags_.error(use.targetRange, "'" + use.target + "' lies outside the folder of '" + from.path() +
                                            "'; saltpan reads modules only from there and the module search path");
      DiagnosticEngine::note(d, {},
                             "to use modules from another folder, list it in SALTPAN_MODULE_PATH "
                             "(folders separated by ':')");
      ok_ = false;
      return {};
    }
    if (target.extension() != ".saltpan" || fs::weakly_canonical(target, ec).extension() != ".saltpan") {
      auto &d =
          diags_.error(use.targetRange, "'" + use.target + "' is not a spec file: a module's name ends in .saltpan");
      DiagnosticEngine::note(d, {}, "saltpan reads only spec files as modules, and quotes no other file");
      ok_ = false;
      return {};
    }
    return target;
  }

  static std::vector<std::string> moduleSearchPath() {
    std::vector<std::string> folders;
    const char *value = std::getenv("SALTPAN_MODULE_PATH");
    std::string list = value ? value : "";
    for (size_t start = 0; start <= list.size();) {
      size_t colon = list.find(':', start);
      std::string folder = list.substr(start, colon == std::string::npos ? std::string::npos : colon - start);
      if (!folder.empty())
        folders.push_back(folder);
      if (colon == std::string::npos)
        break;
      start = colon + 1;
    }
    return folders;
  }

  void reportCycle(const ast::UseDecl &use, const std::string &fromName, const std::string &target) {
    size_t first = 0;
    while (first < stack_.size() && stack_[first].first != target)
      ++first;
    std::string chain;
    for (size_t i = first; i < stack_.size(); ++i)
      chain += "'" + stack_[i].first + "' -> ";
    chain += "'" + fromName + "' -> '" + target + "'";
    auto &d = diags_.error(use.targetRange, "modules use each other in a cycle: " + chain);
    for (size_t i = first; i < stack_.size(); ++i)
      DiagnosticEngine::note(d, stack_[i].second->targetRange,
                             "'" + stack_[i].first + "' uses '" + stack_[i].second->target + "' here");
    ok_ = false;
  }
};

} // namespace

bool loadProgram(const SourceFile &root, SourceManager &sources, DiagnosticEngine &diags, ast::Program &program) {
  return Loader(sources, diags, program).loadRoot(root);
}

} // namespace saltpan
