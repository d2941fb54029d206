// BuildAST.cpp - builds the AST from ANTLR's parse tree; the parse tree dies after this.
//
// Each builder method starts with the grammar rule it handles. Slips that the grammar
// cannot see (unknown units, repeated clauses) are reported here and the node is marked
// so later stages stay quiet about it.
#include "ParseInternal.h"

#include <cerrno>
#include <cmath>
#include <cstdlib>
#include <iterator>

namespace saltpan::parsing {

using P = grammar::SaltpanParser;
using namespace ast;

namespace {

class ASTBuilder {
public:
  ASTBuilder(antlr4::CommonTokenStream &tokens, const SourceFile &file, DiagnosticEngine &diags)
      : tokens_(tokens), file_(file), diags_(diags) {}

  std::unique_ptr<Module> build(P::SpecContext *spec) {
    auto module = std::make_unique<Module>();
    module->file = &file_;
    for (P::ItemContext *item : spec->item())
      if (DeclPtr d = buildItem(item)) {
        d->doc = docAbove(item->getStart());
        module->decls.push_back(std::move(d));
      }
    return module;
  }

private:
  antlr4::CommonTokenStream &tokens_;
  const SourceFile &file_;
  DiagnosticEngine &diags_;

  SourceRange range(antlr4::ParserRuleContext *ctx) {
    SourceRange r = tokenRange(file_, ctx->getStart());
    if (ctx->getStop() && ctx->getStop()->getTokenIndex() >= ctx->getStart()->getTokenIndex())
      r.end = tokenRange(file_, ctx->getStop()).end;
    return r;
  }
  SourceRange range(antlr4::tree::TerminalNode *node) { return tokenRange(file_, node->getSymbol()); }
  SourceRange range(antlr4::Token *t) { return tokenRange(file_, t); }

  // "##" lines directly above a declaration, each alone on its line, are its documentation.
  std::string docAbove(antlr4::Token *start) {
    std::string doc;
    std::vector<antlr4::Token *> lines;
    size_t expectLine = start->getLine() - 1;
    auto hidden = tokens_.getHiddenTokensToLeft(start->getTokenIndex());
    for (auto it = hidden.rbegin(); it != hidden.rend(); ++it) {
      antlr4::Token *t = *it;
      if (t->getType() != P::DOC_COMMENT || t->getLine() != expectLine)
        break;
      lines.insert(lines.begin(), t);
      --expectLine;
    }
    for (antlr4::Token *t : lines) {
      SourceLoc loc = file_.locAtCodePoint(t->getStartIndex());
      std::string_view lineText = file_.lineText(loc.line);
      if (lineText.substr(0, loc.column - 1).find_first_not_of(" \t") != std::string_view::npos)
        continue; // a trailing "##" after code documents nothing below
      std::string line = t->getText().substr(2);
      if (!line.empty() && line[0] == ' ')
        line.erase(0, 1);
      if (!doc.empty())
        doc += "\n";
      doc += line;
    }
    return doc;
  }

  void duplicate(SourceRange here, SourceRange first, const std::string &what, const std::string &owner) {
    auto &d = diags_.error(here, what + " is given twice in " + owner);
    DiagnosticEngine::note(d, first, "first given here");
  }

  double parseNumber(antlr4::tree::TerminalNode *node) {
    std::string text = node->getText();
    errno = 0;
    double v = std::strtod(text.c_str(), nullptr);
    if (errno == ERANGE || !std::isfinite(v)) {
      if (std::isinf(v) || std::fabs(v) > 1.0) {
        diags_.error(range(node), "number '" + text + "' is too large to represent");
        return 0;
      }
      // Underflow to a denormal or zero is a number too small to matter: keep it.
    }
    return v;
  }

  // signedNumber : sign=('+' | '-')? NUMBER ;
  SignedNumber build(P::SignedNumberContext *ctx) {
    double v = parseNumber(ctx->NUMBER());
    if (ctx->sign && ctx->sign->getText() == "-")
      v = -v;
    return {v, range(ctx)};
  }

  DeclPtr buildItem(P::ItemContext *item) {
    if (auto *c = item->modelHeader())
      return build(c);
    if (auto *c = item->useDecl())
      return build(c);
    if (auto *c = item->temperatureDecl())
      return build(c);
    if (auto *c = item->ionDecl())
      return build(c);
    if (auto *c = item->constDecl())
      return build(c);
    if (auto *c = item->fnDecl())
      return build(c);
    if (auto *c = item->outsideDecl())
      return build(c);
    if (auto *c = item->compartmentDecl())
      return build(c);
    if (auto *c = item->cableDecl())
      return build(c);
    if (auto *c = item->channelDecl())
      return build(c);
    if (auto *c = item->pumpDecl())
      return build(c);
    if (auto *c = item->protocolDecl())
      return build(c);
    if (auto *c = item->expectDecl())
      return build(c);
    if (auto *c = item->sweepDecl())
      return build(c);
    return nullptr; // a stray ';'
  }

  template <typename T> std::unique_ptr<T> named(antlr4::ParserRuleContext *ctx, antlr4::tree::TerminalNode *name) {
    auto d = std::make_unique<T>(range(ctx));
    d->name = name->getText();
    d->nameRange = range(name);
    return d;
  }

  static std::string unquote(const std::string &s) {
    std::string out;
    for (size_t i = 1; i + 1 < s.size(); ++i) {
      if (s[i] == '\\' && i + 2 < s.size()) {
        ++i;
        out += s[i] == 'n' ? '\n' : s[i] == 't' ? '\t' : s[i];
      } else {
        out += s[i];
      }
    }
    return out;
  }

  // modelHeader : MODEL IDENT STRING? ;
  DeclPtr build(P::ModelHeaderContext *ctx) {
    auto d = named<ModelDecl>(ctx, ctx->IDENT());
    if (ctx->STRING())
      d->title = unquote(ctx->STRING()->getText());
    return d;
  }

  // useDecl : USE (modulePath | STRING) ;
  DeclPtr build(P::UseDeclContext *ctx) {
    auto d = std::make_unique<UseDecl>(range(ctx));
    if (ctx->STRING()) {
      d->target = unquote(ctx->STRING()->getText());
      d->isPath = true;
      d->targetRange = range(ctx->STRING());
    } else {
      d->target = ctx->modulePath()->getText();
      d->targetRange = range(ctx->modulePath());
    }
    d->name = d->target;
    d->nameRange = d->targetRange;
    return d;
  }

  // temperatureDecl : TEMPERATURE expr ;
  DeclPtr build(P::TemperatureDeclContext *ctx) {
    auto d = std::make_unique<TemperatureDecl>(range(ctx));
    d->name = "temperature";
    d->nameRange = range(ctx->TEMPERATURE());
    d->value = build(ctx->expr());
    return d;
  }

