// Methods.cpp - renders a checked model as a methods section in Markdown or LaTeX.
//
// Text is built once as "rich" strings (plain text with marked math and code spans) and
// then rendered for the chosen format, so both formats say the same thing. Everything the
// model does not order (channels, pumps, functions, constants) is sorted by name; numbers
// are either as written in the spec or printed with %.6g.
#include "Methods.h"
#include "Version.h"

#include "Analyze.h"
#include "Decimal.h"
#include "DisplayUnits.h"
#include "Physics.h"
#include "Pipeline.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <set>
#include <string>
#include <utility>
#include <vector>

namespace saltpan {

using namespace ast;

const char *methodsToolVersion() { return SALTPAN_VERSION; }

namespace {

const char *caution = "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions";

// ---- Numbers -----------------------------------------------------------------------

std::string format(const char *fmt, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, fmt, v);
  std::string s = buf;
  if (s == "-0")
    s = "0";
  return s;
}

std::string g6(double v) { return format("%.6g", v); }

/// A decimal number ("2e-06", "-0.07") as LaTeX: 2\times 10^{-6}.
std::string latexNumber(const std::string &text) {
  size_t e = text.find_first_of("eE");
  if (e == std::string::npos)
    return text;
  std::string mantissa = text.substr(0, e), exponent = text.substr(e + 1);
  bool negative = !exponent.empty() && exponent[0] == '-';
  if (!exponent.empty() && (exponent[0] == '-' || exponent[0] == '+'))
    exponent.erase(0, 1);
  while (exponent.size() > 1 && exponent[0] == '0')
    exponent.erase(0, 1);
  std::string power = "10^{" + std::string(negative ? "-" : "") + exponent + "}";
  if (mantissa == "1")
    return power;
  if (mantissa == "-1")
    return "-" + power;
  return mantissa + " \\times " + power;
}

/// The digits of a number literal as the AST builder kept them ("0.07", "2e-6"), or %.15g.
std::string writtenNumber(const NumberExpr &n) {
  if (n.spelling.empty())
    return format("%.15g", n.written);
  return (std::signbit(n.written) ? "-" : "") + n.spelling;
}

// ---- Units and names ---------------------------------------------------------------

bool startsWith(const std::string &s, const std::string &prefix) { return s.rfind(prefix, 0) == 0; }

std::string unitWord(const std::string &word) {
  std::string w = word, out;
  if (w.size() > 1 && w[0] == 'u') {
    out = "\\mu ";
    w.erase(0, 1);
  } else if (startsWith(w, "\u00B5") || startsWith(w, "\u03BC")) {
    out = "\\mu ";
    w.erase(0, 2);
  }
  if (w == "ohm")
    return out + "\\Omega";
  if (startsWith(w, "\u03A9") && w.size() == 2)
    return out + "\\Omega";
  if (startsWith(w, "\u2126") && w.size() == 3)
    return out + "\\Omega";
  if (w.size() > 3 && w.compare(w.size() - 3, 3, "ohm") == 0)
    return out + w.substr(0, w.size() - 3) + "\\Omega";
  return out + w;
}

std::string escapeMathName(const std::string &name) {
  std::string out;
  for (char ch : name)
    out += ch == '_' ? std::string("\\_") : std::string(1, ch);
  return out;
}

/// A name in math: one letter stays italic, longer names are upright.
std::string mathName(const std::string &name) {
  if (name.size() == 1 && std::isalpha(static_cast<unsigned char>(name[0])))
    return name;
  return "\\mathrm{" + escapeMathName(name) + "}";
}

/// A gate's symbol: m stays m, longer names are italic words.
std::string gateSymbol(const std::string &name) {
  if (name.size() == 1 && std::isalpha(static_cast<unsigned char>(name[0])))
    return name;
  return "\\mathit{" + escapeMathName(name) + "}";
}

std::string chargeSuffix(int z) {
  if (z == 1)
    return "+";
  if (z == -1)
    return "-";
  return std::to_string(std::abs(z)) + (z > 0 ? "+" : "-");
}

/// An ion with its charge: \mathrm{Ca^{2+}}.
std::string ionLatex(const IonDecl *ion, const std::string &fallback) {
  if (!ion)
    return "\\mathrm{" + escapeMathName(fallback) + "}";
  auto z = integerValence(*ion);
  std::string name = escapeMathName(ion->name);
  return z ? "\\mathrm{" + name + "^{" + chargeSuffix(*z) + "}}" : "\\mathrm{" + name + "}";
}

// ---- Expressions -------------------------------------------------------------------

enum Prec { POr = 1, PAnd, PCmp, PAdd, PMul, PUnary, PFrac, PPow, PAtom };

struct Rendered {
  std::string text;
  int prec = PAtom;
};

std::string paren(const std::string &s) { return "\\left(" + s + "\\right)"; }
std::string wrapIf(const Rendered &r, bool cond) { return cond ? paren(r.text) : r.text; }

Rendered render(const Expr &e);

std::string args(const CallExpr &c) {
  std::string out;
  for (size_t i = 0; i < c.args.size(); ++i)
    out += (i ? ",\\ " : "") + render(*c.args[i]).text;
  return out;
}

Rendered power(const Rendered &base, const Rendered &exponent) {
  return {"{" + wrapIf(base, base.prec < PAtom) + "}^{" + exponent.text + "}", PPow};
}

Rendered renderCall(const CallExpr &c) {
  auto arg = [&](size_t i) { return i < c.args.size() ? render(*c.args[i]) : Rendered{"?", PAtom}; };
  switch (c.math) {
  case MathFn::Exp: return {"\\exp" + paren(arg(0).text)};
  case MathFn::Expm1: return {"\\exp" + paren(arg(0).text) + " - 1", PAdd};
  case MathFn::Log: return {"\\ln" + paren(arg(0).text)};
  case MathFn::Log10: return {"\\log_{10}" + paren(arg(0).text)};
  case MathFn::Sqrt: return {"\\sqrt{" + arg(0).text + "}"};
  case MathFn::Pow: return power(arg(0), arg(1));
  case MathFn::Abs: return {"\\left|" + arg(0).text + "\\right|"};
  case MathFn::Min: return {"\\min" + paren(args(c))};
  case MathFn::Max: return {"\\max" + paren(args(c))};
  case MathFn::Tanh: return {"\\tanh" + paren(arg(0).text)};
  case MathFn::Reversal: {
    std::string ion = c.args.empty() ? "?" : c.reversalIon ? c.reversalIon->name : "?";
    return {"E_{\\mathrm{" + escapeMathName(ion) + "}}"};
  }
  case MathFn::None: break;
  }
  return {"\\operatorname{" + escapeMathName(c.callee) + "}" + paren(args(c))};
}

Rendered renderBinary(const BinaryExpr &b) {
  Rendered l = render(*b.lhs), r = render(*b.rhs);
  bool rNeg = isa<UnaryExpr>(b.rhs.get()) || r.text.rfind("-", 0) == 0;
  auto cmp = [&](const char *op) {
    return Rendered{wrapIf(l, l.prec <= PCmp) + " " + op + " " + wrapIf(r, r.prec <= PCmp), PCmp};
  };
  switch (b.op) {
  case BinaryOp::Add: return {wrapIf(l, l.prec < PAdd) + " + " + wrapIf(r, r.prec < PAdd || rNeg), PAdd};
  case BinaryOp::Sub: return {wrapIf(l, l.prec < PAdd) + " - " + wrapIf(r, r.prec <= PAdd || rNeg), PAdd};
  case BinaryOp::Mul: return {wrapIf(l, l.prec < PMul) + " \\cdot " + wrapIf(r, r.prec < PMul || rNeg), PMul};
  case BinaryOp::Div: return {"\\frac{" + l.text + "}{" + r.text + "}", PFrac};
  case BinaryOp::Pow: return power(l, r);
  case BinaryOp::Eq: return cmp("=");
  case BinaryOp::Ne: return cmp("\\neq");
  case BinaryOp::Lt: return cmp("<");
  case BinaryOp::Le: return cmp("\\leq");
  case BinaryOp::Gt: return cmp(">");
  case BinaryOp::Ge: return cmp("\\geq");
  case BinaryOp::And: return {wrapIf(l, l.prec < PAnd) + " \\wedge " + wrapIf(r, r.prec <= PAnd), PAnd};
  case BinaryOp::Or: return {wrapIf(l, l.prec < POr) + " \\vee " + wrapIf(r, r.prec <= POr), POr};
  }
  return {"?"};
}

Rendered render(const Expr &e) {
  if (auto *n = dyn_cast<NumberExpr>(&e)) {
    std::string digits = writtenNumber(*n);
    std::string text = latexNumber(digits);
    bool negative = !digits.empty() && digits[0] == '-';
    bool product = text.find("\\times") != std::string::npos;
    if (n->celsius)
      return {text + "\\,{}^{\\circ}\\mathrm{C}", negative ? PUnary : PMul};
    if (!n->unitText.empty())
      return {text + "\\," + latexUnit(n->unitText), negative ? PUnary : PMul};
    return {text, negative ? PUnary : product ? PMul : PAtom};
  }
  if (auto *n = dyn_cast<NameExpr>(&e)) {
    if (n->builtin == Builtin::MembranePotential)
      return {"V"};
    if (n->builtin == Builtin::Temperature)
      return {"T"};
    return {mathName(n->name)};
  }
  if (auto *c = dyn_cast<ConcentrationExpr>(&e))
    return {"[\\mathrm{" + escapeMathName(c->ion) + "}]_{\\mathrm{" + (c->side == Side::Inside ? "i" : "o") + "}}"};
  if (auto *c = dyn_cast<CallExpr>(&e))
    return renderCall(*c);
  if (auto *u = dyn_cast<UnaryExpr>(&e)) {
    Rendered r = render(*u->operand);
    if (u->op == UnaryOp::Not)
      return {"\\neg " + wrapIf(r, r.prec < PUnary), PUnary};
    std::string sign = u->op == UnaryOp::Negate ? "-" : "+";
    return {sign + wrapIf(r, r.prec < PMul || r.text.rfind("-", 0) == 0), PUnary};
  }
  if (auto *b = dyn_cast<BinaryExpr>(&e))
    return renderBinary(*b);
  if (auto *i = dyn_cast<IfExpr>(&e))
    return {"\\begin{cases} " + render(*i->thenExpr).text + " & \\text{if } " + render(*i->cond).text + " \\\\ " +
            render(*i->elseExpr).text + " & \\text{otherwise} \\end{cases}"};
  return {"?"};
}

// ---- Rich text: plain text with marked math and code, rendered per format ----------

const char MathOpen = '\x01', MathClose = '\x02', CodeOpen = '\x03', CodeClose = '\x04';

std::string M(const std::string &latex) { return MathOpen + latex + MathClose; }
std::string Code(const std::string &text) { return CodeOpen + text + CodeClose; }

std::string quantity(double v, const std::string &unit) { return M(latexNumber(g6(v)) + "\\," + latexUnit(unit)); }
std::string number(double v) {
  std::string s = g6(v);
  return s.find('e') == std::string::npos && s[0] != '-' ? s : M(latexNumber(s));
}

std::string escapeLatexText(const std::string &s) {
  std::string out;
  for (size_t i = 0; i < s.size(); ++i) {
    unsigned char ch = static_cast<unsigned char>(s[i]);
    switch (ch) {
    case '\\': out += "\\textbackslash{}"; continue;
    case '{': out += "\\{"; continue;
    case '}': out += "\\}"; continue;
    case '$': out += "\\$"; continue;
    case '&': out += "\\&"; continue;
    case '#': out += "\\#"; continue;
    case '^': out += "\\^{}"; continue;
    case '_': out += "\\_"; continue;
    case '%': out += "\\%"; continue;
    case '~': out += "\\~{}"; continue;
    case '<': out += "\\textless{}"; continue;
    case '>': out += "\\textgreater{}"; continue;
    case '|': out += "\\textbar{}"; continue;
    case '\n': out += ' '; continue;
    default: break;
    }
    if (ch < 0x80) {
      out += static_cast<char>(ch);
      continue;
    }
    // One UTF-8 sequence: a few symbols get LaTeX spellings, Latin-1 letters pass through
    // (utf8 input handles them), anything else becomes '?' so the document always compiles.
    size_t len = ch >= 0xF0 ? 4 : ch >= 0xE0 ? 3 : 2;
    std::string seq = s.substr(i, len);
    i += len - 1;
    static const std::map<std::string, std::string> known = {
        {"\u00B0", "\\ensuremath{^{\\circ}}"}, {"\u00B5", "\\ensuremath{\\mu}"}, {"\u03BC", "\\ensuremath{\\mu}"},
        {"\u2013", "--"},  {"\u2014", "---"},  {"\u2018", "`"},  {"\u2019", "'"},  {"\u201C", "``"},
        {"\u201D", "''"},  {"\u00D7", "\\ensuremath{\\times}"}, {"\u00B7", "\\ensuremath{\\cdot}"},
        {"\u2248", "\\ensuremath{\\approx}"}, {"\u2212", "\\ensuremath{-}"}, {"\u03A9", "\\ensuremath{\\Omega}"},
        {"\u00B2", "\\ensuremath{^{2}}"}, {"\u00B3", "\\ensuremath{^{3}}"}};
    if (auto it = known.find(seq); it != known.end())
      out += it->second;
    else if (len == 2 && (ch == 0xC3 || (ch == 0xC2 && static_cast<unsigned char>(seq[1]) >= 0xC0)))
      out += seq; // U+00C0..U+00FF: accented Latin letters
    else
      out += '?';
  }
  return out;
}

std::string escapeMarkdownText(const std::string &s) {
  std::string out;
  for (char ch : s) {
    if (ch == '\n')
      out += ' ';
    else if (std::string("\\`*_|<$").find(ch) != std::string::npos)
      out += std::string("\\") + ch;
    else
      out += ch;
  }
  return out;
}

class Doc {
public:
  explicit Doc(MethodsFormat f) : f_(f) {}
  bool latex() const { return f_ == MethodsFormat::Latex; }

