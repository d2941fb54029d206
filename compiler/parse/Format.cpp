// Format.cpp - `saltpan fmt` and `saltpan hash`: lays a spec's tokens out in the canonical layout.
//
// The parse tree says where items and blocks start; spacing is a rule on pairs of tokens.
// Token texts are copied, never re-printed. The lexer skips '#' comments, so they are read
// back from the gaps between tokens. Every result is re-lexed and re-parsed before it is
// returned: a layout that would change a token or the parse is a bug, not a diagnostic.
#include "Format.h"

#include "Parse.h"
#include "ParseInternal.h"

#include <cctype>
#include <map>
#include <stdexcept>

namespace saltpan {

using grammar::SaltpanLexer;
using grammar::SaltpanParser;

namespace {

using antlr4::ParserRuleContext;
using antlr4::tree::ParseTree;
using antlr4::tree::TerminalNode;

constexpr size_t none = SIZE_MAX;
constexpr int indentWidth = 2;
constexpr int continuationIndent = 4; // extra spaces on a line that continues an item
constexpr const char *trailingGap = "  "; // between code and a comment after it on its line

struct Comment {
  std::string text; // trailing blanks removed
  uint32_t begin = 0, end = 0;
};

struct Token {
  size_t type = 0;
  std::string text;
  uint32_t begin = 0, end = 0; // byte offsets
  TerminalNode *node = nullptr;
};

/// One lexed and parsed text; the parse tree points into the objects owned here.
struct Parsed {
  std::unique_ptr<antlr4::ANTLRInputStream> input;
  std::unique_ptr<SaltpanLexer> lexer;
  std::unique_ptr<antlr4::CommonTokenStream> stream;
  std::unique_ptr<SaltpanParser> parser;
  SaltpanParser::SpecContext *spec = nullptr;
  std::vector<Token> tokens; // default channel, without EOF
  std::vector<Comment> comments;
  std::map<const antlr4::Token *, size_t> position; // a token -> its place in `tokens`
  bool syntaxOk = false;
};

std::string trimRight(std::string s) {
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t' || s.back() == '\f' || s.back() == '\v'))
    s.pop_back();
  return s;
}

size_t codePoints(const std::string &s) {
  size_t n = 0;
  for (unsigned char c : s)
    n += (c & 0xC0) != 0x80;
  return n;
}

void lexAndParse(const std::string &text, Parsed &p) {
  p.input = std::make_unique<antlr4::ANTLRInputStream>(text);
  p.lexer = std::make_unique<SaltpanLexer>(p.input.get());
  p.lexer->removeErrorListeners();
  p.stream = std::make_unique<antlr4::CommonTokenStream>(p.lexer.get());
  p.stream->fill();
  p.parser = std::make_unique<SaltpanParser>(p.stream.get());
  p.parser->removeErrorListeners();
  p.spec = p.parser->spec();
  p.syntaxOk = p.parser->getNumberOfSyntaxErrors() == 0;

  // ANTLR counts code points; our offsets are bytes.
  std::vector<uint32_t> offsets;
  for (uint32_t i = 0; i < text.size(); ++i)
    if ((static_cast<unsigned char>(text[i]) & 0xC0) != 0x80)
      offsets.push_back(i);
  offsets.push_back(static_cast<uint32_t>(text.size()));

  auto scanGap = [&](uint32_t from, uint32_t to) {
    for (uint32_t k = from; k < to; ++k) {
      if (text[k] != '#')
        continue;
      uint32_t end = k;
      while (end < to && text[end] != '\n' && text[end] != '\r')
        ++end;
      p.comments.push_back({trimRight(text.substr(k, end - k)), k, end});
      k = end;
    }
  };
  std::map<size_t, size_t> indexOf; // token index -> position in p.tokens
  uint32_t pos = 0;
  for (antlr4::Token *t : p.stream->getTokens()) {
    bool eof = t->getType() == antlr4::Token::EOF;
    uint32_t begin = eof ? static_cast<uint32_t>(text.size()) : offsets.at(t->getStartIndex());
    scanGap(pos, begin);
    if (eof)
      break;
    std::string tokenText = t->getText();
    uint32_t end = begin + static_cast<uint32_t>(tokenText.size());
    if (t->getType() == SaltpanLexer::DOC_COMMENT)
      p.comments.push_back({trimRight(tokenText), begin, end});
    else if (t->getChannel() == antlr4::Token::DEFAULT_CHANNEL) {
      indexOf[t->getTokenIndex()] = p.tokens.size();
      p.position[t] = p.tokens.size();
      p.tokens.push_back({t->getType(), tokenText, begin, end, nullptr});
    }
    pos = end;
  }
  // Attach the parse tree's terminal nodes to the tokens.
  std::vector<ParseTree *> work{p.spec};
  while (!work.empty()) {
    ParseTree *node = work.back();
    work.pop_back();
    if (auto *terminal = dynamic_cast<TerminalNode *>(node)) {
      auto it = indexOf.find(terminal->getSymbol()->getTokenIndex());
      if (it != indexOf.end())
        p.tokens[it->second].node = terminal;
      continue;
    }
    for (ParseTree *child : node->children)
      work.push_back(child);
  }
}

bool isSemicolon(ParseTree *node) {
  auto *terminal = dynamic_cast<TerminalNode *>(node);
  return terminal && terminal->getSymbol()->getText() == ";";
}
// An empty item: a ';' alone, or a rule whose only child is one.
bool isEmptyItem(ParseTree *node) {
  return isSemicolon(node) || (node->children.size() == 1 && isSemicolon(node->children[0]));
}

/// The parse tree as text, without ';' (separators never change what a spec means).
void normalisedTree(ParseTree *node, std::string &out) {
  if (auto *terminal = dynamic_cast<TerminalNode *>(node)) {
    if (terminal->getSymbol()->getType() == antlr4::Token::EOF || isSemicolon(node))
      return;
    out += terminal->getSymbol()->getText();
    out += '\x1f';
    return;
  }
  if (dynamic_cast<ParserRuleContext *>(node) && isEmptyItem(node))
    return;
  auto *ctx = dynamic_cast<ParserRuleContext *>(node);
  out += "(" + std::to_string(ctx ? ctx->getRuleIndex() : 0) + " ";
  for (ParseTree *child : node->children)
    normalisedTree(child, out);
  out += ")";
}

// True when the texts of two tokens written together lex back as the same two tokens.
bool lexesApart(const Token &a, const Token &b) {
  static std::map<std::pair<std::string, std::string>, bool> cache;
  auto key = std::make_pair(a.text, b.text);
  if (auto it = cache.find(key); it != cache.end())
    return it->second;
  antlr4::ANTLRInputStream input(a.text + b.text);
  SaltpanLexer lexer(&input);
  lexer.removeErrorListeners();
  std::vector<std::unique_ptr<antlr4::Token>> got;
  for (auto t = lexer.nextToken(); t->getType() != antlr4::Token::EOF; t = lexer.nextToken())
    got.push_back(std::move(t));
  bool ok = got.size() == 2 && got[0]->getType() == a.type && got[0]->getText() == a.text &&
            got[1]->getType() == b.type && got[1]->getText() == b.text;
  cache[key] = ok;
  return ok;
}

/// How a token is separated from the one before it.
enum class Sep {
  Start,  // first token of the file
  Top,    // starts a top-level declaration
  Item,   // starts an item of an expanded block
  Close,  // '}' of an expanded block
  Inline, // within an item: a space or nothing, by the pair rule
};

struct Block {
  size_t open = 0, close = 0;                       // positions of '{' and '}'
  std::vector<std::pair<size_t, size_t>> entries;   // first and last position of each item
  bool membrane = false;
};

struct MembraneColumns {
  size_t name = none, densityBegin = none, densityEnd = none, reversal = none;
};

class Formatter {
public:
  Formatter(const SourceFile &file, Parsed &parsed) : file_(file), p_(parsed) {
    size_t n = p_.tokens.size();
    depth_.assign(n, 0);
    startsItem_.assign(n, -1);
    blockOfBrace_.assign(n, none);
    blockOfEntry_.assign(n, none);
    walk(p_.spec, 0);
  }