  // ionDecl : ION IDENT VALENCE signedNumber ;
  DeclPtr build(P::IonDeclContext *ctx) {
    auto d = named<IonDecl>(ctx, ctx->IDENT());
    d->valence = build(ctx->signedNumber());
    return d;
  }

  // constDecl : CONST IDENT (':' unitType)? '=' expr ;
  DeclPtr build(P::ConstDeclContext *ctx) {
    auto d = named<ConstDecl>(ctx, ctx->IDENT());
    if (ctx->unitType()) {
      d->annotated = true;
      d->declared = build(ctx->unitType());
    }
    d->value = build(ctx->expr());
    return d;
  }

  // fnDecl : FN IDENT '(' (param (',' param)*)? ')' '->' unitType '=' expr ;
  DeclPtr build(P::FnDeclContext *ctx) {
    auto d = named<FnDecl>(ctx, ctx->IDENT());
    for (P::ParamContext *p : ctx->param()) {
      Param param{p->IDENT()->getText(), range(p->IDENT()), build(p->unitType())};
      for (const Param &earlier : d->params)
        if (earlier.name == param.name) {
          auto &diag = diags_.error(param.range, "parameter '" + param.name + "' is declared twice");
          DiagnosticEngine::note(diag, earlier.range, "first declared here");
        }
      d->params.push_back(std::move(param));
    }
    d->result = build(ctx->unitType());
    d->body = build(ctx->expr());
    return d;
  }

  // unitType : unitTypeTerm ((('*' | SLASH | DOT) unitTypeTerm) | UNIT_MUL | UNIT_DIV)* ;
  UnitAnnotation build(P::UnitTypeContext *ctx) {
    UnitAnnotation a;
    a.text = ctx->getText();
    a.range = range(ctx);
    a.valid = true;
    bool divide = false;
    bool first = true;
    for (antlr4::tree::ParseTree *child : ctx->children) {
      if (auto *term = dynamic_cast<P::UnitTypeTermContext *>(child)) {
        Unit u = buildTerm(term, a.valid);
        a.unit = first ? u : divide ? a.unit / u : a.unit * u;
        first = false;
      } else if (auto *t = dynamic_cast<antlr4::tree::TerminalNode *>(child)) {
        size_t type = t->getSymbol()->getType();
        if (type == P::UNIT_MUL || type == P::UNIT_DIV) {
          auto glued = gluedFactor(t, a.valid);
          a.unit = type == P::UNIT_DIV ? a.unit / glued.unit : a.unit * glued.unit;
        } else {
          divide = t->getText() == "/";
        }
      }
    }
    a.unit.scale = 1; // an annotation names a dimension, not a scale
    return a;
  }

  // unitTypeTerm : NUMBER | IDENT UNIT_POW? | '(' unitType ')' ;
  Unit buildTerm(P::UnitTypeTermContext *ctx, bool &valid) {
    if (ctx->unitType()) {
      UnitAnnotation inner = build(ctx->unitType());
      valid = valid && inner.valid;
      return inner.unit;
    }
    if (!ctx->IDENT()) {
      if (ctx->NUMBER()->getText() != "1") {
        diags_.error(range(ctx), "only '1' may stand for a dimensionless unit, not '" + ctx->getText() + "'");
        valid = false;
      }
      return {};
    }
    Factor f = factor(ctx->IDENT()->getText(), range(ctx->IDENT()),
                      ctx->UNIT_POW() ? ctx->UNIT_POW()->getText().substr(1) : "", valid,
                      ctx->UNIT_POW() ? exponentRange(ctx->UNIT_POW()) : SourceRange{});
    return f.unit;
  }

  struct Factor {
    Unit unit;
    bool celsius = false;
    bool hasExponent = false;
  };

  // One unit symbol with an optional exponent ("cm", "2" or "-1").
  // The range of an exponent token without its '^'.
  SourceRange exponentRange(antlr4::tree::TerminalNode *pow) {
    SourceRange r = range(pow);
    r.begin = file_.locAtOffset(r.begin.offset + 1);
    return r;
  }

  Factor factor(const std::string &symbol, SourceRange at, const std::string &exponentText, bool &valid,
                SourceRange exponentAt = {}) {
    Factor f;
    auto found = lookupUnitSymbol(symbol);
    if (!found) {
      diags_.error(at, "unknown unit '" + symbol + "'");
      valid = false;
      return f;
    }
    f.unit = found->unit;
    f.celsius = found->celsius;
    if (!exponentText.empty()) {
      f.hasExponent = true;
      f.unit = f.unit.pow(exponent(exponentText, exponentAt.valid() ? exponentAt : at, valid));
    }
    return f;
  }

  struct Glued {
    size_t opLength; // bytes of the operator ('·' is two)
    std::string word, exponentText;
  };
  // "/cm^2" -> ("/", "cm", "2")
  static Glued splitGlued(const std::string &text) {
    size_t opLength = text.rfind("\u00B7", 0) == 0 ? 2 : 1;
    std::string word = text.substr(opLength), exponentText;
    if (size_t caret = word.find('^'); caret != std::string::npos) {
      exponentText = word.substr(caret + 1);
      word = word.substr(0, caret);
    }
    return {opLength, word, exponentText};
  }

  // UNIT_MUL / UNIT_DIV: an operator glued to a unit word, "/cm^2".
  Factor gluedFactor(antlr4::tree::TerminalNode *t, bool &valid) {
    std::string text = t->getText();
    auto [opLength, word, exponentText] = splitGlued(text);
    SourceRange at = range(t);
    at.begin = file_.locAtOffset(at.begin.offset + static_cast<uint32_t>(opLength));
    bool wasValid = valid;
    SourceRange exponentAt;
    if (size_t caret = text.find('^'); caret != std::string::npos) {
      exponentAt = range(t);
      exponentAt.begin = file_.locAtOffset(exponentAt.begin.offset + static_cast<uint32_t>(caret) + 1);
    }
    at.end = file_.locAtOffset(at.begin.offset + static_cast<uint32_t>(word.size()) - 1);
    Factor f = factor(word, at, exponentText, valid, exponentAt);
    if (wasValid && !valid)
      if (auto *last = diags_.last(); last && last->message.rfind("unknown unit", 0) == 0)
        DiagnosticEngine::note(*last, {}, "a unit has no spaces inside it; to multiply or divide by a name, "
                                          "put spaces around the operator");
    return f;
  }

  int exponent(const std::string &text, SourceRange at, bool &valid) {
    bool negative = !text.empty() && text[0] == '-';
    int p = std::atoi(text.c_str() + (negative ? 1 : 0));
    if (p < 1 || p > 9 || text.size() > (negative ? 2u : 1u)) {
      diags_.error(at, "a unit's exponent must be a whole number from 1 to 9, not '" + text + "'");
      valid = false;
      return 1;
    }
    return negative ? -p : p;
  }

  // outsideDecl : OUTSIDE IDENT solutionBlock ;
  DeclPtr build(P::OutsideDeclContext *ctx) {
    auto d = named<SolutionDecl>(ctx, ctx->IDENT());
    d->body = build(ctx->solutionBlock(), "outside solution '" + d->name + "'");
    return d;
  }