  std::string inl(const std::string &rich) const {
    std::string out, text;
    auto flush = [&] {
      out += latex() ? escapeLatexText(text) : escapeMarkdownText(text);
      text.clear();
    };
    for (size_t i = 0; i < rich.size(); ++i) {
      char ch = rich[i];
      if (ch == MathOpen || ch == CodeOpen) {
        flush();
        char close = ch == MathOpen ? MathClose : CodeClose;
        size_t end = rich.find(close, i + 1);
        if (end == std::string::npos)
          end = rich.size();
        std::string inner = rich.substr(i + 1, end - i - 1);
        if (ch == MathOpen)
          out += "$" + inner + "$";
        else
          out += latex() ? "\\texttt{" + escapeLatexText(inner) + "}" : "`" + inner + "`";
        i = end;
      } else {
        text += ch;
      }
    }
    flush();
    return out;
  }

  void heading(int level, const std::string &rich) {
    if (latex()) {
      static const char *commands[] = {"section*", "subsection*", "subsubsection*", "paragraph"};
      out_ += "\\" + std::string(commands[std::clamp(level, 1, 4) - 1]) + "{" + inl(rich) + "}\n\n";
    } else {
      out_ += std::string(static_cast<size_t>(std::clamp(level, 1, 6)), '#') + " " + inl(rich) + "\n\n";
    }
  }