  /// The canonical text; `bare` leaves out comments and the blank lines and breaks kept from
  /// the source. Throws std::logic_error if the layout would change the tokens or the parse.
  std::string format(bool bare) {
    std::string original;
    normalisedTree(p_.spec, original);
    // Try to drop every ';'; where that changes the parse, keep those before a name; else all.
    for (int attempt = 0; attempt < 3; ++attempt) {
      std::vector<bool> keep(p_.tokens.size(), true);
      for (size_t i = 0; i < p_.tokens.size(); ++i) {
        if (p_.tokens[i].text != ";")
          continue;
        size_t next = i + 1;
        bool beforeName = next < p_.tokens.size() && p_.tokens[next].type == SaltpanLexer::IDENT;
        keep[i] = attempt == 2 || (attempt == 1 && beforeName);
      }
      std::string text = render(keep, bare);
      Parsed check;
      lexAndParse(text, check);
      verifyTokens(keep, check, bare);
      std::string tree;
      normalisedTree(check.spec, tree);
      if (check.syntaxOk && tree == original)
        return text;
    }
    throw std::logic_error("the canonical layout of '" + file_.path() + "' would change its parse");
  }

private:
  const SourceFile &file_;
  Parsed &p_;
  std::vector<int> depth_;         // nesting depth of the innermost item holding each token
  std::vector<int> startsItem_;    // depth of the item a token starts, or -1
  std::vector<size_t> blockOfBrace_, blockOfEntry_;
  std::vector<Block> blocks_;
  std::map<size_t, MembraneColumns> membraneRows_; // by the position of the entry's name
  std::map<size_t, size_t> topKindEnd_;            // top-level item start -> its last position

