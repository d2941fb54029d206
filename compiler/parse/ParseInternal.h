// ParseInternal.h - shared between the files of compiler/parse/ only.
#pragma once
#include "../AST.h"
#include "Diagnostics.h"

#include <SaltpanLexer.h>
#include <SaltpanParser.h>
#include <antlr4-runtime.h>

namespace saltpan::parsing {

/// Converts ANTLR token positions (code points) into our locations.
inline SourceRange tokenRange(const SourceFile &file, const antlr4::Token *t) {
  if (!t || t->getType() == antlr4::Token::EOF)
    return {file.endLoc(), file.endLoc()};
  auto begin = file.locAtCodePoint(t->getStartIndex());
  auto end = t->getStopIndex() >= t->getStartIndex() ? file.locAtCodePoint(t->getStopIndex()) : begin;
  return {begin, end};
}

/// Routes ANTLR's syntax errors to the DiagnosticEngine in plain English.
class SyntaxErrorListener : public antlr4::BaseErrorListener {
public:
  SyntaxErrorListener(const SourceFile &file, DiagnosticEngine &diags) : file_(file), diags_(diags) {}
  void syntaxError(antlr4::Recognizer *recognizer, antlr4::Token *offending, size_t line,
                   size_t charPositionInLine, const std::string &msg, std::exception_ptr e) override;
  size_t count() const { return count_; }

private:
  const SourceFile &file_;
  DiagnosticEngine &diags_;
  size_t count_ = 0;
  uint32_t lastOffset_ = UINT32_MAX; // where the previous syntax error was reported
  uint32_t noiseLine_ = 0;           // a line whose rest is noise after its first error (a keyword used as a name)
};

/// Readable name of a token type: "'model'", "a name", "a number".
std::string tokenName(const antlr4::dfa::Vocabulary &vocabulary, size_t type);

/// Builds the AST from a successful parse; reports semantic slips it notices.
std::unique_ptr<ast::Module> buildModule(grammar::SaltpanParser::SpecContext *spec,
                                         antlr4::CommonTokenStream &tokens, const SourceFile &file,
                                         DiagnosticEngine &diags);

} // namespace saltpan::parsing