  void para(const std::string &rich) { out_ += inl(rich) + "\n\n"; }

  void items(const std::vector<std::string> &rich) {
    if (rich.empty())
      return;
    if (latex()) {
      out_ += "\\begin{itemize}\n";
      for (const std::string &r : rich)
        out_ += "  \\item " + inl(r) + "\n";
      out_ += "\\end{itemize}\n\n";
    } else {
      for (const std::string &r : rich)
        out_ += "- " + inl(r) + "\n";
      out_ += "\n";
    }
  }

  /// Equations (left side, right side): an align* block in LaTeX, a list of $...$ in Markdown.
  void equations(const std::vector<std::pair<std::string, std::string>> &eqs) {
    if (eqs.empty())
      return;
    if (latex()) {
      out_ += "\\begin{align*}\n";
      for (size_t i = 0; i < eqs.size(); ++i)
        out_ += "  " + eqs[i].first + " &= " + eqs[i].second + (i + 1 < eqs.size() ? " \\\\" : "") + "\n";
      out_ += "\\end{align*}\n\n";
    } else {
      for (const auto &[lhs, rhs] : eqs)
        out_ += "- $" + lhs + " = " + rhs + "$\n";
      out_ += "\n";
    }
  }

  /// align: one letter per column, 'l' or 'r'.
  void table(const std::vector<std::string> &header, const std::vector<std::vector<std::string>> &rows,
             const std::string &align, const std::string &latexColumns = "") {
    if (latex()) {
      out_ += "\\begin{center}\n\\small\n\\begin{tabular}{" + (latexColumns.empty() ? align : latexColumns) +
              "}\n\\hline\n";
      auto row = [&](const std::vector<std::string> &cells) {
        for (size_t i = 0; i < cells.size(); ++i)
          out_ += (i ? " & " : "") + inl(cells[i]);
        out_ += " \\\\\n";
      };
      row(header);
      out_ += "\\hline\n";
      for (const auto &r : rows)
        row(r);
      out_ += "\\hline\n\\end{tabular}\n\\end{center}\n\n";
    } else {
      auto row = [&](const std::vector<std::string> &cells) {
        out_ += "|";
        for (const std::string &c : cells)
          out_ += " " + inl(c) + " |";
        out_ += "\n";
      };
      row(header);
      out_ += "|";
      for (char a : align)
        out_ += a == 'r' ? " ---: |" : " :--- |";
      out_ += "\n";
      for (const auto &r : rows)
        row(r);
      out_ += "\n";
    }
  }

  void raw(const std::string &s) { out_ += s; }
  const std::string &str() const { return out_; }

private:
  MethodsFormat f_;
  std::string out_;
};

// ---- The description ---------------------------------------------------------------

std::string densityCell(const Placement &p) {
  if (!p.density || p.densityKind == DensityKind::Unknown)
    return "n/a";
  DisplayUnit unit = densityUnit(p.densityKind);
  return quantity(*p.density * unit.scale, unit.name);
}

std::string potentialCell(std::optional<double> v) { return v ? number(*v * 1e3) : "n/a"; }

std::string joinAnd(const std::vector<std::string> &parts) {
  std::string out;
  for (size_t i = 0; i < parts.size(); ++i)
    out += (i == 0 ? "" : i + 1 == parts.size() ? " and " : ", ") + parts[i];
  return out;
}

struct MethodRef {
  std::string description; // rich
  std::string reference;   // rich, empty when none
};

MethodRef methodInfo(const std::string &method) {
  if (method == "rk4")
    return {"the classical fourth-order Runge" "\u2013" "Kutta method (RK4) on the full system, with steps split "
            "at the edges of stimuli and clamp steps",
            ""};
  if (method == "dormand_prince")
    return {"the adaptive embedded Runge" "\u2013" "Kutta 5(4) pair of Dormand & Prince (1980), keeping the error of "
            "each step below " + M("\\mathrm{atol} + \\mathrm{rtol}\\,|y|"),
            "J. R. Dormand and P. J. Prince (1980). A family of embedded Runge" "\u2013" "Kutta formulae. Journal of "
            "Computational and Applied Mathematics 6(1):19" "\u2013" "26."};
  if (method == "backward_euler" || method == "crank_nicolson") {
    bool crank = method == "crank_nicolson";
    return {std::string("gates by exponential Euler (Rush & Larsen 1978), then every membrane potential at once by ") +
                (crank ? "Crank"
                         "\u2013"
                         "Nicolson (backward Euler over half the step, extrapolated to its end; second "
                         "order in time)"
                       : "backward Euler (first order in time)") +
                " on the linear system of the membranes and the axial conductances, solved in O(N) by elimination "
                "from the leaves of the tree to its root (Hines 1984); steps are split at the edges of stimuli",
            "M. Hines (1984). Efficient computation of branched nerve equations. International Journal of "
            "Bio-Medical Computing 15(1):69"
            "\u2013"
            "76."};
  }
  if (method == "rosenbrock")
    return {"the second-order L-stable Rosenbrock method ROS2 of Verwer et al. (1999), adaptive with its embedded "
            "first-order solution and a finite-difference Jacobian at every step",
            "J. G. Verwer, E. J. Spee, J. G. Blom and W. Hundsdorfer (1999). A second-order Rosenbrock method applied "
            "to photochemical dispersion problems. SIAM Journal on Scientific Computing 20(4):1456" "\u2013" "1480."};
  return {"exponential Euler with Rush" "\u2013" "Larsen gate updates (Rush & Larsen 1978), gates first: each gate "
          "follows its exact exponential relaxation towards its steady value at the potential of the step's start, "
          "then V follows the exact exponential relaxation of the linear membrane equation with the conductances of "
          "the updated gates, pump, GHK and injected currents taken at the middle of the step (second order in V); "
          "steps are split at the edges of stimuli and clamp steps",
          "S. Rush and H. Larsen (1978). A practical algorithm for solving dynamic membrane equations. IEEE "
          "Transactions on Biomedical Engineering 25(4):389" "\u2013" "392."};
}

class Generator {
public:
  Generator(Compilation &c, const MethodsOptions &o) : c_(c), m_(c.model), o_(o), d_(o.format) {}

