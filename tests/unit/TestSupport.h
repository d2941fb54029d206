// TestSupport.h - small helpers shared by the unit tests (not a test file itself).
#pragma once
#include "Pipeline.h"

#include <catch2/catch.hpp>

#include <algorithm>
#include <complex>
#include <cstdlib>
#include <fstream>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

namespace saltpan::testing {

/// Every diagnostic of a compilation as text, for INFO() when a check fails.
inline std::string allDiagnostics(const Compilation &c) {
  std::string out;
  for (const Diagnostic &d : c.diags.all())
    out += renderText(d);
  return out;
}

/// Compiles `text` as "test.saltpan" through the whole pipeline.
inline std::unique_ptr<Compilation> compile(const std::string &text, const std::string &path = "test.saltpan") {
  auto c = std::make_unique<Compilation>();
  compileText(path, text, *c);
  return c;
}

/// The declaration named `name` in the program's one namespace, as type T (or nullptr).
template <typename T> const T *find(const Compilation &c, const std::string &name) {
  auto it = c.symbols.byName.find(name);
  return it == c.symbols.byName.end() ? nullptr : ast::dyn_cast<T>(it->second);
}

/// The value (coherent SI) of constant `name` in a compilation that must check cleanly.
inline double constantValue(Compilation &c, const std::string &name) {
  INFO(allDiagnostics(c));
  REQUIRE(c.checked);
  const ast::ConstDecl *decl = find<ast::ConstDecl>(c, name);
  REQUIRE(decl != nullptr);
  EvalFailure failure;
  auto v = c.evaluator.constant(*decl, &failure);
  INFO("evaluation failed: " << failure.reason);
  REQUIRE(v.has_value());
  return *v;
}

/// Whether some error's message contains `text`.
inline bool hasError(const Compilation &c, const std::string &text) {
  for (const Diagnostic &d : c.diags.all())
    if (d.severity == Severity::Error && d.message.find(text) != std::string::npos)
      return true;
  return false;
}

/// Whether golden files are to be rewritten instead of compared: SALTPAN_UPDATE_GOLDEN=1 only.
inline bool updateGoldenFiles() {
  const char *update = std::getenv("SALTPAN_UPDATE_GOLDEN");
  return update && std::string(update) == "1";
}

/// True when every expected eigenvalue is matched by one found, to `tol` (absolute).
inline bool sameSpectrum(std::vector<std::complex<double>> found, std::vector<std::complex<double>> want, double tol) {
  if (found.size() != want.size())
    return false;
  for (auto w : want) {
    auto best =
        std::min_element(found.begin(), found.end(), [&](auto a, auto b) { return std::abs(a - w) < std::abs(b - w); });
    if (std::abs(*best - w) > tol)
      return false;
    found.erase(best);
  }
  return true;
}

/// The whole file at `path`, or "" when it cannot be read.
inline std::string readFile(const std::string &path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

} // namespace saltpan::testing