  // solutionBlock : '{' solutionEntry* '}' ;
  SolutionBody build(P::SolutionBlockContext *ctx, const std::string &owner) {
    SolutionBody body;
    body.range = range(ctx);
    for (P::SolutionEntryContext *entry : ctx->solutionEntry()) {
      if (auto *c = dynamic_cast<P::ConcentrationEntryContext *>(entry)) {
        // '[' IDENT ']' '=' expr
        ConcentrationEntry e{c->IDENT()->getText(), range(c->IDENT()), range(c), build(c->expr(0)), false, {}, nullptr,
                             nullptr};
        if (c->DYNAMIC()) {
          e.dynamic = true;
          e.dynamicRange = range(c->DYNAMIC());
          if (c->SHELL())
            e.shellDepth = build(c->expr(1));
        }
        bool repeated = false;
        for (const ConcentrationEntry &earlier : body.entries)
          if (earlier.ion == e.ion) {
            duplicate(e.range, earlier.range, "the concentration of '" + e.ion + "'", owner);
            repeated = true;
          }
        if (!repeated) // the first value stands, like every other repeated clause
          body.entries.push_back(std::move(e));
      }
      if (auto *c = dynamic_cast<P::ImpermeantEntryContext *>(entry)) {
        // IMPERMEANT expr VALENCE signedNumber
        body.impermeants.push_back({range(c), build(c->expr()), build(c->signedNumber())});
      }
    }
    return body;
  }

  // compartmentDecl : COMPARTMENT IDENT '{' compartmentItem* '}' ;
  DeclPtr build(P::CompartmentDeclContext *ctx) {
    auto d = named<CompartmentDecl>(ctx, ctx->IDENT());
    compartmentItems(*d, ctx->compartmentItem(), "compartment '" + d->name + "'");
    return d;
  }

  // cableDecl : CABLE IDENT '{' (cableItem | compartmentItem)* '}' ;
  DeclPtr build(P::CableDeclContext *ctx) {
    auto d = named<CompartmentDecl>(ctx, ctx->IDENT());
    std::string owner = "cable '" + d->name + "'";
    d->cable = std::make_unique<CableShape>();
    CableShape &cable = *d->cable;
    cable.range = range(ctx->CABLE());
    for (P::CableItemContext *item : ctx->cableItem()) {
      if (auto *c = dynamic_cast<P::GrowsItemContext *>(item)) {
        // GROWS FROM IDENT (END | position)?
        if (!cable.parent.empty()) {
          duplicate(range(c), cable.growsRange, "where it grows from", owner);
          continue;
        }
        cable.parent = c->IDENT()->getText();
        cable.parentRange = range(c->IDENT());
        cable.growsRange = range(c);
        cable.atEnd = c->END() != nullptr;
        if (c->position())
          cable.at = position(c->position());
      }
      if (auto *c = dynamic_cast<P::CableLengthItemContext *>(item)) {
        // LENGTH expr
        if (cable.length)
          duplicate(range(c), cable.lengthRange, "the length", owner);
        else {
          cable.length = build(c->expr());
          cable.lengthRange = range(c);
        }
      }
      if (auto *c = dynamic_cast<P::CableDiameterItemContext *>(item)) {
        // DIAMETER expr (TO expr)?
        if (cable.diameter)
          duplicate(range(c), cable.diameterRange, "the diameter", owner);
        else {
          cable.diameter = build(c->expr(0));
          if (c->expr().size() > 1)
            cable.diameterEnd = build(c->expr(1));
          cable.diameterRange = range(c);
        }
      }
      if (auto *c = dynamic_cast<P::AxialItemContext *>(item)) {
        // AXIAL RESISTIVITY expr
        if (cable.axialResistivity)
          duplicate(range(c), cable.axialRange, "the axial resistivity", owner);
        else {
          cable.axialResistivity = build(c->expr());
          cable.axialRange = range(c);
        }
      }
      auto setPieces = [&](SourceRange r) {
        if (cable.pieces > 0 || cable.pieceLength) {
          duplicate(r, cable.piecesRange, "how it is cut", owner);
          return false;
        }
        cable.piecesRange = r;
        return true;
      };
      if (auto *c = dynamic_cast<P::PiecesItemContext *>(item)) {
        // PIECES NUMBER (PER LENGTH CONSTANT AT expr)?
        if (!setPieces(range(c)))
          continue;
        if (c->expr())
          cable.perLengthConstantAt = build(c->expr());
        double n = std::strtod(c->NUMBER()->getText().c_str(), nullptr);
        if (!(n >= 1 && n <= 1e6 && n == std::floor(n))) {
          auto &diag =
              diags_.error(range(c->NUMBER()), "a cable's piece count must be a whole number from 1 to 1000000");
          DiagnosticEngine::note(diag, {}, "or give 'piece length' and let saltpan count them");
          cable.pieces = -1; // refused: not "missing" too
          continue;
        }
        cable.pieces = static_cast<long>(n);
      }
      if (auto *c = dynamic_cast<P::PieceLengthItemContext *>(item)) {
        // PIECE LENGTH expr
        if (setPieces(range(c)))
          cable.pieceLength = build(c->expr());
      }
    }
    compartmentItems(*d, ctx->compartmentItem(), owner);
    return d;
  }