  size_t posOf(antlr4::Token *t) const {
    auto it = p_.position.find(t);
    return it == p_.position.end() ? none : it->second;
  }
  std::pair<size_t, size_t> span(ParseTree *node) const {
    if (auto *terminal = dynamic_cast<TerminalNode *>(node)) {
      size_t at = posOf(terminal->getSymbol());
      return {at, at};
    }
    auto *ctx = static_cast<ParserRuleContext *>(node);
    return {posOf(ctx->getStart()), posOf(ctx->getStop())};
  }

  void walk(ParseTree *node, int depth) {
    if (auto *terminal = dynamic_cast<TerminalNode *>(node)) {
      if (size_t at = posOf(terminal->getSymbol()); at != none)
        depth_[at] = depth;
      return;
    }
    if (node == p_.spec) {
      for (ParseTree *child : node->children) {
        if (!isEmptyItem(child) &&
            !(dynamic_cast<TerminalNode *>(child) &&
              static_cast<TerminalNode *>(child)->getSymbol()->getType() == antlr4::Token::EOF)) {
          auto [first, last] = span(child);
          if (first != none) {
            startsItem_[first] = 0;
            topKindEnd_[first] = last;
          }
        }
        walk(child, 0);
      }
      return;
    }
    size_t open = none, close = none;
    for (size_t i = 0; i < node->children.size(); ++i) {
      auto *terminal = dynamic_cast<TerminalNode *>(node->children[i]);
      if (!terminal)
        continue;
      if (terminal->getSymbol()->getText() == "{" && open == none)
        open = i;
      else if (terminal->getSymbol()->getText() == "}")
        close = i;
    }
    if (open == none || close == none || close < open) {
      for (ParseTree *child : node->children)
        walk(child, depth);
      return;
    }
    Block block;
    block.open = span(node->children[open]).first;
    block.close = span(node->children[close]).first;
    block.membrane = dynamic_cast<SaltpanParser::MembraneItemContext *>(node) != nullptr;
    size_t index = blocks_.size();
    blocks_.push_back({});
    blockOfBrace_[block.open] = blockOfBrace_[block.close] = index;
    for (size_t i = 0; i < node->children.size(); ++i) {
      ParseTree *child = node->children[i];
      bool inside = i > open && i < close;
      if (inside && !isEmptyItem(child)) {
        auto entry = span(child);
        block.entries.push_back(entry);
        startsItem_[entry.first] = depth + 1;
        blockOfEntry_[entry.first] = index;
        if (auto *row = dynamic_cast<SaltpanParser::MembraneEntryContext *>(child); row && block.membrane) {
          MembraneColumns columns;
          columns.name = posOf(row->IDENT()->getSymbol());
          auto density = span(row->expr(0));
          columns.densityBegin = density.first;
          columns.densityEnd = density.second;
          if (row->REVERSAL())
            columns.reversal = posOf(row->REVERSAL()->getSymbol());
          membraneRows_[columns.name] = columns;
        }
      }
      walk(child, inside ? depth + 1 : depth);
    }
    blocks_[index] = std::move(block);
  }

