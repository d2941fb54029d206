// BuildAST.tests.cpp - what the AST builder (compiler/parse/BuildAST.cpp) keeps of number
// literals: the value as written and its digits, which `saltpan methods` prints.
#include "TestSupport.h"

#include <vector>

using namespace saltpan;
using testing::compile;

namespace {

// The numbers of an expression tree, left to right.
void numbers(const ast::Expr &e, std::vector<const ast::NumberExpr *> &out) {
  if (auto *n = ast::dyn_cast<ast::NumberExpr>(&e)) {
    out.push_back(n);
  } else if (auto *u = ast::dyn_cast<ast::UnaryExpr>(&e)) {
    numbers(*u->operand, out);
  } else if (auto *b = ast::dyn_cast<ast::BinaryExpr>(&e)) {
    numbers(*b->lhs, out);
    numbers(*b->rhs, out);
  }
}

std::vector<const ast::NumberExpr *> numbersOf(const Compilation &c, const std::string &fn) {
  const ast::FnDecl *decl = testing::find<ast::FnDecl>(c, fn);
  REQUIRE(decl != nullptr);
  std::vector<const ast::NumberExpr *> out;
  numbers(*decl->body, out);
  return out;
}

} // namespace

TEST_CASE("the AST keeps each number literal's digits as written", "[parse]") {
  auto c = compile(R"(fn plain(x: 1) -> 1 = 2.50 * x + 1E+03 - .5e-01 + 7.
fn signed(x: 1) -> 1 = x * -0.070 + (- 3.0) * -
  4.00
fn powers(x: 1, w: 1) -> 1 = x^-1.50 + x^2 + x/w^2.0 + x*w^-3
fn units(v: mV) -> 1 = v / 0.10 mV + v / -65.0 mV
)");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  struct Want {
    double written;
    const char *spelling;
  };
  auto check = [&](const char *fn, std::vector<Want> want) {
    INFO("fn " << fn);
    auto got = numbersOf(*c, fn);
    REQUIRE(got.size() == want.size());
    for (size_t i = 0; i < want.size(); ++i) {
      INFO("number " << i);
      CHECK(got[i]->written == want[i].written);
      CHECK(got[i]->spelling == want[i].spelling);
    }
  };
  check("plain", {{2.5, "2.50"}, {1000, "1E+03"}, {0.05, ".5e-01"}, {7, "7."}});
  // A sign folded into its number stays out of the digits, wherever the number is written.
  check("signed", {{-0.07, "0.070"}, {-3, "3.0"}, {-4, "4.00"}});
  check("powers", {{-1.5, "1.50"}, {2, "2"}, {2, "2.0"}, {-3, "3"}});
  check("units", {{0.1, "0.10"}, {-65, "65.0"}});
}

TEST_CASE("a number too large to represent has no spelling", "[parse]") {
  auto c = compile("fn big(x: 1) -> 1 = x * 1e999\n");
  CHECK(testing::hasError(*c, "too large to represent"));
  const ast::FnDecl *decl = c->program.root && !c->program.root->decls.empty()
                                ? ast::dyn_cast<ast::FnDecl>(c->program.root->decls.front().get())
                                : nullptr;
  REQUIRE(decl != nullptr);
  std::vector<const ast::NumberExpr *> got;
  numbers(*decl->body, got);
  REQUIRE(got.size() == 1);
  CHECK(got[0]->written == 0);
  CHECK(got[0]->spelling.empty());
}