  void compartmentItems(CompartmentDecl &compartment, const std::vector<P::CompartmentItemContext *> &items,
                        const std::string &owner) {
    CompartmentDecl *d = &compartment;
    SourceRange capacitanceAt, initialAt, insideAt;
    auto setGeometry = [&](Shape shape, SourceRange r) {
      if (d->cable) {
        auto &diag = diags_.error(r, "a cable's shape is its length and diameter");
        DiagnosticEngine::note(diag, {}, "write 'length 400 um' and 'diameter 2 um' in " + owner);
        return false;
      }
      if (d->geometry.shape != Shape::None) {
        auto &diag = diags_.error(r, owner + " has more than one geometry");
        DiagnosticEngine::note(diag, d->geometry.range, "geometry first given here");
        return false;
      }
      d->geometry.shape = shape;
      d->geometry.range = r;
      return true;
    };
    for (P::CompartmentItemContext *item : items) {
      if (auto *c = dynamic_cast<P::SphereItemContext *>(item)) {
        // SPHERE DIAMETER expr
        if (setGeometry(Shape::Sphere, range(c)))
          d->geometry.diameter = build(c->expr());
      }
      if (auto *c = dynamic_cast<P::CylinderItemContext *>(item)) {
        // CYLINDER LENGTH expr DIAMETER expr
        if (setGeometry(Shape::Cylinder, range(c))) {
          d->geometry.length = build(c->expr(0));
          d->geometry.diameter = build(c->expr(1));
        }
      }
      if (auto *c = dynamic_cast<P::AreaItemContext *>(item)) {
        // AREA expr
        if (setGeometry(Shape::Area, range(c)))
          d->geometry.area = build(c->expr());
      }
      if (auto *c = dynamic_cast<P::CapacitanceItemContext *>(item)) {
        // CAPACITANCE expr
        if (d->capacitance)
          duplicate(range(c), capacitanceAt, "the capacitance", owner);
        else {
          d->capacitance = build(c->expr());
          capacitanceAt = range(c);
        }
      }
      if (auto *c = dynamic_cast<P::InitialItemContext *>(item)) {
        // INITIAL IDENT '=' expr
        if (c->IDENT()->getText() != "V") {
          auto &diag = diags_.error(range(c->IDENT()), "'initial' sets the membrane potential 'V', not '" +
                                                           c->IDENT()->getText() + "'");
          DiagnosticEngine::note(diag, {}, "write 'initial V = -65 mV'");
        } else if (d->initialV) {
          duplicate(range(c), initialAt, "the initial potential", owner);
        } else {
          d->initialV = build(c->expr());
          initialAt = range(c);
        }
      }
      if (auto *c = dynamic_cast<P::BathItemContext *>(item)) {
        // OUTSIDE IDENT
        if (!d->bathName.empty())
          duplicate(range(c), d->bathRange, "the outside solution", owner);
        else {
          d->bathName = c->IDENT()->getText();
          d->bathRange = range(c->IDENT());
        }
      }
      if (auto *c = dynamic_cast<P::InsideItemContext *>(item)) {
        // INSIDE solutionBlock
        if (d->hasInside)
          duplicate(range(c), insideAt, "the inside solution", owner);
        else {
          d->hasInside = true;
          d->inside = build(c->solutionBlock(), "the inside of " + owner);
          insideAt = range(c);
        }
      }
      if (auto *c = dynamic_cast<P::MembraneItemContext *>(item)) {
        // MEMBRANE '{' membraneEntry* '}'
        for (P::MembraneEntryContext *e : c->membraneEntry()) {
          // membraneEntry : IDENT expr (REVERSAL expr)? ';'? ;
          MembraneEntry entry;
          entry.name = e->IDENT()->getText();
          entry.nameRange = range(e->IDENT());
          entry.range = range(e);
          entry.density = build(e->expr(0));
          if (e->expr().size() > 1)
            entry.reversal = build(e->expr(1));
          for (const MembraneEntry &earlier : d->membrane)
            if (earlier.name == entry.name)
              duplicate(entry.range, earlier.range, "'" + entry.name + "'", "the membrane of " + owner);
          d->membrane.push_back(std::move(entry));
        }
      }
    }
  }

  // channelDecl : CHANNEL IDENT '{' channelItem* '}' ;
  DeclPtr build(P::ChannelDeclContext *ctx) {
    auto d = named<ChannelDecl>(ctx, ctx->IDENT());
    std::string owner = "channel '" + d->name + "'";
    SourceRange reversalAt;
    for (P::ChannelItemContext *item : ctx->channelItem()) {
      if (auto *c = dynamic_cast<P::CarriesItemContext *>(item)) {
        // CARRIES carried (',' carried)*
        if (!d->carries.empty()) {
          duplicate(range(c), d->carriesRange, "'carries'", owner);
          continue;
        }
        d->carriesRange = range(c);
        for (P::CarriedContext *k : c->carried()) {
          // carried : IDENT NUMBER? ;
          CarriedIon ion;
          ion.ion = k->IDENT()->getText();
          ion.range = range(k);
          if (k->NUMBER()) {
            ion.hasRatio = true;
            ion.ratio = {parseNumber(k->NUMBER()), range(k->NUMBER())};
          }
          for (const CarriedIon &earlier : d->carries)
            if (earlier.ion == ion.ion)
              duplicate(ion.range, earlier.range, "ion '" + ion.ion + "'", "what " + owner + " carries");
          d->carries.push_back(std::move(ion));
        }
      }
      if (auto *c = dynamic_cast<P::ReversalItemContext *>(item)) {
        // REVERSAL expr
        if (d->reversal)
          duplicate(range(c), reversalAt, "the reversal potential", owner);
        else {
          d->reversal = build(c->expr());
          reversalAt = range(c);
        }
      }
      if (auto *c = dynamic_cast<P::GateDeclContext *>(item)) {
        Gate g = build(c);
        for (const Gate &earlier : d->gates)
          if (earlier.name == g.name) {
            auto &diag = diags_.error(g.nameRange, owner + " has two gates named '" + g.name + "'");
            DiagnosticEngine::note(diag, earlier.nameRange, "first gate '" + g.name + "' here");
          }
        d->gates.push_back(std::move(g));
      }
      if (auto *c = dynamic_cast<P::Q10ItemContext *>(item)) {
        // Q10 expr AT expr
        if (d->q10)
          duplicate(range(c), d->q10Range, "'q10'", owner);
        else {
          d->q10 = build(c->expr(0));
          d->q10Reference = build(c->expr(1));
          d->q10Range = range(c);
        }
      }
    }
    return d;
  }

  // gateDecl : GATE IDENT (POWER NUMBER)? '{' gateItem* '}' ;
  Gate build(P::GateDeclContext *ctx) {
    Gate g;
    g.name = ctx->IDENT()->getText();
    g.nameRange = range(ctx->IDENT());
    g.range = range(ctx);
    g.power = {1, g.nameRange};
    if (ctx->NUMBER()) {
      g.hasPower = true;
      g.power = {parseNumber(ctx->NUMBER()), range(ctx->NUMBER())};
    }
    std::string owner = "gate '" + g.name + "'";
    SourceRange at[4];
    for (P::GateItemContext *item : ctx->gateItem()) {
      // gateItem : rate=(OPENING | CLOSING | STEADY | TAU) '=' expr ';'? ;
      GateRate rate = item->rate->getType() == P::OPENING   ? GateRate::Opening
                      : item->rate->getType() == P::CLOSING ? GateRate::Closing
                      : item->rate->getType() == P::STEADY  ? GateRate::Steady
                                                            : GateRate::Tau;
      ExprPtr &slot = rate == GateRate::Opening   ? g.opening
                      : rate == GateRate::Closing ? g.closing
                      : rate == GateRate::Steady  ? g.steady
                                                  : g.tau;
      int i = static_cast<int>(rate);
      if (slot) {
        duplicate(range(item), at[i], std::string("'") + spelling(rate) + "'", owner);
        continue;
      }
      slot = build(item->expr());
      at[i] = range(item);
    }
    return g;
  }