  std::string run() {
    collectPlacements();
    if (d_.latex() && !o_.fragment)
      d_.raw("\\documentclass{article}\n\\usepackage{amsmath}\n\\begin{document}\n\n");
    header();
    temperatureAndConventions();
    solutions();
    compartments();
    channels();
    pumps();
    functionsAndConstants();
    protocols();
    checks();
    software();
    if (d_.latex() && !o_.fragment)
      d_.raw("\\end{document}\n");
    std::string out = d_.str();
    while (out.size() > 1 && out[out.size() - 1] == '\n' && out[out.size() - 2] == '\n')
      out.pop_back();
    return out;
  }

private:
  Compilation &c_;
  const AnalyzedModel &m_;
  MethodsOptions o_;
  Doc d_;
  struct Site {
    const CompartmentValues *compartment;
    const Placement *placement;
  };
  std::map<std::string, std::pair<const ChannelDecl *, std::vector<Site>>> channels_;
  std::map<std::string, std::pair<const PumpDecl *, std::vector<Site>>> pumps_;
  std::map<std::string, const FnDecl *> functions_;
  std::map<std::string, const ConstDecl *> constants_;
  std::set<std::string> methodsUsed_;

  void collectPlacements() {
    for (const CompartmentValues &cv : m_.compartments)
      for (const Placement &p : cv.placements) {
        if (cv.piece > 0) // a cable's pieces share its membrane
          break;
        if (p.channel) {
          auto &entry = channels_[p.channel->name];
          entry.first = p.channel;
          entry.second.push_back({&cv, &p});
        } else if (p.pump) {
          auto &entry = pumps_[p.pump->name];
          entry.first = p.pump;
          entry.second.push_back({&cv, &p});
        }
      }
  }

  // Functions and constants an expression uses, transitively.
  void collect(const Expr *e) {
    if (!e)
      return;
    if (auto *n = dyn_cast<NameExpr>(e)) {
      if (auto *k = dyn_cast<ConstDecl>(n->target); k && !constants_.count(k->name)) {
        constants_[k->name] = k;
        collect(k->value.get());
      }
    } else if (auto *c = dyn_cast<CallExpr>(e)) {
      if (c->target && !functions_.count(c->target->name)) {
        functions_[c->target->name] = c->target;
        collect(c->target->body.get());
      }
      for (const ExprPtr &a : c->args)
        collect(a.get());
    } else if (auto *u = dyn_cast<UnaryExpr>(e)) {
      collect(u->operand.get());
    } else if (auto *b = dyn_cast<BinaryExpr>(e)) {
      collect(b->lhs.get());
      collect(b->rhs.get());
    } else if (auto *i = dyn_cast<IfExpr>(e)) {
      collect(i->cond.get());
      collect(i->thenExpr.get());
      collect(i->elseExpr.get());
    }
  }

  std::string math(const Expr *e) {
    collect(e);
    return e ? render(*e).text : "?";
  }
  std::string mathOf(const ExprPtr &e) { return math(e.get()); }

  std::string celsius(double kelvin) { return g6(kelvin - physics::zeroCelsius); }

  void header() {
    std::string name = m_.header ? m_.header->name : "(unnamed model)";
    d_.heading(1, "Methods: " + name);
    std::string intro;
    if (m_.header && !m_.header->title.empty())
      intro = "Model " + Code(name) + ": " + m_.header->title + ". ";
    intro += "This description was generated by saltpan " + std::string(SALTPAN_VERSION) + " from the specification " +
             Code(o_.sourceName) + " and may be edited freely.";
    d_.para(intro);
    if (m_.header && !m_.header->doc.empty())
      d_.para(m_.header->doc);
  }

  void temperatureAndConventions() {
    d_.heading(2, "Temperature and conventions");
    if (m_.temperature)
      d_.para("The model temperature is " + M(latexNumber(celsius(*m_.temperature)) + "\\,{}^{\\circ}\\mathrm{C}") +
              " (" + M(latexNumber(g6(*m_.temperature)) + "\\,\\mathrm{K}") + ", with " +
              M("0\\,{}^{\\circ}\\mathrm{C} = 273.15\\,\\mathrm{K}") + ").");
    else
      d_.para("The model does not state a temperature.");
    d_.para("The membrane potential " + M("V") +
            " is the potential inside minus outside. Membrane current is positive outward; injected current is "
            "positive into the cell.");
    std::string eq = "E_X = \\frac{RT}{z_X F} \\ln\\frac{[X]_{\\mathrm{o}}}{[X]_{\\mathrm{i}}}";
    std::string s = "Reversal potentials are Nernst potentials computed at the model temperature, " + M(eq) +
                    ", with concentrations (not activities), where " + M("z_X") + " is the valence of ion " + M("X") +
                    ". The constants are the exact values of the 2019 SI (CODATA 2018): " +
                    M("e = 1.602176634 \\times 10^{-19}\\,\\mathrm{C}") + ", " +
                    M("N_A = 6.02214076 \\times 10^{23}\\,\\mathrm{mol^{-1}}") + ", " +
                    M("k_B = 1.380649 \\times 10^{-23}\\,\\mathrm{J\\,K^{-1}}") + ", hence " +
                    M("R = k_B N_A = " + format("%.15g", physics::gasConstant) + "\\,\\mathrm{J\\,mol^{-1}\\,K^{-1}}") +
                    " and " + M("F = e N_A = " + format("%.15g", physics::faraday) + "\\,\\mathrm{C\\,mol^{-1}}") + ".";
    if (m_.temperature)
      s += " At the model temperature " + M("RT/F = " + g6(physics::thermalVoltage(*m_.temperature) * 1e3) +
                                            "\\,\\mathrm{mV}") + ".";
    d_.para(s);
  }

  std::string ionCell(const IonDecl *ion) { return M(ionLatex(ion, ion ? ion->name : "?")); }

  void solutions() {
    d_.heading(2, "Solutions and reversal potentials");
    bool any = false;
    for (const CompartmentValues &cv : m_.compartments) {
      if (cv.ions.empty() || cv.piece > 0) // a cable's pieces share its solutions
        continue;
      any = true;
      d_.heading(3, "Compartment " + Code(cv.decl->name) +
                        (cv.bath ? " (outside solution " + Code(cv.bath->name) + ")" : std::string()));
      std::vector<std::vector<std::string>> rows;
      for (const IonDecl *ion : cv.ions) {
        auto in = cv.inside.get(ion);
        auto out = cv.outside ? cv.outside->get(ion) : std::nullopt;
        std::string inCell = in ? number(*in) : "n/a";
        if (auto it = cv.inside.entry.find(ion); it != cv.inside.entry.end() && it->second && it->second->dynamic)
          inCell += " (initial; dynamic)";
        auto z = integerValence(*ion);
        rows.push_back({ionCell(ion), z ? M((*z > 0 ? "+" : "") + std::to_string(*z)) : "?", inCell,
                        out ? number(*out) : "n/a",
                        potentialCell(m_.temperature ? cv.nernst(ion, *m_.temperature) : std::nullopt)});
      }
      d_.table({"Ion", M("z"), "Inside (mM)", "Outside (mM)", M("E_X") + " (mV)"}, rows, "lrrrr");
      std::vector<std::string> notes;
      auto impermeants = [&](const SolutionValues &s, const std::string &side) {
        for (auto [valence, amount] : s.impermeant)
          notes.push_back(side + ": " + quantity(amount, "mM") + " of impermeant solute of valence " +
                          M((valence > 0 ? "+" : "") + g6(valence)));
      };
      impermeants(cv.inside, "Inside");
      if (cv.outside)
        impermeants(*cv.outside, "Outside");
      if (!notes.empty()) {
        d_.para("Impermeant solutes (they enter only the electroneutrality check):");
        d_.items(notes);
      }
      for (const auto &pool : cv.pools) {
        std::string where = pool.entry && pool.entry->shellDepth
                                ? "a shell of depth " + M(mathOf(pool.entry->shellDepth)) + " under the membrane"
                                : std::string("the whole compartment volume");
        d_.para("The inside concentration of " + ionCell(pool.ion) + " is dynamic: the pool is " + where +
                " (membrane area over pool volume " + quantity(pool.areaPerVolume * 1e-6, "/um") +
                "), and it changes as " +
                M("d[X]_{\\mathrm{i}}/dt = -I_X \\, (A/\\mathrm{vol}) / (z_X F)") + " with " + M("I_X") +
                " the outward current density the ion carries. Outside concentrations are fixed.");
      }
    }
    if (!any)
      d_.para("The specification gives no ion concentrations; every reversal potential is written explicitly "
              "(see the channels below).");
  }

