// Parse.cpp - Stage 1 entry point: validates the bytes, runs the ANTLR lexer and parser,
// guards against input that would recurse too deeply, then hands over to BuildAST.
#include "Parse.h"

#include "ParseInternal.h"

#include <sstream>

namespace saltpan {

using grammar::SaltpanLexer;
using grammar::SaltpanParser;

namespace {

// Input that nests deeper than any real spec would only exhaust the parser's stack.
constexpr int maxBracketDepth = 64;
constexpr int maxPrefixOperators = 256;
constexpr int maxTokensPerClause = 4000;

bool startsClause(size_t type) {
  switch (type) {
  case SaltpanLexer::IF:
  case SaltpanLexer::THEN:
  case SaltpanLexer::ELSE:
  case SaltpanLexer::AND:
  case SaltpanLexer::OR:
  case SaltpanLexer::NOT:
  case SaltpanLexer::IN:
  case SaltpanLexer::OUT:
    return false;
  default:
    return type >= SaltpanLexer::MODEL && type <= SaltpanLexer::SOURCE;
  }
}

bool checkLimits(const SourceFile &file, antlr4::CommonTokenStream &tokens, DiagnosticEngine &diags) {
  int depth = 0, prefix = 0, clause = 0;
  size_t prevType = 0;
  std::string prevText;
  for (antlr4::Token *t : tokens.getTokens()) {
    if (t->getChannel() != antlr4::Token::DEFAULT_CHANNEL)
      continue;
    std::string text = t->getText();
    size_t type = t->getType();
    if (startsClause(type) || text == "{" || text == "}") {
      prefix = 0;
      clause = 0;
    }
    if (text == "(" || text == "[" || text == "{")
      ++depth;
    else if (text == ")" || text == "]" || text == "}")
      depth = std::max(0, depth - 1);
    // Only operators that nest (prefix signs, 'not', 'if', '^') deepen the parser's recursion;
    // a long flat sum does not.
    bool afterOperand = prevType == SaltpanLexer::NUMBER || prevType == SaltpanLexer::IDENT || prevText == ")" ||
                        prevText == "]" || prevType == SaltpanLexer::UNIT_DIV || prevType == SaltpanLexer::UNIT_MUL ||
                        prevType == SaltpanLexer::UNIT_POW || prevType == SaltpanLexer::IN ||
                        prevType == SaltpanLexer::OUT;
    if (((text == "-" || text == "+") && !afterOperand) || text == "^" || type == SaltpanLexer::NOT ||
        type == SaltpanLexer::IF)
      ++prefix;
    prevType = type;
    prevText = text;
    ++clause;
    const char *problem = nullptr;
    if (depth > maxBracketDepth)
      problem = "brackets are nested too deeply (more than 64 levels)";
    else if (prefix > maxPrefixOperators)
      problem = "expression has too many nested operators (more than 256)";
    else if (clause > maxTokensPerClause)
      problem = "expression is too long (more than 4000 tokens)";
    if (problem) {
      diags.error(parsing::tokenRange(file, t), problem);
      return false;
    }
  }
  return true;
}

} // namespace

std::unique_ptr<ast::Module> parse(const SourceFile &file, DiagnosticEngine &diags) {
  // ANTLR's input stream throws on invalid UTF-8, so check the bytes first.
  if (auto bad = findInvalidUtf8(file.text())) {
    SourceLoc loc = file.locAtOffset(static_cast<uint32_t>(*bad));
    char hex[8];
    std::snprintf(hex, sizeof hex, "0x%02X", static_cast<unsigned char>(file.text()[*bad]));
    auto &d = diags.error({loc, loc}, std::string("file is not valid UTF-8 text (byte ") + hex + ")");
    DiagnosticEngine::note(d, {}, "saltpan specs are UTF-8 text files; is this a binary file?");
    return nullptr;
  }
  antlr4::ANTLRInputStream input(file.text());
  SaltpanLexer lexer(&input);
  lexer.removeErrorListeners();
  antlr4::CommonTokenStream tokens(&lexer);
  tokens.fill();
  if (!checkLimits(file, tokens, diags))
    return nullptr;

  SaltpanParser parser(&tokens);
  parser.removeErrorListeners();
  parsing::SyntaxErrorListener listener(file, diags);
  parser.addErrorListener(&listener);
  SaltpanParser::SpecContext *spec = parser.spec();
  if (listener.count() > 0)
    return nullptr;
  return parsing::buildModule(spec, tokens, file, diags);
}

std::string dumpTokens(const SourceFile &file) {
  std::ostringstream out;
  if (findInvalidUtf8(file.text()))
    return "";
  antlr4::ANTLRInputStream input(file.text());
  SaltpanLexer lexer(&input);
  lexer.removeErrorListeners();
  antlr4::CommonTokenStream tokens(&lexer);
  tokens.fill();
  for (antlr4::Token *t : tokens.getTokens()) {
    auto range = parsing::tokenRange(file, t);
    out << range.begin.line << ":" << range.begin.column << " "
        << parsing::tokenName(lexer.getVocabulary(), t->getType());
    if (t->getType() != antlr4::Token::EOF)
      out << " '" << t->getText() << "'";
    out << "\n";
  }
  return out.str();
}

} // namespace saltpan
