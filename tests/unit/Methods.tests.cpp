// Methods.tests.cpp - `saltpan methods`: golden Markdown and LaTeX for the shipped specs, and
// the LaTeX rendering of expressions and units.
//
// Update the golden files after an intended change with
//   SALTPAN_UPDATE_GOLDEN=1 ./saltpan_tests "[methods]"
// and review the diff. The tool version and the model hash are normalised before comparing.
#include "Methods.h"
#include "TestSupport.h"

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>

using namespace saltpan;
using testing::compile;
using testing::readFile;

namespace {

std::string normaliseVersion(std::string text) {
  const std::string version = std::string("saltpan ") + methodsToolVersion();
  for (size_t at = text.find(version); at != std::string::npos; at = text.find(version, at))
    text.replace(at, version.size(), "saltpan @VERSION@"), at += 15;
  // The model hash covers the tool version, so it is normalised too.
  for (size_t at = text.find("sha256:"); at != std::string::npos; at = text.find("sha256:", at + 1))
    if (at + 7 + 64 <= text.size())
      text.replace(at, 7 + 64, "sha256:@HASH@");
  return text;
}

// The body of function `name` of a checked compilation as LaTeX.
std::string fnLatex(const Compilation &c, const char *name) {
  const ast::FnDecl *fn = testing::find<ast::FnDecl>(c, name);
  REQUIRE(fn != nullptr);
  return latexExpr(*fn->body);
}

std::string methodsOf(const std::string &spec, MethodsFormat format, bool fragment = false) {
  Compilation c;
  compileFile(std::string(SALTPAN_SOURCE_DIR) + "/" + spec, c);
  INFO(testing::allDiagnostics(c));
  REQUIRE(c.checked);
  MethodsOptions o;
  o.format = format;
  o.fragment = fragment;
  o.sourceName = std::filesystem::path(spec).filename().string();
  return methodsText(c, o);
}

// The first line where the texts differ, for the failure message.
std::string firstDifference(const std::string &a, const std::string &b) {
  std::istringstream x(a), y(b);
  std::string lx, ly;
  for (int line = 1;; ++line) {
    bool gx = static_cast<bool>(std::getline(x, lx)), gy = static_cast<bool>(std::getline(y, ly));
    if (!gx && !gy)
      return "texts differ only in line endings";
    if (!gx || !gy || lx != ly)
      return "line " + std::to_string(line) + ":\n  expected: " + (gx ? lx : "<end>") + "\n  actual:   " +
             (gy ? ly : "<end>");
  }
}

void checkGolden(const std::string &spec, const std::string &name, MethodsFormat format) {
  std::string actual = normaliseVersion(methodsOf(spec, format));
  std::string path = std::string(SALTPAN_TESTS_DIR) + "/golden/methods/" + name +
                     (format == MethodsFormat::Latex ? ".tex.expected" : ".md.expected");
  if (testing::updateGoldenFiles()) {
    std::filesystem::create_directories(std::filesystem::path(path).parent_path());
    std::ofstream(path, std::ios::binary) << actual;
    WARN("updated " << path);
    return;
  }
  REQUIRE(std::filesystem::exists(path));
  std::string expected = readFile(path);
  INFO(path << " (set SALTPAN_UPDATE_GOLDEN=1 to regenerate)\n" << firstDifference(expected, actual));
  CHECK(expected == actual);
}

const char *squid = "specs/reference/squid_axon_1952.saltpan";
const char *tidewater = "specs/demo/tidewater_cell.saltpan";

} // namespace

TEST_CASE("methods: golden Markdown and LaTeX of the shipped specs", "[methods]") {
  checkGolden(squid, "squid_axon_1952", MethodsFormat::Markdown);
  checkGolden(squid, "squid_axon_1952", MethodsFormat::Latex);
  checkGolden(tidewater, "tidewater_cell", MethodsFormat::Markdown);
  checkGolden(tidewater, "tidewater_cell", MethodsFormat::Latex);
}

TEST_CASE("methods: output is deterministic and states what a paper needs", "[methods]") {
  std::string md = methodsOf(tidewater, MethodsFormat::Markdown);
  CHECK(md == methodsOf(tidewater, MethodsFormat::Markdown));
  CHECK(md.find("inside minus outside") != std::string::npos);
  CHECK(md.find("positive outward") != std::string::npos);
  CHECK(md.find("8.31446261815324") != std::string::npos);
  CHECK(md.find("96485.33212331") != std::string::npos);
  CHECK(md.find("$310.15\\,\\mathrm{K}$") != std::string::npos);
  CHECK(md.find("| $\\mathrm{K^{+}}$ | $+1$ | 140 | 5 | $-89.0587$ |") != std::string::npos);
  CHECK(md.find("\\alpha_{m} = \\frac{1.2\\,\\mathrm{ms^{-1}}}{\\operatorname{exprel}") != std::string::npos);
  CHECK(md.find("m^{3} h") != std::string::npos);
  CHECK(md.find("P_{\\mathrm{Na}} : P_{\\mathrm{K}} = 1 : 1.3") != std::string::npos);
  CHECK(md.find("a net charge of $+1\\,e$ outward per cycle") != std::string::npos);
  CHECK(md.find("Rush & Larsen 1978") != std::string::npos);
  CHECK(md.find("has the hash `sha256:") != std::string::npos);
  CHECK(md.find("saltpan is a research modelling tool; it is not for clinical or diagnostic decisions") !=
        std::string::npos);
  // Each function used by the kinetics is defined exactly once.
  CHECK(md.find("\\operatorname{logistic}\\left(x\\right) = ") != std::string::npos);
  CHECK(md.find("\\operatorname{logistic}\\left(x\\right) = ") ==
        md.rfind("\\operatorname{logistic}\\left(x\\right) = "));
  // Channels are sorted by name, compartments keep the model's order.
  CHECK(md.find("### Channel `MixedCation`") < md.find("### Channel `TidewaterSpikeNa`"));
  CHECK(md.find("### Compartment `soma`") < md.find("### Compartment `dendrite`"));
}