  void compartments() {
    d_.heading(2, "Compartments");
    std::vector<std::vector<std::string>> rows;
    for (const CompartmentValues &cv : m_.compartments) {
      if (cv.piece > 0)
        continue;
      const Geometry &g = cv.decl->geometry;
      std::string geometry = "n/a";
      if (const CableValues *cable = cableOf(cv)) {
        geometry = "cable, " + std::to_string(cable->pieces) + " pieces (see below)";
        double area = 0;
        for (size_t i = 0; i < cable->pieces; ++i)
          area += m_.compartments[cable->first + i].area.value_or(0);
        rows.push_back({Code(cv.decl->name), geometry, number(area * 1e12),
                        cv.capacitance ? number(*cv.capacitance * 100) : "n/a",
                        cv.initialV ? number(*cv.initialV * 1e3) : "n/a"});
        continue;
      }
      if (g.shape == Shape::Sphere)
        geometry = "sphere, diameter " + M(mathOf(g.diameter));
      else if (g.shape == Shape::Cylinder)
        geometry = "cylinder, length " + M(mathOf(g.length)) + ", diameter " + M(mathOf(g.diameter));
      else if (g.shape == Shape::Area)
        geometry = "membrane area " + M(mathOf(g.area));
      rows.push_back({Code(cv.decl->name), geometry, cv.area ? number(*cv.area * 1e12) : "n/a",
                      cv.capacitance ? number(*cv.capacitance * 100) : "n/a",
                      cv.initialV ? number(*cv.initialV * 1e3) : "n/a"});
    }
    d_.table({"Compartment", "Geometry", "Area (" + M("\\mu\\mathrm{m}^{2}") + ")",
              M("C_m") + " (" + M("\\mu\\mathrm{F\\,cm^{-2}}") + ")", M("V_0") + " (mV)"},
             rows, "llrrr", "lp{3.2cm}rrr");
    d_.para("Here " + M("C_m") + " is the specific membrane capacitance and " + M("V_0") +
            " the initial membrane potential.");
    d_.para("A sphere's membrane area is " + M("\\pi d^{2}") + " and a cylinder's is its side wall " +
            M("\\pi d L") + ". In each compartment " +
            M("C_m \\, dV/dt = -\\sum I_{\\mathrm{membrane}} + I_{\\mathrm{injected}}") +
            ", with the currents as densities per membrane area.");
    morphology();
    for (const CompartmentValues &cv : m_.compartments)
      if (cv.ghkRest && cv.piece <= 0)
        d_.para("In " + Code(cv.decl->name) + " the GHK resting potential of the ungated permeability channels (" +
                std::to_string(cv.ghkChannels) + ") is " + quantity(*cv.ghkRest * 1e3, "mV") + ".");
  }

  const CableValues *cableOf(const CompartmentValues &cv) const {
    for (const CableValues &c : m_.cables)
      if (c.decl == cv.decl)
        return &c;
    return nullptr;
  }

  // Each cable's shape and how it was cut, and how joined compartments share current.
  void morphology() {
    if (m_.cables.empty())
      return;
    d_.heading(3, "Morphology and discretisation");
    std::vector<std::string> items;
    for (const CableValues &cable : m_.cables) {
      const CableShape &shape = *cable.decl->cable;
      std::string from = shape.parentDecl ? ", grown from " + Code(shape.parent) +
                                                (shape.at ? " at " + M(mathOf(shape.at.at)) : std::string()) +
                                                (shape.parentDecl->cable && !shape.at ? " (its far end)" : "")
                                          : " (a free cable)";
      std::string diameter = cable.diameterEnd != cable.diameter
                                 ? "diameter tapering from " + quantity(cable.diameter * 1e6, "um") + " to " +
                                       quantity(cable.diameterEnd * 1e6, "um")
                                 : "diameter " + quantity(cable.diameter * 1e6, "um");
      std::string s = Code(cable.decl->name) + from + ": length " + quantity(tidyDecimal(cable.length * 1e6), "um") +
                      ", " + diameter + ", axial resistivity " + quantity(cable.axialResistivity * 100, "ohm*cm") +
                      "; cut into " + std::to_string(cable.pieces) + " pieces of " +
                      quantity(tidyDecimal(cable.pieceLength() * 1e6), "um");
      if (shape.perLengthConstantAt)
        s += " (as many as make each at most 1/" + std::to_string(shape.pieces) + " of the length constant at " +
             M(mathOf(shape.perLengthConstantAt)) + " of its thinnest end, " +
             M("\\lambda_f = \\lambda \\sqrt{2 / (1 + \\sqrt{1 + (2 \\pi f \\tau_m)^2})}") + ", " +
             M("\\tau_m = C_m / G") + ")";
      if (cable.lengthConstant)
        s += "; length constant at rest " + quantity(*cable.lengthConstant * 1e6, "um") + " (electrotonic length " +
             M(g6(cable.length / *cable.lengthConstant)) + ")";
      items.push_back(s + ".");
    }
    d_.items(items);
    d_.para("Each piece of a cable is a compartment of its own, with the side wall of its stretch of cable as "
            "membrane area and the cable's membrane, solutions and capacitance (a cable that gives none takes those "
            "of what it grows from). Neighbouring pieces, and a cable and what it grows from, are joined by the axial "
            "resistance between their centres, " +
            M("4 R_i h / (\\pi d_1 d_2)") + " for each stretch of length " + M("h") + " between diameters " + M("d_1") +
            " and " + M("d_2") + "; the far ends are sealed. The length constant is " +
            M("\\lambda = \\sqrt{d / (4 R_i G)}") + ", with " + M("G") +
            " the membrane's conductance density at the initial state (Rall 1969). Ions do "
            "not diffuse along a cable.");
  }

  std::string carriesText(const ChannelDecl &ch) {
    std::vector<std::string> ions;
    for (const CarriedIon &k : ch.carries)
      ions.push_back(M(ionLatex(k.target, k.ion)));
    return joinAnd(ions);
  }

