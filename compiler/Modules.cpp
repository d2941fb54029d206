// Modules.cpp - Stage 2: follows `use` declarations, parsing each module once.
#include "Modules.h"

#include "Diagnostics.h"
#include "parse/Parse.h"

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
      fs::path target = fs::path(from.path()).parent_path() / use.target;
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