  // pumpDecl : kind=(PUMP | EXCHANGER) IDENT '{' pumpItem* '}' ;
  DeclPtr build(P::PumpDeclContext *ctx) {
    auto d = named<PumpDecl>(ctx, ctx->IDENT());
    d->exchanger = ctx->kind->getType() == P::EXCHANGER;
    std::string owner = std::string(d->exchanger ? "exchanger" : "pump") + " '" + d->name + "'";
    SourceRange activityAt;
    for (P::PumpItemContext *item : ctx->pumpItem()) {
      if (auto *c = dynamic_cast<P::CycleItemContext *>(item)) {
        // CYCLE stoichTerm (',' stoichTerm)*
        if (!d->cycle.empty()) {
          duplicate(range(c), d->cycleRange, "the cycle", owner);
          continue;
        }
        d->cycleRange = range(c);
        for (P::StoichTermContext *t : c->stoichTerm()) {
          // stoichTerm : NUMBER IDENT dir=(IN | OUT) ;
          StoichTerm term;
          term.count = {parseNumber(t->NUMBER()), range(t->NUMBER())};
          term.ion = t->IDENT()->getText();
          term.ionRange = range(t->IDENT());
          term.range = range(t);
          term.direction = t->dir->getType() == P::IN ? Direction::In : Direction::Out;
          d->cycle.push_back(std::move(term));
        }
      }
      if (auto *c = dynamic_cast<P::ActivityItemContext *>(item)) {
        // ACTIVITY '=' expr
        if (d->activity)
          duplicate(range(c), activityAt, "the activity law", owner);
        else {
          d->activity = build(c->expr());
          activityAt = range(c);
        }
      }
    }
    return d;
  }

  // The measure of an expectation or a sweep: [PROTOCOL:] MEASURE(ARGS).
  void buildMeasure(ExpectDecl &d, antlr4::tree::TerminalNode *protocol, P::WordContext *measure,
                    const std::vector<P::ExpectArgContext *> &args) {
    if (protocol) {
      d.protocol = protocol->getText();
      d.protocolRange = range(protocol);
    }
    d.measure = measure->getText();
    d.measureRange = range(measure);
    d.name = "";
    d.nameRange = d.measureRange;
    for (P::ExpectArgContext *a : args) {
      // expectArg : STRING | recordTarget position? | expr ;
      ExpectArg arg;
      arg.range = range(a);
      if (a->STRING()) {
        arg.isString = true;
        arg.text = unquote(a->STRING()->getText());
      } else if (a->recordTarget()) {
        arg.path = a->recordTarget()->getText();
        if (a->position())
          arg.position = position(a->position());
      } else
        arg.value = build(a->expr());
      d.args.push_back(std::move(arg));
    }
  }

  // The text of a rule as written, from `from`'s first token to `to`'s last.
  std::string written(antlr4::ParserRuleContext *from, antlr4::ParserRuleContext *to) {
    size_t a = file_.locAtCodePoint(from->getStart()->getStartIndex()).offset;
    size_t b = file_.locAtCodePoint(to->getStop()->getStopIndex()).offset;
    return file_.text().substr(a, b - a + 1);
  }

  // expectDecl : EXPECT (IDENT ':')? word '(' (expectArg (',' expectArg)*)? ')' expectCheck (SOURCE STRING)? ;
  DeclPtr build(P::ExpectDeclContext *ctx) {
    auto d = std::make_unique<ExpectDecl>(range(ctx));
    buildMeasure(*d, ctx->IDENT(), ctx->word(), ctx->expectArg());
    P::ExpectCheckContext *check = ctx->expectCheck();
    if (auto *eq = dynamic_cast<P::EqualCheckContext *>(check)) {
      // '==' expr (WITHIN expr RELATIVE?)?
      d->check = CheckKind::Equal;
      d->value = build(eq->expr(0));
      if (eq->expr().size() > 1)
        d->tolerance = build(eq->expr(1));
      d->relative = eq->RELATIVE() != nullptr;
    } else if (auto *r = dynamic_cast<P::RangeCheckContext *>(check)) {
      // IN expr TO expr
      d->check = CheckKind::Range;
      d->value = build(r->expr(0));
      d->high = build(r->expr(1));
    } else {
      auto *b = static_cast<P::BoundCheckContext *>(check);
      std::string op = b->op->getText();
      d->check = op == "<" ? CheckKind::Less : op == "<=" ? CheckKind::LessEqual : op == ">" ? CheckKind::Greater
                                                                                             : CheckKind::GreaterEqual;
      d->value = build(b->expr());
    }
    if (ctx->STRING())
      d->source = unquote(ctx->STRING()->getText());
    // The expectation as written, without its source, for reports.
    std::string text = written(ctx, check);
    d->text = text.substr(text.find_first_not_of(" ", 6)); // drop "expect"
    return d;
  }

  // sweepDecl : SWEEP IDENT '{' sweepItem* '}' ;
  DeclPtr build(P::SweepDeclContext *ctx) {
    auto d = named<SweepDecl>(ctx, ctx->IDENT());
    std::string owner = "sweep '" + d->name + "'";
    for (P::SweepItemContext *item : ctx->sweepItem()) {
      if (auto *c = dynamic_cast<P::RangeVaryContext *>(item)) {
        // VARY recordTarget FROM expr TO expr (POINTS NUMBER)? LOGARITHMIC?
        SweepAxis axis;
        axis.range = range(c);
        axis.parameter = c->recordTarget()->getText();
        axis.parameterRange = range(c->recordTarget());
        axis.from = build(c->expr(0));
        axis.to = build(c->expr(1));
        if (c->NUMBER()) {
          axis.points = parseNumber(c->NUMBER());
          axis.pointsRange = range(c->NUMBER());
        }
        axis.logarithmic = c->LOGARITHMIC() != nullptr;
        d->axes.push_back(std::move(axis));
      continue;
      }
      if (auto *c = dynamic_cast<P::ListVaryContext *>(item)) {
        // VARY recordTarget VALUES expr (',' expr)*
        SweepAxis axis;
        axis.range = range(c);
        axis.parameter = c->recordTarget()->getText();
        axis.parameterRange = range(c->recordTarget());
        for (P::ExprContext *e : c->expr())
          axis.values.push_back(build(e));
        d->axes.push_back(std::move(axis));
      continue;
      }
      if (auto *c = dynamic_cast<P::SampleItemContext *>(item)) {
        // SAMPLE NUMBER design=(LATIN_HYPERCUBE | UNIFORM) SEED NUMBER
        if (d->sampleRange.valid()) {
          duplicate(range(c), d->sampleRange, "the sample design", owner);
          continue;
        }
        d->sampleRange = range(c);
        d->samples = parseNumber(c->NUMBER(0));
        d->seed = parseNumber(c->NUMBER(1));
        d->design = c->LATIN_HYPERCUBE() ? SampleDesign::LatinHypercube : SampleDesign::Uniform;
      continue;
      }
      if (auto *c = dynamic_cast<P::MeasureItemContext *>(item)) {
        // MEASURE (IDENT ':')? word '(' (expectArg (',' expectArg)*)? ')'
        auto m = std::make_unique<ExpectDecl>(range(c));
        buildMeasure(*m, c->IDENT(), c->word(), c->expectArg());
        m->check = CheckKind::Measured;
        std::string text = written(c, c);
        m->text = text.substr(text.find_first_not_of(" ", 7)); // drop "measure"
        d->measures.push_back(std::move(m));
      }
    }
    return d;
  }