  std::string reversalText(const ChannelDecl &ch) {
    if (ch.reversal)
      return "The channel type's reversal potential is written as " + M("E = " + mathOf(ch.reversal)) +
             (ch.carries.empty() ? std::string(".") : "; it is compared with the concentrations when checked.");
    if (ch.carries.size() == 1)
      return "Unless a membrane entry sets it, its reversal potential is the Nernst potential of " +
             M(ionLatex(ch.carries[0].target, ch.carries[0].ion)) + " in each compartment.";
    if (ch.carries.size() > 1) {
      std::string lhs, rhs;
      for (size_t i = 0; i < ch.carries.size(); ++i) {
        const CarriedIon &k = ch.carries[i];
        lhs += (i ? " : " : "") + std::string("P_{\\mathrm{") + escapeMathName(k.ion) + "}}";
        rhs += (i ? " : " : "") + (k.hasRatio ? latexNumber(g6(k.ratio.value)) : std::string("1"));
      }
      return "Unless a membrane entry sets it, its reversal potential is the zero-current potential of the GHK current equations (the GHK voltage "
             "equation) with permeability ratios " + M(lhs + " = " + rhs) + ".";
    }
    return "";
  }

  const char *reversalFrom(const Placement &p) {
    switch (p.reversalKind) {
    case ReversalKind::Nernst: return "Nernst";
    case ReversalKind::Ghk: return "GHK";
    case ReversalKind::Written:
      return p.entry && p.entry->reversal ? "written (membrane entry)" : "written (channel type)";
    case ReversalKind::None: break;
    }
    return "n/a";
  }

  void channels() {
    d_.heading(2, "Channels");
    if (channels_.empty()) {
      d_.para("No channels are placed in any membrane.");
      return;
    }
    for (const auto &[name, entry] : channels_) {
      const ChannelDecl &ch = *entry.first;
      d_.heading(3, "Channel " + Code(name));
      if (!ch.doc.empty())
        d_.para(ch.doc);
      std::string s;
      if (!ch.carries.empty())
        s = "It carries " + carriesText(ch) + ". ";
      s += reversalText(ch);
      d_.para(s);

      std::string open;
      for (const Gate &g : ch.gates) {
        int p = g.hasPower ? static_cast<int>(g.power.value) : 1;
        open += (open.empty() ? "" : " ") + gateSymbol(g.name) + (p != 1 ? "^{" + std::to_string(p) + "}" : "");
      }
      bool conductance = false, permeability = false;
      for (const Site &site : entry.second) {
        conductance |= site.placement->densityKind == DensityKind::Conductance;
        permeability |= site.placement->densityKind == DensityKind::Permeability;
      }
      std::string gated = open.empty() ? "" : "\\, " + open;
      if (conductance)
        d_.para("With a conductance density " + M("\\bar{g}") + " its current density is " +
                M("I = \\bar{g}" + gated + "\\,(V - E)") + ".");
      if (permeability)
        d_.para("With a permeability density " + M("\\bar{P}") + " its current density is the sum of GHK currents " +
                M("I = \\sum_X \\bar{P}" + gated + "\\, r_X \\, z_X^{2} \\frac{F^{2} V}{RT} \\frac{[X]_{\\mathrm{i}} - "
                  "[X]_{\\mathrm{o}} e^{-z_X F V / RT}}{1 - e^{-z_X F V / RT}}") +
                " over the ions it carries, with " + M("r_X") + " the permeability ratio (1 when not given).");

      std::vector<std::vector<std::string>> rows;
      for (const Site &site : entry.second)
        rows.push_back({Code(site.compartment->decl->name), densityCell(*site.placement),
                        potentialCell(site.placement->reversal), reversalFrom(*site.placement)});
      d_.table({"Compartment", "Density", "Reversal (mV)", "Reversal from"}, rows, "lrrl");
      for (const Site &site : entry.second)
        if (site.placement->entry && site.placement->entry->reversal)
          d_.para("In " + Code(site.compartment->decl->name) + " the membrane entry sets " +
                  M("E = " + mathOf(site.placement->entry->reversal)) + ".");

      if (ch.gates.empty()) {
        d_.para("The channel is ungated.");
      } else {
        d_.para("Gating (" + M(open) + "):");
        std::vector<std::pair<std::string, std::string>> eqs;
        for (const Gate &g : ch.gates) {
          std::string x = gateSymbol(g.name);
          if (g.opening && g.closing) {
            eqs.push_back({"\\alpha_{" + x + "}", mathOf(g.opening)});
            eqs.push_back({"\\beta_{" + x + "}", mathOf(g.closing)});
            eqs.push_back({"\\frac{d" + x + "}{dt}", "\\alpha_{" + x + "}\\,(1 - " + x + ") - \\beta_{" + x + "}\\, " + x});
          } else if (g.steady && g.tau) {
            eqs.push_back({x + "_{\\infty}", mathOf(g.steady)});
            eqs.push_back({"\\tau_{" + x + "}", mathOf(g.tau)});
            eqs.push_back({"\\frac{d" + x + "}{dt}", "\\frac{" + x + "_{\\infty} - " + x + "}{\\tau_{" + x + "}}"});
          }
        }
        d_.equations(eqs);
      }
      if (ch.q10 && ch.q10Reference) {
        std::string q = "The kinetics are written at " + M(mathOf(ch.q10Reference)) + " with " +
                        M("Q_{10} = " + mathOf(ch.q10)) +
                        "; opening and closing rates are multiplied, and time constants divided, by " +
                        M("\\phi = Q_{10}^{(T - T_{\\mathrm{ref}})/10\\,\\mathrm{K}}");
        auto factor = c_.evaluator.evaluate(*ch.q10, {});
        auto reference = c_.evaluator.evaluate(*ch.q10Reference, {});
        if (factor && reference && m_.temperature)
          q += ", which is " + M(latexNumber(g6(std::pow(*factor, (*m_.temperature - *reference) / 10.0)))) +
               " at the model temperature";
        d_.para(q + ".");
      } else if (!ch.gates.empty()) {
        d_.para("No Q10 is given: the kinetics apply as written at the model temperature.");
      }
    }
  }

