// parse_bench.cpp - the cost of the ANTLR parse alone (lexing and parser.spec(), no AST) on
// spec files: how often prediction falls back from SLL to full LL, the lookahead it reads, and
// the median time of repeated parses. A benchmark, not a test: it never fails on a figure.
//
//   saltpan_parse_bench [--runs N] FILE...
//   saltpan_parse_bench --once FILE...   each file parsed once, unprofiled, untimed: for
//       valgrind --tool=callgrind --toggle-collect='*parseOnce*', which counts instructions
#include <SaltpanLexer.h>
#include <SaltpanParser.h>
#include <antlr4-runtime.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

using saltpan::grammar::SaltpanLexer;
using saltpan::grammar::SaltpanParser;

namespace {

struct Profile {
  size_t tokens = 0;
  long long invocations = 0, sllLook = 0, llLook = 0, llFallbacks = 0;
  std::map<std::string, long long> fallbacksByRule; // the rule a fallback decision sits in
  bool syntaxErrors = false;
};

std::string readFile(const char *path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

// One parse; with `profile` the parser counts every prediction it makes.
Profile parseOnce(const std::string &text, bool profile) {
  antlr4::ANTLRInputStream input(text);
  SaltpanLexer lexer(&input);
  lexer.removeErrorListeners();
  antlr4::CommonTokenStream tokens(&lexer);
  tokens.fill();
  SaltpanParser parser(&tokens);
  parser.removeErrorListeners();
  parser.setProfile(profile);
  parser.spec();
  Profile p;
  p.tokens = tokens.size();
  p.syntaxErrors = parser.getNumberOfSyntaxErrors() > 0;
  if (!profile)
    return p;
  auto &atn = parser.getATN();
  for (const auto &d : parser.getParseInfo().getDecisionInfo()) {
    p.invocations += d.invocations;
    p.sllLook += d.SLL_TotalLook;
    p.llLook += d.LL_TotalLook;
    p.llFallbacks += d.LL_Fallback;
    if (d.LL_Fallback > 0) {
      size_t rule = atn.getDecisionState(d.decision)->ruleIndex;
      p.fallbacksByRule[parser.getRuleNames()[rule]] += d.LL_Fallback;
    }
  }
  return p;
}

double medianMicroseconds(const std::string &text, int runs) {
  std::vector<double> times;
  for (int i = 0; i < runs; ++i) {
    auto t0 = std::chrono::steady_clock::now();
    parseOnce(text, false);
    auto t1 = std::chrono::steady_clock::now();
    times.push_back(std::chrono::duration<double, std::micro>(t1 - t0).count());
  }
  std::sort(times.begin(), times.end());
  return times[times.size() / 2];
}

} // namespace

int main(int argc, char **argv) {
  int runs = 50;
  bool once = false;
  std::vector<const char *> files;
  for (int i = 1; i < argc; ++i) {
    if (!std::strcmp(argv[i], "--once"))
      once = true;
    else if (!std::strcmp(argv[i], "--runs") && i + 1 < argc)
      runs = std::max(1, std::atoi(argv[++i]));
    else
      files.push_back(argv[i]);
  }
  if (files.empty()) {
    std::fprintf(stderr, "usage: saltpan_parse_bench [--runs N | --once] FILE...\n");
    return 64;
  }
  if (once) {
    for (const char *path : files)
      parseOnce(readFile(path), false);
    return 0;
  }
  std::printf("%-40s %7s %9s %9s %7s %9s %10s  %s\n", "file", "tokens", "decisions", "SLL look", "LL fall", "LL look",
              "us/parse", "fallbacks by rule");
  Profile total;
  for (const char *path : files) {
    std::string text = readFile(path);
    // Profiled first, while the prediction cache is cold as in one `saltpan check`.
    Profile p = parseOnce(text, true);
    double us = medianMicroseconds(text, runs);
    std::string rules;
    for (const auto &[rule, n] : p.fallbacksByRule)
      rules += rule + ":" + std::to_string(n) + " ";
    const char *name = std::strrchr(path, '/') ? std::strrchr(path, '/') + 1 : path;
    std::printf("%-40s %7zu %9lld %9lld %7lld %9lld %10.1f  %s%s\n", name, p.tokens, p.invocations, p.sllLook,
                p.llFallbacks, p.llLook, us, rules.c_str(), p.syntaxErrors ? "(syntax errors)" : "");
    total.tokens += p.tokens;
    total.invocations += p.invocations;
    total.sllLook += p.sllLook;
    total.llFallbacks += p.llFallbacks;
    total.llLook += p.llLook;
  }
  std::printf("%-40s %7zu %9lld %9lld %7lld %9lld\n", "total", total.tokens, total.invocations, total.sllLook,
              total.llFallbacks, total.llLook);
  return 0;
}