  // protocolDecl : PROTOCOL IDENT '{' protocolItem* '}' ;
  DeclPtr build(P::ProtocolDeclContext *ctx) {
    auto d = named<ProtocolDecl>(ctx, ctx->IDENT());
    std::string owner = "protocol '" + d->name + "'";
    SourceRange durationAt, recordAt;
    for (P::ProtocolItemContext *item : ctx->protocolItem()) {
      if (auto *c = dynamic_cast<P::MethodItemContext *>(item)) {
        // METHOD IDENT (STEP expr)? (TOLERANCE expr)?
        if (d->method != IntegrationMethod::Default) {
          duplicate(range(c), d->methodRange, "the method", owner);
          continue;
        }
        d->methodText = c->IDENT()->getText();
        d->method = integrationMethodNamed(d->methodText);
        d->methodRange = range(c->IDENT());
        size_t next = 0;
        if (c->STEP())
          d->step = build(c->expr(next++));
        if (c->TOLERANCE())
          d->tolerance = build(c->expr(next++));
      }
      if (auto *c = dynamic_cast<P::DurationItemContext *>(item)) {
        if (d->duration)
          duplicate(range(c), durationAt, "the duration", owner);
        else {
          d->duration = build(c->expr());
          durationAt = range(c);
        }
      }
      if (auto *c = dynamic_cast<P::InjectItemContext *>(item)) {
        // INJECT IDENT injection
        Injection inj;
        inj.compartment = c->IDENT()->getText();
        inj.compartmentRange = range(c->IDENT());
        inj.range = range(c);
        if (c->position())
          inj.position = position(c->position());
        P::InjectionContext *shape = c->injection();
        if (auto *r = dynamic_cast<P::RampInjectionContext *>(shape)) {
          // RAMP expr TO expr FROM expr TO expr
          inj.shape = InjectionShape::Ramp;
          inj.amplitude = build(r->expr(0));
          inj.amplitudeEnd = build(r->expr(1));
          inj.from = build(r->expr(2));
          inj.to = build(r->expr(3));
        } else if (auto *p = dynamic_cast<P::PulseInjectionContext *>(shape)) {
          // PULSES expr WIDTH expr EVERY expr FROM expr TO expr
          inj.shape = InjectionShape::Pulses;
          inj.amplitude = build(p->expr(0));
          inj.width = build(p->expr(1));
          inj.period = build(p->expr(2));
          inj.from = build(p->expr(3));
          inj.to = build(p->expr(4));
        } else {
          // expr FROM expr TO expr
          auto *st = static_cast<P::StepInjectionContext *>(shape);
          inj.amplitude = build(st->expr(0));
          inj.from = build(st->expr(1));
          inj.to = build(st->expr(2));
        }
        d->injections.push_back(std::move(inj));
      }
      if (auto *c = dynamic_cast<P::ClampItemContext *>(item)) {
        // CLAMP IDENT (position TO | AT) expr (FROM expr TO expr)?
        Clamp clamp;
        clamp.compartment = c->IDENT()->getText();
        clamp.compartmentRange = range(c->IDENT());
        clamp.range = range(c);
        if (c->position())
          clamp.position = position(c->position());
        clamp.level = build(c->expr(0));
        if (c->expr().size() == 3) {
          clamp.from = build(c->expr(1));
          clamp.to = build(c->expr(2));
        }
        d->clamps.push_back(std::move(clamp));
      }
      if (auto *c = dynamic_cast<P::SynapseItemContext *>(item)) {
        // SYNAPSE IDENT expr REVERSAL expr synapseShape synapseTimes
        Synapse syn;
        syn.compartment = c->IDENT()->getText();
        syn.compartmentRange = range(c->IDENT());
        syn.range = range(c);
        if (c->position())
          syn.position = position(c->position());
        syn.conductance = build(c->expr(0));
        syn.reversal = build(c->expr(1));
        if (auto *s2 = dynamic_cast<P::DoubleExponentialContext *>(c->synapseShape())) {
          syn.shape = SynapseShape::DoubleExponential;
          syn.rise = build(s2->expr(0));
          syn.decay = build(s2->expr(1));
        } else if (auto *s1 = dynamic_cast<P::SingleExponentialContext *>(c->synapseShape())) {
          syn.decay = build(s1->expr());
        } else {
          auto *a = static_cast<P::AlphaShapeContext *>(c->synapseShape());
          syn.shape = SynapseShape::Alpha;
          syn.peak = build(a->expr());
        }
        if (auto *l = dynamic_cast<P::ListedTimesContext *>(c->synapseTimes())) {
          for (P::ExprContext *t : l->expr())
            syn.times.push_back(build(t));
        } else {
          auto *r = static_cast<P::RegularTimesContext *>(c->synapseTimes());
          syn.every = build(r->expr(0));
          syn.from = build(r->expr(1));
          syn.to = build(r->expr(2));
        }
        d->synapses.push_back(std::move(syn));
      }
      if (auto *c = dynamic_cast<P::RecordItemContext *>(item)) {
        // RECORD recordTarget (',' recordTarget)* (EVERY expr)?
        if (!d->records.empty()) {
          duplicate(range(c), recordAt, "'record'", owner);
          continue;
        }
        recordAt = range(c);
        for (P::RecordedContext *r : c->recorded()) {
          // recorded : recordTarget position? ;
          RecordTarget target{r->recordTarget()->getText(), range(r->recordTarget()), {}};
          if (r->position())
            target.position = position(r->position());
          d->records.push_back(std::move(target));
        }
        if (c->expr())
          d->every = build(c->expr());
      }
    }
    return d;
  }

  // position : AT NUMBER (unit | PERCENT) ;
  Position position(P::PositionContext *ctx) {
    SourceRange r{range(ctx->NUMBER()).begin, range(ctx->getStop()).end};
    if (!ctx->PERCENT())
      return {quantity(ctx->NUMBER(), ctx->unit(), r), r};
    // A percentage of the cable's length: a plain fraction from here on.
    auto e = quantity(ctx->NUMBER(), nullptr, r);
    e->value = e->written / 100;
    e->unitText = "%";
    e->unitRange = range(ctx->PERCENT());
    return {std::move(e), r};
  }

  // ---- expressions ----

  // expr : IF expr THEN expr ELSE expr | orExpr ;
  ExprPtr build(P::ExprContext *ctx) {
    if (auto *c = dynamic_cast<P::IfExprContext *>(ctx)) {
      auto e = std::make_unique<IfExpr>(range(c));
      e->cond = build(c->expr(0));
      e->thenExpr = build(c->expr(1));
      e->elseExpr = build(c->expr(2));
      return e;
    }
    return build(static_cast<P::PlainExprContext *>(ctx)->orExpr());
  }