  void pumps() {
    if (pumps_.empty())
      return;
    d_.heading(2, "Pumps and exchangers");
    for (const auto &[name, entry] : pumps_) {
      const PumpDecl &pump = *entry.first;
      d_.heading(3, std::string(pump.exchanger ? "Exchanger " : "Pump ") + Code(name));
      if (!pump.doc.empty())
        d_.para(pump.doc);
      std::vector<std::string> out, in;
      for (const StoichTerm &t : pump.cycle)
        (t.direction == Direction::Out ? out : in)
            .push_back(M(latexNumber(g6(t.count.value)) + "\\," + ionLatex(t.target, t.ion)));
      std::string s = "Each cycle moves ";
      if (!out.empty())
        s += joinAnd(out) + " out";
      if (!out.empty() && !in.empty())
        s += " and ";
      if (!in.empty())
        s += joinAnd(in) + " in";
      auto values = m_.pumps.find(&pump);
      int net = 0;
      if (values != m_.pumps.end() && values->second.chargeKnown) {
        net = values->second.netOutwardCharge;
        s += ": a net charge of " + M((net > 0 ? "+" : "") + std::to_string(net) + "\\,e") + " outward per cycle.";
      } else {
        s += ".";
      }
      d_.para(s);
      if (pump.activity) {
        d_.para("Its activity (the fraction of its maximal rate) is");
        d_.equations({{"a", mathOf(pump.activity)}});
      }
      bool current = false, turnover = false;
      for (const Site &site : entry.second) {
        current |= site.placement->densityKind == DensityKind::Current;
        turnover |= site.placement->densityKind == DensityKind::Turnover;
      }
      if (current)
        d_.para("With a maximal current density " + M("\\bar{I}") + " its current density is " +
                M(std::string("I = ") + (net < 0 ? "-" : "") + "\\bar{I}\\, a") +
                " (the sign of the net charge moved per cycle fixes the direction).");
      if (turnover)
        d_.para("With a maximal turnover density " + M("\\bar{\\rho}") + " (cycles per area and time) its current "
                "density is " + M("I = " + std::to_string(net) + "\\, F \\bar{\\rho}\\, a") + ".");
      std::vector<std::vector<std::string>> rows;
      for (const Site &site : entry.second)
        rows.push_back({Code(site.compartment->decl->name), densityCell(*site.placement)});
      d_.table({"Compartment", "Density"}, rows, "lr");
    }
  }

  void functionsAndConstants() {
    if (functions_.empty() && constants_.empty())
      return;
    d_.heading(2, "Functions and constants");
    // Definitions may use further functions: collect to a fixed point before printing.
    std::vector<std::pair<std::string, std::string>> eqs;
    size_t seen = 0;
    while (functions_.size() + constants_.size() != seen) {
      seen = functions_.size() + constants_.size();
      for (const auto &[name, fn] : std::map<std::string, const FnDecl *>(functions_))
        collect(fn->body.get());
      for (const auto &[name, k] : std::map<std::string, const ConstDecl *>(constants_))
        collect(k->value.get());
    }
    std::vector<std::string> docs;
    for (const auto &[name, fn] : functions_) {
      std::string params;
      for (size_t i = 0; i < fn->params.size(); ++i)
        params += (i ? ",\\ " : "") + mathName(fn->params[i].name);
      eqs.push_back({"\\operatorname{" + escapeMathName(name) + "}" + paren(params), render(*fn->body).text});
      if (!fn->doc.empty())
        docs.push_back(Code(name) + ": " + fn->doc);
    }
    for (const auto &[name, k] : constants_) {
      eqs.push_back({mathName(name), k->value ? render(*k->value).text : "?"});
      if (!k->doc.empty())
        docs.push_back(Code(name) + ": " + k->doc);
    }
    d_.para("The kinetics use these definitions:");
    d_.equations(eqs);
    d_.items(docs);
  }

  std::string window(const ExprPtr &from, const ExprPtr &to) {
    if (from && to)
      return " from " + M(mathOf(from)) + " to " + M(mathOf(to));
    if (from)
      return " from " + M(mathOf(from));
    if (to)
      return " until " + M(mathOf(to));
    return " for the whole run";
  }

  // Every declaration of one kind, in every module, in order.
  template <class Kind> std::vector<const Kind *> declarationsOf() const {
    std::vector<const Kind *> all;
    for (const auto &module : c_.program.modules)
      for (const DeclPtr &decl : module->decls)
        if (auto *d = dyn_cast<Kind>(decl.get()))
          all.push_back(d);
    return all;
  }

  void protocols() {
    std::vector<const ProtocolDecl *> all = declarationsOf<ProtocolDecl>();
    d_.heading(2, "Protocols and numerical integration");
    if (all.empty()) {
      d_.para("The specification declares no protocol.");
      return;
    }
    d_.para("Every simulation starts from each compartment's initial " + M("V") +
            " with every gate at its steady value there. Concentrations stay fixed during a run unless declared "
            "dynamic.");
    for (const ProtocolDecl *p : all) {
      d_.heading(3, "Protocol " + Code(p->name));
      if (!p->doc.empty())
        d_.para(p->doc);
      bool written = p->method != IntegrationMethod::Default;
      std::string method = written ? p->methodText : m_.junctions.empty() ? "exponential_euler" : "crank_nicolson";
      methodsUsed_.insert(method);
      bool adaptive = p->method == IntegrationMethod::DormandPrince || p->method == IntegrationMethod::Rosenbrock;
      std::string s = "Integration: " + methodInfo(method).description + " (" + Code(method) +
                      (written ? "" : ", the default") + "), ";
      std::string step = p->step ? M(mathOf(p->step)) : M("10\\,\\mu\\mathrm{s}") + " (default)";
      s += adaptive ? "first step " + step + ", relative tolerance " +
                          (p->tolerance ? M(mathOf(p->tolerance)) : M("10^{-8}") + " (default)") +
                          ", absolute tolerance " + M("10^{-10}")
                    : "time step " + step;
      s += "; duration " + (p->duration ? M(mathOf(p->duration)) : std::string("n/a")) + ".";
      d_.para(s);

      std::vector<std::string> stimuli;
      for (const Injection &inj : p->injections) {
        std::string into =
            " into " + Code(inj.compartment) + (inj.position ? " at " + M(mathOf(inj.position.at)) : std::string());
        switch (inj.shape) {
        case InjectionShape::Step:
          stimuli.push_back("A current step of " + M(mathOf(inj.amplitude)) + into + window(inj.from, inj.to) + ".");
          break;
        case InjectionShape::Ramp:
          stimuli.push_back("A current ramp from " + M(mathOf(inj.amplitude)) + " to " + M(mathOf(inj.amplitudeEnd)) +
                            into + window(inj.from, inj.to) + ".");
          break;
        case InjectionShape::Pulses:
          stimuli.push_back("Current pulses of " + M(mathOf(inj.amplitude)) + ", width " + M(mathOf(inj.width)) +
                            ", every " + M(mathOf(inj.period)) + "," + into + window(inj.from, inj.to) + ".");
          break;
        }
      }
      for (const Clamp &cl : p->clamps)
        stimuli.push_back("A voltage clamp of " + Code(cl.compartment) +
                          (cl.position ? ", " + M(mathOf(cl.position.at)) + " along it," : std::string()) + " at " +
                          M(mathOf(cl.level)) + window(cl.from, cl.to) + ".");
      for (const Synapse &sy : p->synapses) {
        std::string shape;
        switch (sy.shape) {
        case SynapseShape::SingleExponential:
          shape = "a single-exponential time course with decay time constant " + M(mathOf(sy.decay));
          break;
        case SynapseShape::DoubleExponential:
          shape = "a double-exponential time course (scaled to peak 1) with rise " + M(mathOf(sy.rise)) +
                  " and decay " + M(mathOf(sy.decay));
          break;
        case SynapseShape::Alpha:
          shape = "an alpha-function time course " + M("(t/t_p)\\,e^{1 - t/t_p}") + " peaking at " +
                  M("t_p = " + mathOf(sy.peak));
          break;
        }
        std::string times;
        if (!sy.times.empty()) {
          std::vector<std::string> ts;
          for (const ExprPtr &t : sy.times)
            ts.push_back(M(mathOf(t)));
          times = "events at " + joinAnd(ts);
        } else {
          times = "events every " + (sy.every ? M(mathOf(sy.every)) : std::string("n/a")) + window(sy.from, sy.to);
        }
        stimuli.push_back("A synaptic conductance of " + M(mathOf(sy.conductance)) + " on " + Code(sy.compartment) +
                          " with reversal potential " + M(mathOf(sy.reversal)) + ", " + shape + "; " + times + ".");
      }
      if (stimuli.empty())
        d_.para("No current is injected and no compartment is clamped.");
      else {
        d_.para("Stimuli (injected currents are positive into the cell; each adds to the others):");
        d_.items(stimuli);
      }
      if (!p->clamps.empty()) {
        std::string joined = m_.junctions.empty()
                                 ? std::string()
                                 : " plus the axial current that leaves it for its neighbours (in nA on a piece of "
                                   "a cable)";
        d_.para("Where clamp windows overlap, the earlier line wins. While clamped, " + M("V") +
                " follows the command and the clamp current is the membrane's ionic current at the command "
                "potential" +
                joined + " (outward positive); the capacitive transient at a command step is not included.");
      }
      std::vector<std::string> records;
      for (const RecordTarget &r : p->records)
        records.push_back(Code(r.path) + (r.position ? " at " + M(mathOf(r.position.at)) : std::string()));
      std::string rec = records.empty() ? "Recorded: the membrane potential of every compartment"
                                        : "Recorded: " + joinAnd(records);
      rec += p->every ? ", every " + M(mathOf(p->every)) + "."
                      : ", every " + (p->step ? M(mathOf(p->step)) : M("10\\,\\mu\\mathrm{s}")) +
                            " (by default, the step).";
      d_.para(rec);
    }
  }