  // ---- the pair rule: a space between two tokens on one line, or nothing ----

  bool sameParent(size_t a, size_t b) const {
    return p_.tokens[a].node && p_.tokens[b].node && p_.tokens[a].node->parent == p_.tokens[b].node->parent;
  }
  bool isUnarySign(size_t a) const {
    const Token &t = p_.tokens[a];
    if ((t.text != "-" && t.text != "+") || !t.node || !t.node->parent)
      return false;
    return !t.node->parent->children.empty() && t.node->parent->children[0] == t.node;
  }
  // A name or keyword (what a parenthesis may be glued to), by its text.
  static bool isWord(const Token &t) {
    unsigned char c = t.text.empty() ? 0 : static_cast<unsigned char>(t.text[0]);
    return std::isalpha(c) || c == '_' || c >= 0x80;
  }
  bool firstChild(size_t a) const {
    const TerminalNode *node = p_.tokens[a].node;
    return node && node->parent && !node->parent->children.empty() && node->parent->children[0] == node;
  }
  int parentRule(size_t a) const {
    auto *ctx = p_.tokens[a].node ? dynamic_cast<ParserRuleContext *>(p_.tokens[a].node->parent) : nullptr;
    return ctx ? static_cast<int>(ctx->getRuleIndex()) : -1;
  }

  bool glued(size_t a, size_t b) const {
    const Token &x = p_.tokens[a], &y = p_.tokens[b];
    bool glue = false;
    if (y.text == ";" || y.text == "," || y.text == ")" || y.text == "]" || y.text == ":" || y.text == ".")
      glue = true;
    else if (x.text == "(" || x.text == "[" || x.text == "." || isUnarySign(a))
      glue = true;
    else if (y.type == SaltpanLexer::UNIT_POW)
      glue = true;
    else if (y.type == SaltpanLexer::UNIT_DIV || y.type == SaltpanLexer::UNIT_MUL)
      // "mS/cm2", "x/tau", "1/ms" as a unit type, but "0.1 /ms" for a number with a unit.
      glue = (x.type == SaltpanLexer::IDENT || x.type == SaltpanLexer::UNIT_POW || x.type == SaltpanLexer::UNIT_DIV ||
              x.type == SaltpanLexer::UNIT_MUL || x.text == ")" ||
              (x.type == SaltpanLexer::NUMBER && parentRule(b) != SaltpanParser::RuleUnit));
    else if (y.text == "(" && isWord(x) && !firstChild(b))
      glue = true; // a call, a fn's parameter list, an expectation's measure: not "(x)" alone
    else if ((y.type == SaltpanLexer::IN || y.type == SaltpanLexer::OUT) && x.text == "]" && sameParent(a, b))
      glue = true; // [Na]in
    return glue && lexesApart(x, y);
  }

  std::string inlineText(size_t first, size_t last) const {
    std::string s;
    for (size_t i = first; i <= last; ++i) {
      if (i > first && !glued(i - 1, i))
        s += ' ';
      s += p_.tokens[i].text;
    }
    return s;
  }

  // ---- rendering ----

