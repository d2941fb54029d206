// SyntaxErrors.cpp - turns ANTLR's syntax errors into plain-English diagnostics.
#include "ParseInternal.h"

#include <cctype>

namespace saltpan::parsing {

using grammar::SaltpanLexer;

std::string tokenName(const antlr4::dfa::Vocabulary &vocabulary, size_t type) {
  switch (type) {
  case antlr4::Token::EOF:
    return "end of file";
  case SaltpanLexer::IDENT:
    return "a name";
  case SaltpanLexer::NUMBER:
    return "a number";
  case SaltpanLexer::STRING:
    return "a string";
  case SaltpanLexer::SLASH:
    return "'/'";
  case SaltpanLexer::DOT:
    return "'\u00B7'";
  case SaltpanLexer::UNIT_DIV:
  case SaltpanLexer::UNIT_MUL:
    return "a unit";
  case SaltpanLexer::UNIT_POW:
    return "an exponent";
  default:
    break;
  }
  std::string literal = vocabulary.getLiteralName(type);
  if (!literal.empty())
    return literal;
  return vocabulary.getDisplayName(type);
}

namespace {

// A keyword is a token whose literal is a word ('model', 'latin_hypercube'), not punctuation.
bool isKeyword(const antlr4::dfa::Vocabulary &vocabulary, size_t type) {
  std::string literal = vocabulary.getLiteralName(type);
  if (literal.size() < 3 || literal.front() != '\'' || literal.back() != '\'')
    return false;
  for (size_t i = 1; i + 1 < literal.size(); ++i)
    if (!std::isalnum(static_cast<unsigned char>(literal[i])) && literal[i] != '_')
      return false;
  return std::isalpha(static_cast<unsigned char>(literal[1]));
}

std::string quoted(const antlr4::Token *t) {
  if (!t || t->getType() == antlr4::Token::EOF)
    return "end of file";
  std::string text = t->getText();
  if (text.size() > 24)
    text = text.substr(0, 21) + "...";
  return "'" + text + "'";
}

std::string expectedList(const antlr4::dfa::Vocabulary &vocabulary, const antlr4::misc::IntervalSet &set) {
  std::vector<std::string> names;
  for (ssize_t type : set.toList()) {
    if (type < 0)
      continue;
    std::string n = tokenName(vocabulary, static_cast<size_t>(type));
    if (n.empty() || n == "<INVALID>")
      continue;
    names.push_back(n);
  }
  if (names.size() > 8) {
    // A block's items (a compartment's, a protocol's) are many keywords and a brace: list the
    // keywords, which are what a writer can choose from; a longer mixture says nothing useful.
    std::vector<std::string> words;
    for (const std::string &n : names)
      if (n.size() > 2 && n.front() == '\'' && std::isalpha(static_cast<unsigned char>(n[1])))
        words.push_back(n);
    if (words.size() < 4 || words.size() > 16)
      return "";
    names = words;
  }
  if (names.empty())
    return "";
  std::string out;
  for (size_t i = 0; i < names.size(); ++i) {
    if (i > 0)
      out += i + 1 == names.size() ? " or " : ", ";
    out += names[i];
  }
  return out;
}

} // namespace

void SyntaxErrorListener::syntaxError(antlr4::Recognizer *recognizer, antlr4::Token *offending, size_t,
                                      size_t, const std::string &msg, std::exception_ptr e) {
  ++count_;
  // One bad byte can make the parser complain many times; the first dozen say enough.
  if (count_ > 12) {
    if (count_ == 13)
      diags_.error(tokenRange(file_, offending), "too many syntax errors; stopping here");
    return;
  }
  const auto &vocabulary = recognizer->getVocabulary();
  SourceRange range = tokenRange(file_, offending);
  std::string message;
  std::string expected;
  auto *parser = dynamic_cast<antlr4::Parser *>(recognizer);
  if (offending && offending->getType() == SaltpanLexer::STRAY) {
    message = "unexpected character " + quoted(offending);
  } else if (offending && offending->getType() == SaltpanLexer::UNTERMINATED_STRING) {
    message = "string is not closed; add '\"' before the end of the line";
  } else {
    bool failedPredicate = false;
    if (e) {
      try {
        std::rethrow_exception(e);
      } catch (antlr4::FailedPredicateException &) {
        failedPredicate = true;
      } catch (antlr4::InputMismatchException &ex) {
        expected = expectedList(vocabulary, ex.getExpectedTokens());
        (void)failedPredicate;
      } catch (antlr4::NoViableAltException &ex) {
        // Only when the choice failed at its first token do the choices' first tokens say what fits.
        if (parser && ex.getStartToken() == offending)
          expected = expectedList(vocabulary, parser->getExpectedTokens());
      } catch (...) {
      }
    } else if (parser) {
      expected = expectedList(vocabulary, parser->getExpectedTokens());
    }
    if (failedPredicate)
      message = "a unit must follow its number on the same line, written without spaces";
    else if (msg.rfind("missing ", 0) == 0 && !expected.empty())
      message = "expected " + expected + " before " + quoted(offending);
    else if (offending && offending->getType() == antlr4::Token::EOF)
      message = "unexpected end of file" + (expected.empty() ? "" : "; expected " + expected);
    else
      message = "unexpected " + quoted(offending) + (expected.empty() ? "" : "; expected " + expected);
    bool keyword = offending && isKeyword(vocabulary, offending->getType());
    bool inPlace =
        parser && parser->getContext() && parser->getContext()->getRuleIndex() == grammar::SaltpanParser::RulePosition;
    if (inPlace && !failedPredicate) {
      message = "a place along a cable needs its unit: a length ('450 um') or a percentage of the cable's length "
                "('50 %')";
      noiseLine_ = range.begin.line;
    } else if (keyword && expected.find("a name") != std::string::npos) {
      message += " ('" + offending->getText() + "' is a keyword and cannot be used as a name)";
      noiseLine_ = range.begin.line;
    } else if (noiseLine_ == range.begin.line && range.begin.offset > lastOffset_) {
      // Recovery may read the keyword as the start of its own construct ('sweep' as a sweep), or
      // the amplitude after a place as its unit: what follows on that line is noise after the
      // one real mistake.
      --count_;
      return;
    }
  }
  // ANTLR may complain twice at one token while recovering; keep the more helpful message.
  if (range.begin.offset == lastOffset_ && diags_.last()) {
    if (message.size() > diags_.last()->message.size())
      diags_.last()->message = message;
    --count_;
    return;
  }
  lastOffset_ = range.begin.offset;
  diags_.error(range, message);
}

} // namespace saltpan::parsing