TEST_CASE("methods: a LaTeX document uses only article and amsmath; a fragment has no preamble", "[methods]") {
  std::string doc = methodsOf(squid, MethodsFormat::Latex);
  CHECK(doc.rfind("\\documentclass{article}\n\\usepackage{amsmath}\n\\begin{document}\n", 0) == 0);
  CHECK(doc.find("\\usepackage", doc.find("amsmath")) == std::string::npos);
  CHECK(doc.size() > 15);
  CHECK(doc.compare(doc.size() - 15, 15, "\\end{document}\n") == 0);
  std::string fragment = methodsOf(squid, MethodsFormat::Latex, true);
  CHECK(fragment.find("\\documentclass") == std::string::npos);
  CHECK(fragment.find("\\end{document}") == std::string::npos);
  CHECK(fragment.rfind("\\section*{Methods: SquidAxon1952}", 0) == 0);
  // The Dormand-Prince or Rosenbrock reference appears only when a protocol uses the method.
  CHECK(doc.find("Dormand") == std::string::npos);
  CHECK(doc.find("Runge--Kutta method (RK4)") != std::string::npos);
}

TEST_CASE("methods: units as LaTeX", "[methods]") {
  CHECK(latexUnit("mV") == "\\mathrm{mV}");
  CHECK(latexUnit("/ms") == "\\mathrm{ms^{-1}}");
  CHECK(latexUnit("uA/cm2") == "\\mathrm{\\mu A\\,cm^{-2}}");
  CHECK(latexUnit("%") == "\\%"); // a place as a percentage of its cable's length
  CHECK(latexUnit("\u00B5m") == "\\mathrm{\\mu m}");
  CHECK(latexUnit("mol/cm2/s") == "\\mathrm{mol\\,cm^{-2}\\,s^{-1}}");
  CHECK(latexUnit("J/mol/K") == "\\mathrm{J\\,mol^{-1}\\,K^{-1}}");
  CHECK(latexUnit("cm^2") == "\\mathrm{cm^{2}}");
  CHECK(latexUnit("Mohm") == "\\mathrm{M\\Omega}");
  CHECK(latexUnit("degC") == "{}^{\\circ}\\mathrm{C}");
}

TEST_CASE("methods: expressions as LaTeX", "[methods]") {
  auto c = compile(R"(use std.ions
const k_B2: 1 = 2
fn f(x: 1) -> 1 = exp(-x) / (1 + x)
fn g(x: 1) -> 1 = -(x + 1) * 2e-6 - (x - 3)
fn h(x: 1) -> 1 = pow(x, 2) + (x / 2)^2 + abs(x) + sqrt(x) + k_B2
fn c(v: mV) -> 1 = if v > 0 mV then 1 else 0
)");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  auto body = [&](const char *name) { return fnLatex(*c, name); };
  CHECK(body("f") == "\\frac{\\exp\\left(-x\\right)}{1 + x}");
  CHECK(body("g") == "-\\left(x + 1\\right) \\cdot 2 \\times 10^{-6} - \\left(x - 3\\right)");
  CHECK(body("h") == "{x}^{2} + {\\left(\\frac{x}{2}\\right)}^{2} + \\left|x\\right| + \\sqrt{x} + \\mathrm{k\\_B2}");
  CHECK(body("c") == "\\begin{cases} 1 & \\text{if } v > 0\\,\\mathrm{mV} \\\\ 0 & \\text{otherwise} \\end{cases}");
}

TEST_CASE("methods: numbers as the AST keeps them, wherever they are written", "[methods]") {
  auto c = compile(R"(fn p(x: 1) -> 1 = (2.50) * x + 1.0e-3 - (-
  3.0)
fn q(x: 1, w: 1) -> 1 = x/w^2.0 + x^-1.50
)");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  auto body = [&](const char *name) { return fnLatex(*c, name); };
  CHECK(body("p") == "2.50 \\cdot x + 1.0 \\times 10^{-3} - \\left(-3.0\\right)");
  CHECK(body("q") == "\\frac{x}{{w}^{2.0}} + {x}^{-1.50}");
  // The digits come from the AST, not from the source text.
  auto *p = ast::dyn_cast<ast::FnDecl>(c->program.root->decls.front().get());
  REQUIRE(p != nullptr);
  auto *difference = ast::dyn_cast<ast::BinaryExpr>(p->body.get());
  auto *sum = ast::dyn_cast<ast::BinaryExpr>(difference->lhs.get());
  auto *product = ast::dyn_cast<ast::BinaryExpr>(sum->lhs.get());
  REQUIRE(product != nullptr);
  auto *first = ast::dyn_cast<ast::NumberExpr>(product->lhs.get());
  REQUIRE(first != nullptr);
  first->spelling = "2.5000";
  CHECK(body("p") == "2.5000 \\cdot x + 1.0 \\times 10^{-3} - \\left(-3.0\\right)");
  // A number without digits of its own is printed with %.15g.
  first->spelling.clear();
  first->written = 0.1 + 0.2;
  CHECK(body("p") == "0.3 \\cdot x + 1.0 \\times 10^{-3} - \\left(-3.0\\right)");
}