  std::string render(const std::vector<bool> &keep, bool bare) {
    const std::string &src = file_.text();
    std::vector<size_t> kept;
    for (size_t i = 0; i < p_.tokens.size(); ++i)
      if (keep[i])
        kept.push_back(i);
    size_t n = kept.size();

    // The gap before each kept token (and after the last): its comments and line breaks.
    struct Gap {
      std::vector<Comment> comments;
      bool trailing = false;               // comments[0] is on the line of the previous token
      std::vector<bool> blankBefore;       // a blank line above comments[c]
      bool newline = false, blankBeforeToken = false;
    };
    std::vector<Gap> gaps(n + 1);
    auto newlines = [&](uint32_t from, uint32_t to) {
      int count = 0;
      for (uint32_t k = from; k < to && k < src.size(); ++k)
        count += src[k] == '\n';
      return count;
    };
    size_t ci = 0;
    for (size_t k = 0; k <= n; ++k) {
      uint32_t from = k == 0 ? 0 : p_.tokens[kept[k - 1]].end;
      uint32_t to = k == n ? static_cast<uint32_t>(src.size()) : p_.tokens[kept[k]].begin;
      Gap &g = gaps[k];
      while (ci < p_.comments.size() && p_.comments[ci].begin < to) {
        if (p_.comments[ci].begin >= from)
          g.comments.push_back(p_.comments[ci]);
        ++ci;
      }
      if (bare) {
        g.comments.clear();
        g.newline = g.blankBeforeToken = false;
        continue;
      }
      uint32_t at = from;
      for (size_t c = 0; c < g.comments.size(); ++c) {
        int lines = newlines(at, g.comments[c].begin);
        if (c == 0 && k > 0 && lines == 0)
          g.trailing = true;
        g.blankBefore.push_back(lines >= 2);
        at = g.comments[c].end;
      }
      g.newline = newlines(from, to) > 0;
      g.blankBeforeToken = newlines(at, to) >= 2;
    }

    // Separation kinds, and which blocks fit on one line.
    auto isOpen = [&](size_t pos) { return blockOfBrace_[pos] != none && p_.tokens[pos].text == "{"; };
    auto isClose = [&](size_t pos) { return blockOfBrace_[pos] != none && p_.tokens[pos].text == "}"; };
    std::vector<size_t> keptIndex(p_.tokens.size(), none);
    for (size_t k = 0; k < n; ++k)
      keptIndex[kept[k]] = k;
    std::vector<bool> oneLine(blocks_.size(), false);
    for (size_t b = 0; b < blocks_.size(); ++b) {
      const Block &block = blocks_[b];
      bool quiet = true; // no comment inside, and no kept line break inside the one item
      for (size_t k = keptIndex[block.open] + 1; k <= keptIndex[block.close]; ++k) {
        if (!gaps[k].comments.empty())
          quiet = false;
      }
      if (block.entries.size() == 1) {
        auto [first, last] = block.entries[0];
        for (size_t pos = first; pos <= last; ++pos)
          if (p_.tokens[pos].text == "{")
            quiet = false;
        for (size_t pos = first + 1; pos <= last; ++pos)
          if (keep[pos] && gaps[keptIndex[pos]].newline && !bare)
            quiet = false;
      }
      oneLine[b] = quiet && block.entries.size() <= 1;
    }
    std::vector<Sep> sep(n, Sep::Inline);
    for (size_t k = 0; k < n; ++k) {
      size_t pos = kept[k];
      if (k == 0)
        sep[k] = Sep::Start;
      else if (startsItem_[pos] == 0)
        sep[k] = Sep::Top;
      else if (startsItem_[pos] > 0)
        sep[k] = oneLine[blockOfEntry_[pos]] ? Sep::Inline : Sep::Item;
      else if (isClose(pos))
        sep[k] = oneLine[blockOfBrace_[pos]] ? Sep::Inline : Sep::Close;
    }
    // A token that starts a line within an item: a comment before it, or a line break kept.
    auto breaksInline = [&](size_t k) {
      size_t pos = kept[k];
      if (bare || sep[k] != Sep::Inline)
        return false;
      if (!gaps[k].comments.empty())
        return true;
      bool structural = startsItem_[pos] > 0 || isClose(pos) || isOpen(pos);
      return gaps[k].newline && !structural;
    };
    auto multiLine = [&](size_t firstK, size_t lastK) {
      for (size_t k = firstK + 1; k <= lastK; ++k)
        if (sep[k] == Sep::Item || sep[k] == Sep::Close || breaksInline(k))
          return true;
      return false;
    };

    // Membrane entries line up their densities and their reversal clauses in columns.
    std::map<size_t, size_t> padBefore; // position -> spaces instead of one
    for (size_t b = 0; b < blocks_.size(); ++b) {
      if (!blocks_[b].membrane || oneLine[b])
        continue;
      std::vector<const MembraneColumns *> rows;
      for (auto [first, entryLast] : blocks_[b].entries) {
        size_t last = entryLast;
        auto it = membraneRows_.find(first);
        if (it == membraneRows_.end() || it->second.densityBegin == none)
          continue;
        while (last > first && !keep[last])
          --last; // a dropped ';' at the end of the entry
        if (!multiLine(keptIndex[first], keptIndex[last]))
          rows.push_back(&it->second);
      }
      size_t nameWidth = 0, densityWidth = 0;
      for (const MembraneColumns *r : rows) {
        nameWidth = std::max(nameWidth, codePoints(p_.tokens[r->name].text));
        if (r->reversal != none)
          densityWidth = std::max(densityWidth, codePoints(inlineText(r->densityBegin, r->densityEnd)));
      }
      for (const MembraneColumns *r : rows) {
        padBefore[r->densityBegin] = nameWidth - codePoints(p_.tokens[r->name].text) + 1;
        if (r->reversal != none)
          padBefore[r->reversal] = densityWidth - codePoints(inlineText(r->densityBegin, r->densityEnd)) + 1;
      }
    }

    std::string out;
    auto newline = [&] {
      while (!out.empty() && out.back() == ' ')
        out.pop_back();
      out += '\n';
    };
    auto blank = [&] { // at the start of a line
      if (!out.empty() && !(out.size() >= 2 && out[out.size() - 2] == '\n'))
        out += '\n';
    };
    auto indent = [&](int spaces) { out.append(static_cast<size_t>(std::max(spaces, 0)), ' '); };
    std::vector<size_t> topStarts;
    for (size_t k = 0; k < n; ++k)
      if (sep[k] == Sep::Top || (k == 0 && startsItem_[kept[0]] == 0))
        topStarts.push_back(k);
    auto topEnd = [&](size_t k) {
      auto it = topKindEnd_.find(kept[k]);
      size_t last = it == topKindEnd_.end() ? kept[k] : it->second;
      while (last > kept[k] && !keep[last])
        --last;
      return keptIndex[last];
    };

    size_t previousTop = none;
    for (size_t k = 0; k <= n; ++k) {
      Gap &g = gaps[k];
      size_t pos = k < n ? kept[k] : none;
      if (k < n && sep[k] == Sep::Inline) {
        bool gluedHere = glued(kept[k - 1], pos);
        if (!breaksInline(k)) {
          if (auto it = padBefore.find(pos); it != padBefore.end())
            indent(static_cast<int>(it->second));
          else if (!gluedHere && !(isClose(pos) && keptIndex[blocks_[blockOfBrace_[pos]].open] == k - 1))
            out += ' ';
          out += p_.tokens[pos].text;
          continue;
        }
        int cont = depth_[pos] * indentWidth + continuationIndent;
        size_t c = 0;
        if (g.trailing) {
          out += trailingGap + g.comments[0].text;
          c = 1;
        }
        newline();
        for (; c < g.comments.size(); ++c) {
          indent(cont);
          out += g.comments[c].text;
          newline();
        }
        indent(cont);
        out += p_.tokens[pos].text;
        continue;
      }

      // A token that starts a line (or the end of the file).
      Sep kind = k < n ? sep[k] : Sep::Top;
      bool requiredBlank = false, optionalBlank = false;
      int level = 0, commentLevel = 0;
      bool afterOpen = k > 0 && isOpen(kept[k - 1]);
      if (k == n) {
        optionalBlank = true;
      } else if (kind == Sep::Start) {
      } else if (kind == Sep::Top) {
        // Declarations are set apart by a blank line, except a run of one-line declarations
        // of the same kind (use, ion, const, ...), which keeps the source's choice.
        bool sameKind = previousTop != none && p_.tokens[kept[previousTop]].type == p_.tokens[pos].type &&
                        !multiLine(previousTop, topEnd(previousTop)) && !multiLine(k, topEnd(k));
        requiredBlank = !sameKind;
        optionalBlank = sameKind;
      } else if (kind == Sep::Item) {
        level = commentLevel = startsItem_[pos] * indentWidth;
        optionalBlank = !afterOpen;
      } else if (kind == Sep::Close) {
        level = depth_[pos] * indentWidth;
        commentLevel = level + indentWidth;
      }
      if (k < n && (kind == Sep::Top || kind == Sep::Start))
        previousTop = k;

      size_t c = 0;
      if (g.trailing) {
        out += trailingGap + g.comments[0].text;
        c = 1;
      }
      if (k > 0)
        newline();
      bool ownLine = c < g.comments.size();
      for (size_t first = c; c < g.comments.size(); ++c) {
        bool wantBlank = c == first ? (requiredBlank || (optionalBlank && g.blankBefore[c]))
                                    : static_cast<bool>(g.blankBefore[c]);
        if (c == first && (kind == Sep::Close || kind == Sep::Item) && afterOpen)
          wantBlank = false;
        if (wantBlank)
          blank();
        indent(commentLevel);
        out += g.comments[c].text;
        newline();
      }
      if (k == n)
        break;
      bool blankHere = ownLine ? g.blankBeforeToken && kind != Sep::Close
                               : requiredBlank || (optionalBlank && g.blankBeforeToken);
      if (blankHere)
        blank();
      indent(level);
      out += p_.tokens[pos].text;
    }
    if (n > 0 && (out.empty() || out.back() != '\n'))
      newline();
    return out;
  }