  ExprPtr binary(BinaryOp op, antlr4::Token *opToken, ExprPtr lhs, ExprPtr rhs) {
    auto e = std::make_unique<BinaryExpr>(SourceRange::join(lhs->range, rhs->range));
    e->op = op;
    e->opRange = range(opToken);
    e->lhs = std::move(lhs);
    e->rhs = std::move(rhs);
    return e;
  }

  // orExpr : andExpr (OR andExpr)* ;
  ExprPtr build(P::OrExprContext *ctx) {
    ExprPtr e = build(ctx->andExpr(0));
    for (size_t i = 1; i < ctx->andExpr().size(); ++i)
      e = binary(BinaryOp::Or, ctx->OR(i - 1)->getSymbol(), std::move(e), build(ctx->andExpr(i)));
    return e;
  }

  // andExpr : notExpr (AND notExpr)* ;
  ExprPtr build(P::AndExprContext *ctx) {
    ExprPtr e = build(ctx->notExpr(0));
    for (size_t i = 1; i < ctx->notExpr().size(); ++i)
      e = binary(BinaryOp::And, ctx->AND(i - 1)->getSymbol(), std::move(e), build(ctx->notExpr(i)));
    return e;
  }

  // notExpr : NOT notExpr | cmpExpr ;
  ExprPtr build(P::NotExprContext *ctx) {
    if (ctx->NOT()) {
      auto e = std::make_unique<UnaryExpr>(range(ctx));
      e->op = UnaryOp::Not;
      e->operand = build(ctx->notExpr());
      return e;
    }
    return build(ctx->cmpExpr());
  }

  // cmpExpr : addExpr (op=('==' | '!=' | '<' | '<=' | '>' | '>=') addExpr)? ;
  ExprPtr build(P::CmpExprContext *ctx) {
    ExprPtr lhs = build(ctx->addExpr(0));
    if (!ctx->op)
      return lhs;
    std::string t = ctx->op->getText();
    BinaryOp op = t == "==" ? BinaryOp::Eq
                  : t == "!=" ? BinaryOp::Ne
                  : t == "<"  ? BinaryOp::Lt
                  : t == "<=" ? BinaryOp::Le
                  : t == ">"  ? BinaryOp::Gt
                              : BinaryOp::Ge;
    return binary(op, ctx->op, std::move(lhs), build(ctx->addExpr(1)));
  }

  // addExpr : mulExpr (ops+=('+' | '-') mulExpr)* ;
  ExprPtr build(P::AddExprContext *ctx) {
    ExprPtr e = build(ctx->mulExpr(0));
    for (size_t i = 1; i < ctx->mulExpr().size(); ++i) {
      antlr4::Token *op = ctx->ops[i - 1];
      e = binary(op->getText() == "+" ? BinaryOp::Add : BinaryOp::Sub, op, std::move(e), build(ctx->mulExpr(i)));
    }
    return e;
  }

  // mulExpr : unaryExpr ((('*' | SLASH) unaryExpr) | UNIT_MUL | UNIT_DIV)* ;
  ExprPtr build(P::MulExprContext *ctx) {
    ExprPtr e;
    antlr4::Token *pending = nullptr;
    for (antlr4::tree::ParseTree *child : ctx->children) {
      if (auto *u = dynamic_cast<P::UnaryExprContext *>(child)) {
        ExprPtr rhs = build(u);
        e = e ? binary(pending->getText() == "*" ? BinaryOp::Mul : BinaryOp::Div, pending, std::move(e), std::move(rhs))
              : std::move(rhs);
        continue;
      }
      auto *t = static_cast<antlr4::tree::TerminalNode *>(child);
      size_t type = t->getSymbol()->getType();
      if (type == P::UNIT_MUL || type == P::UNIT_DIV)
        e = gluedName(type == P::UNIT_MUL ? BinaryOp::Mul : BinaryOp::Div, t, std::move(e));
      else
        pending = t->getSymbol();
    }
    return e;
  }

  // "x/tau" or "a*b^2": a name glued to its operator.
  ExprPtr gluedName(BinaryOp op, antlr4::tree::TerminalNode *t, ExprPtr lhs) {
    std::string text = t->getText();
    auto [opLength, word, exponentText] = splitGlued(text);
    SourceRange whole = range(t);
    SourceRange nameAt = whole;
    nameAt.begin = file_.locAtOffset(whole.begin.offset + static_cast<uint32_t>(opLength));
    nameAt.end = file_.locAtOffset(nameAt.begin.offset + static_cast<uint32_t>(word.size()) - 1);
    auto name = std::make_unique<NameExpr>(nameAt);
    name->name = word;
    ExprPtr rhs = std::move(name);
    if (!exponentText.empty())
      rhs = powerOf(std::move(rhs), exponentText, whole);
    auto e = std::make_unique<BinaryExpr>(SourceRange::join(lhs->range, whole));
    e->op = op;
    e->opRange = {whole.begin, whole.begin};
    e->lhs = std::move(lhs);
    e->rhs = std::move(rhs);
    return e;
  }

  // The digits of an exponent ("-2.5" -> "2.5"): a NumberExpr keeps its sign in `written`.
  static std::string unsignedSpelling(const std::string &exponentText) {
    return exponentText.rfind('-', 0) == 0 ? exponentText.substr(1) : exponentText;
  }

  ExprPtr powerOf(ExprPtr base, const std::string &exponentText, SourceRange whole) {
    auto n = std::make_unique<NumberExpr>(whole);
    n->written = n->value = std::atof(exponentText.c_str());
    n->spelling = unsignedSpelling(exponentText);
    auto e = std::make_unique<BinaryExpr>(SourceRange::join(base->range, whole));
    e->op = BinaryOp::Pow;
    e->opRange = whole;
    e->lhs = std::move(base);
    e->rhs = std::move(n);
    return e;
  }

  // unaryExpr : op=('-' | '+') unaryExpr | powExpr ;
  ExprPtr build(P::UnaryExprContext *ctx) {
    if (ctx->powExpr())
      return build(ctx->powExpr());
    // A sign belongs to the number it precedes: -5 degC is 268.15 K, not -(278.15 K).
    ExprPtr operand = build(ctx->unaryExpr());
    bool negate = ctx->op->getText() == "-";
    if (auto *n = dyn_cast<NumberExpr>(operand.get())) {
      if (negate) {
        n->written = -n->written;
        n->value = n->celsius ? n->written + 273.15 : -n->value;
      }
      n->range = range(ctx);
      return operand;
    }
    auto e = std::make_unique<UnaryExpr>(range(ctx));
    e->op = negate ? UnaryOp::Negate : UnaryOp::Plus;
    e->operand = std::move(operand);
    return e;
  }