  // What the spec's expectations check, with their sources, and how the measures they use are
  // taken, so that a reader can repeat the check by other means.
  void checks() {
    std::vector<const ExpectDecl *> all = declarationsOf<ExpectDecl>();
    if (all.empty())
      return;
    d_.heading(2, "Reference checks");
    d_.para("The specification states what the model must reproduce; " + Code("saltpan test") +
            " measures and judges each:");
    std::vector<std::string> items;
    std::set<std::string> measures;
    for (const ExpectDecl *e : all) {
      measures.insert(e->measure);
      items.push_back(Code(e->text) + (e->source.empty() ? "" : " (source: " + e->source + ")") + ".");
    }
    d_.items(items);
    std::vector<std::string> defined;
    for (const auto &[measure, definition] : measureDefinitions())
      if (measures.count(measure))
        defined.push_back(Code(measure) + ": " + definition);
    if (!defined.empty()) {
      d_.para("The measures are taken as follows:");
      d_.items(defined);
    }
  }

  static const std::vector<std::pair<std::string, std::string>> &measureDefinitions() {
    static const std::vector<std::pair<std::string, std::string>> table = {
        {"spike_count", "the number of upward crossings of the threshold (0 mV unless given) in the recorded trace."},
        {"firing_rate", "the spikes after the first over the time from the first spike to the last, a spike being an "
                        "upward crossing of the threshold (0 mV unless given), timed by linear interpolation between "
                        "recorded samples."},
        {"first_spike", "the time of the first upward crossing of the threshold (0 mV unless given), interpolated "
                        "linearly between recorded samples."},
        {"last_interval", "the time between the last two upward crossings of the threshold (0 mV unless given)."},
        {"conduction_velocity",
         "the distance along the tree between the centres of the pieces that hold the two places (as the model joins "
         "them), divided by the difference of the times at which the potential there first crosses the threshold "
         "(0 mV unless given) upward, each interpolated linearly between recorded samples."},
        {"rest", "the compartment's one stable steady state with every channel and pump, found as for " +
                     Code("saltpan rest") + "."},
        {"input_resistance", "the change of the steady potential per unit of current injected there at rest: the "
                             "inverse of the membrane's slope conductance times its area, or for a compartment of a "
                             "tree from the whole tree's Jacobian at the steady state."},
    };
    return table;
  }

  void software() {
    d_.heading(2, "Software");
    d_.para("The model was specified in the saltpan modelling language and checked (units, charge and physical "
            "plausibility) by saltpan " + std::string(SALTPAN_VERSION) + ".");
    d_.para("The exact model, this file and every module it uses, has the hash " + Code(c_.modelHash()) +
            " (SHA-256 over their canonical forms and the tool version; " + Code("saltpan hash FILE") + ").");
    std::vector<std::string> refs;
    for (const std::string &method : methodsUsed_)
      if (std::string r = methodInfo(method).reference; !r.empty())
        refs.push_back(r);
    refs.push_back("E. Tiesinga, P. J. Mohr, D. B. Newell and B. N. Taylor (2021). CODATA recommended values of the "
                   "fundamental physical constants: 2018. Reviews of Modern Physics 93:025010.");
    std::sort(refs.begin(), refs.end());
    d_.heading(3, "References");
    d_.items(refs);
    d_.para(std::string("Caution: ") + caution + ".");
  }
};

} // namespace

std::string latexExpr(const Expr &e) { return render(e).text; }

std::string latexUnit(const std::string &unitText) {
  if (unitText == "degC" || unitText == "\u00B0C")
    return "{}^{\\circ}\\mathrm{C}";
  if (unitText == "%") // a place along a cable; a bare % would start a TeX comment
    return "\\%";
  std::vector<std::pair<std::string, std::string>> factors; // word, exponent
  int sign = 1;
  size_t i = 0;
  while (i < unitText.size()) {
    char ch = unitText[i];
    if (ch == '/') {
      sign = -1;
      ++i;
      continue;
    }
    if (ch == '*') {
      sign = 1;
      ++i;
      continue;
    }
    if (unitText.compare(i, 2, "\u00B7") == 0) {
      sign = 1;
      i += 2;
      continue;
    }
    size_t j = i;
    while (j < unitText.size() && unitText[j] != '/' && unitText[j] != '*' && unitText[j] != '^' &&
           !std::isdigit(static_cast<unsigned char>(unitText[j])) && unitText.compare(j, 2, "\u00B7") != 0)
      ++j;
    std::string word = unitText.substr(i, j - i);
    std::string exponent;
    if (j < unitText.size() && unitText[j] == '^')
      ++j;
    while (j < unitText.size() && (std::isdigit(static_cast<unsigned char>(unitText[j])) || unitText[j] == '.' ||
                                   (unitText[j] == '-' && exponent.empty())))
      exponent += unitText[j++];
    if (exponent.empty())
      exponent = "1";
    if (sign < 0)
      exponent = exponent[0] == '-' ? exponent.substr(1) : "-" + exponent;
    factors.push_back({word, exponent});
    sign = 1;
    i = j == i ? i + 1 : j;
  }
  std::string out;
  for (size_t k = 0; k < factors.size(); ++k) {
    out += (k ? "\\," : "") + unitWord(factors[k].first);
    if (factors[k].second != "1")
      out += "^{" + factors[k].second + "}";
  }
  return "\\mathrm{" + out + "}";
}

std::string methodsText(Compilation &c, const MethodsOptions &options) { return Generator(c, options).run(); }

} // namespace saltpan
