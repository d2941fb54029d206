// Keywords.tests.cpp - the reserved words: the grammar's word tokens, the list in
// docs/language.md and the "is a keyword" hint must agree, word for word.
#include "Diagnostics.h"
#include "Source.h"
#include "TestSupport.h"
#include "parse/Parse.h"

#include <catch2/catch.hpp>

#include <fstream>
#include <regex>
#include <set>
#include <sstream>

using namespace saltpan;
using testing::readFile;

namespace {

// Lexer rules of the form `NAME : 'word' ;` in the grammar.
std::set<std::string> grammarKeywords() {
  std::string grammar = readFile(std::string(SALTPAN_SOURCE_DIR) + "/grammar/Saltpan.g4");
  static const std::regex rule(R"(\n[A-Z_0-9]+ *: *'([a-z_][a-z_0-9]*)' *;)");
  std::set<std::string> words;
  for (std::sregex_iterator i(grammar.begin(), grammar.end(), rule), end; i != end; ++i)
    words.insert((*i)[1]);
  return words;
}

// The fenced block after "**Keywords.**" in the language reference.
std::set<std::string> documentedKeywords() {
  std::string doc = readFile(std::string(SALTPAN_SOURCE_DIR) + "/docs/language.md");
  size_t at = doc.find("**Keywords.**");
  REQUIRE(at != std::string::npos);
  size_t open = doc.find("```\n", at);
  size_t close = doc.find("```", open + 4);
  REQUIRE(close != std::string::npos);
  std::istringstream block(doc.substr(open + 4, close - open - 4));
  std::set<std::string> words;
  for (std::string w; block >> w;)
    words.insert(w);
  return words;
}

} // namespace

TEST_CASE("the documented keyword list is the grammar's", "[keywords]") {
  std::set<std::string> grammar = grammarKeywords();
  REQUIRE(grammar.size() > 60);
  CHECK(documentedKeywords() == grammar);
}

TEST_CASE("every keyword used as a name gets the keyword hint", "[keywords]") {
  for (const std::string &word : grammarKeywords()) {
    SourceFile file("kw.saltpan", "const " + word + " = 1\n");
    DiagnosticEngine diags;
    auto module = parse(file, diags);
    INFO(word);
    CHECK(module == nullptr);
    REQUIRE(!diags.all().empty());
    CHECK(diags.all().front().message.find("'" + word + "' is a keyword and cannot be used as a name") !=
          std::string::npos);
  }
}