  // powExpr : primary ('^' unaryExpr | UNIT_POW+ ('^' unaryExpr)?)? ;
  // Powers associate to the right: 2^3^2 is 2^(3^2).
  ExprPtr build(P::PowExprContext *ctx) {
    ExprPtr base = build(ctx->primary());
    std::vector<ExprPtr> exponents;
    std::vector<SourceRange> at;
    for (antlr4::tree::TerminalNode *p : ctx->UNIT_POW()) {
      auto n = std::make_unique<NumberExpr>(exponentRange(p));
      std::string exponentText = p->getText().substr(1); // after the '^'
      n->written = n->value = std::atof(exponentText.c_str());
      n->spelling = unsignedSpelling(exponentText);
      exponents.push_back(std::move(n));
      at.push_back(range(p));
    }
    if (ctx->unaryExpr()) {
      exponents.push_back(build(ctx->unaryExpr()));
      at.push_back(exponents.back()->range);
    }
    if (exponents.empty())
      return base;
    ExprPtr e = std::move(exponents.back());
    for (size_t i = exponents.size() - 1; i-- > 0;) {
      auto b = std::make_unique<BinaryExpr>(SourceRange::join(exponents[i]->range, e->range));
      b->op = BinaryOp::Pow;
      b->opRange = at[i];
      b->lhs = std::move(exponents[i]);
      b->rhs = std::move(e);
      e = std::move(b);
    }
    auto top = std::make_unique<BinaryExpr>(SourceRange::join(base->range, e->range));
    top->op = BinaryOp::Pow;
    top->opRange = at[0];
    top->lhs = std::move(base);
    top->rhs = std::move(e);
    return top;
  }

  ExprPtr build(P::PrimaryContext *ctx) {
    if (auto *c = dynamic_cast<P::QuantityPrimaryContext *>(ctx))
      return build(c->quantity());
    if (auto *c = dynamic_cast<P::CallPrimaryContext *>(ctx)) {
      // IDENT '(' (expr (',' expr)*)? ')'
      auto e = std::make_unique<CallExpr>(range(c));
      e->callee = c->IDENT()->getText();
      e->calleeRange = range(c->IDENT());
      for (P::ExprContext *a : c->expr())
        e->args.push_back(build(a));
      return e;
    }
    if (auto *c = dynamic_cast<P::NamePrimaryContext *>(ctx)) {
      auto e = std::make_unique<NameExpr>(range(c));
      e->name = c->IDENT()->getText();
      return e;
    }
    if (auto *c = dynamic_cast<P::ConcentrationPrimaryContext *>(ctx)) {
      // '[' IDENT ']' side=(IN | OUT)
      auto e = std::make_unique<ConcentrationExpr>(range(c));
      e->ion = c->IDENT()->getText();
      e->ionRange = range(c->IDENT());
      e->side = c->side->getType() == P::IN ? Side::Inside : Side::Outside;
      return e;
    }
    auto *c = static_cast<P::ParenPrimaryContext *>(ctx);
    ExprPtr inner = build(c->expr());
    inner->range = range(c); // keep the parentheses in the range for underlines
    return inner;
  }

  // quantity : NUMBER unit? ;
  ExprPtr build(P::QuantityContext *ctx) { return quantity(ctx->NUMBER(), ctx->unit(), range(ctx)); }

  // unit : (IDENT UNIT_POW? | UNIT_DIV) (UNIT_MUL | UNIT_DIV)* ;
  std::unique_ptr<NumberExpr> quantity(antlr4::tree::TerminalNode *number, P::UnitContext *u, SourceRange r) {
    auto e = std::make_unique<NumberExpr>(r);
    size_t errors = diags_.errorCount();
    e->written = parseNumber(number);
    e->value = e->written;
    if (diags_.errorCount() == errors) // a number too large to represent has no spelling of its value
      e->spelling = number->getText();
    if (!u)
      return e;
    e->unitText = u->getText();
    e->unitRange = range(u);
    Unit unit;
    bool celsius = false, valid = true;
    size_t factors = 0;
    for (antlr4::tree::ParseTree *child : u->children) {
      auto *t = static_cast<antlr4::tree::TerminalNode *>(child);
      size_t type = t->getSymbol()->getType();
      Factor f;
      bool divide = false;
      if (type == P::IDENT) {
        f = factor(t->getText(), range(t), u->UNIT_POW() ? u->UNIT_POW()->getText().substr(1) : "", valid,
                   u->UNIT_POW() ? exponentRange(u->UNIT_POW()) : SourceRange{});
        if (!valid && factors == 0 && u->children.size() <= 2)
          if (auto *last = diags_.last(); last && last->message.rfind("unknown unit", 0) == 0)
            DiagnosticEngine::note(*last, {}, "a unit follows its number directly; to multiply by a name, write '*'");
      } else if (type == P::UNIT_MUL || type == P::UNIT_DIV) {
        f = gluedFactor(t, valid);
        divide = type == P::UNIT_DIV;
      } else {
        continue; // UNIT_POW, consumed with its IDENT
      }
      ++factors;
      if (f.celsius)
        celsius = true;
      unit = divide ? unit / f.unit : unit * f.unit;
    }
    if (celsius && (factors > 1 || u->UNIT_POW() || !u->IDENT())) {
      auto &d = diags_.error(e->unitRange, "'degC' can only stand alone, as an absolute temperature");
      DiagnosticEngine::note(d, {}, "use 'K' in compound units and for temperature differences");
      valid = false;
    }
    e->unitValid = valid;
    if (!valid)
      return e;
    e->unit = {unit.dim, 1};
    e->celsius = celsius;
    e->value = celsius ? e->written + 273.15 : e->written * unit.scale;
    return e;
  }
};

} // namespace

std::unique_ptr<Module> buildModule(P::SpecContext *spec, antlr4::CommonTokenStream &tokens, const SourceFile &file,
                                    DiagnosticEngine &diags) {
  return ASTBuilder(tokens, file, diags).build(spec);
}

} // namespace saltpan::parsing

namespace saltpan::ast {

namespace {
struct NamedMethod {
  const char *name;
  IntegrationMethod method;
};
constexpr NamedMethod namedMethods[] = {
    {"exponential_euler", IntegrationMethod::ExponentialEuler}, {"rk4", IntegrationMethod::RungeKutta4},
    {"dormand_prince", IntegrationMethod::DormandPrince},       {"rosenbrock", IntegrationMethod::Rosenbrock},
    {"backward_euler", IntegrationMethod::BackwardEuler},       {"crank_nicolson", IntegrationMethod::CrankNicolson}};
} // namespace

IntegrationMethod integrationMethodNamed(const std::string &name) {
  for (const NamedMethod &m : namedMethods)
    if (name == m.name)
      return m.method;
  return IntegrationMethod::Unknown;
}

std::string integrationMethodNames() {
  std::string out;
  size_t n = std::size(namedMethods);
  for (size_t i = 0; i < n; ++i)
    out += std::string(i == 0 ? "" : i + 1 == n ? " and " : ", ") + namedMethods[i].name;
  return out;
}

} // namespace saltpan::ast