  void verifyTokens(const std::vector<bool> &keep, const Parsed &check, bool bare) const {
    std::vector<std::pair<size_t, std::string>> want, got;
    for (size_t i = 0; i < p_.tokens.size(); ++i)
      if (keep[i])
        want.push_back({p_.tokens[i].type, p_.tokens[i].text});
    for (const Token &t : check.tokens)
      got.push_back({t.type, t.text});
    if (want != got)
      throw std::logic_error("the canonical layout of '" + file_.path() + "' would change its tokens");
    std::vector<std::string> wantComments, gotComments;
    if (!bare)
      for (const Comment &c : p_.comments)
        wantComments.push_back(c.text);
    for (const Comment &c : check.comments)
      gotComments.push_back(c.text);
    if (wantComments != gotComments)
      throw std::logic_error("the canonical layout of '" + file_.path() + "' would lose or change a comment");
  }
};

std::optional<std::string> formatImpl(const SourceFile &file, DiagnosticEngine &diags, bool bare) {
  // The parser proper decides what is a syntax error, with the same messages as `saltpan check`.
  DiagnosticEngine scratch;
  std::unique_ptr<ast::Module> module = parse(file, scratch);
  if (!module) {
    for (const Diagnostic &d : scratch.all()) {
      Diagnostic &copy = d.severity == Severity::Warning ? diags.warning(d.range, d.message)
                                                         : diags.error(d.range, d.message);
      copy.notes = d.notes;
    }
    return std::nullopt;
  }
  Parsed parsed;
  lexAndParse(file.text(), parsed);
  if (!parsed.syntaxOk)
    throw std::logic_error("'" + file.path() + "' parsed once but not twice");
  std::string text = Formatter(file, parsed).format(bare);
  if (!bare) {
    // Documentation comments belong to the declaration right below them; keep it so.
    SourceFile again(file.path(), text);
    DiagnosticEngine ignored;
    std::unique_ptr<ast::Module> after = parse(again, ignored);
    bool same = after && after->decls.size() == module->decls.size();
    for (size_t i = 0; same && i < module->decls.size(); ++i) {
      std::string before;
      for (size_t at = 0, next; at <= module->decls[i]->doc.size(); at = next + 1) {
        next = module->decls[i]->doc.find('\n', at);
        if (next == std::string::npos)
          next = module->decls[i]->doc.size();
        before += trimRight(module->decls[i]->doc.substr(at, next - at)) + "\n";
      }
      std::string now;
      for (size_t at = 0, next; at <= after->decls[i]->doc.size(); at = next + 1) {
        next = after->decls[i]->doc.find('\n', at);
        if (next == std::string::npos)
          next = after->decls[i]->doc.size();
        now += trimRight(after->decls[i]->doc.substr(at, next - at)) + "\n";
      }
      same = before == now;
    }
    if (!same)
      throw std::logic_error("the canonical layout of '" + file.path() + "' would move a documentation comment");
  }
  return text;
}

} // namespace

std::optional<std::string> formatSpec(const SourceFile &file, DiagnosticEngine &diags) {
  return formatImpl(file, diags, false);
}

std::optional<std::string> bareSpec(const SourceFile &file, DiagnosticEngine &diags) {
  return formatImpl(file, diags, true);
}

} // namespace saltpan
