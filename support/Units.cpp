// Units.cpp - the unit table, symbol lookup and readable dimension names.
#include "Units.h"

#include <cctype>
#include <cstdlib>
#include <utility>
#include <vector>

namespace saltpan {

Dimension Dimension::base(Base b, int power) {
  Dimension d;
  d.exps_[b] = power;
  return d;
}

bool Dimension::dimensionless() const {
  for (int e : exps_)
    if (e != 0)
      return false;
  return true;
}

Dimension Dimension::operator*(const Dimension &o) const {
  Dimension d;
  for (int i = 0; i < BaseCount; ++i)
    d.exps_[i] = exps_[i] + o.exps_[i];
  return d;
}

Dimension Dimension::operator/(const Dimension &o) const {
  Dimension d;
  for (int i = 0; i < BaseCount; ++i)
    d.exps_[i] = exps_[i] - o.exps_[i];
  return d;
}

Dimension Dimension::pow(int n) const {
  Dimension d;
  for (int i = 0; i < BaseCount; ++i)
    d.exps_[i] = exps_[i] * n;
  return d;
}

std::optional<Dimension> Dimension::sqrt() const {
  Dimension d;
  for (int i = 0; i < BaseCount; ++i) {
    if (exps_[i] % 2 != 0)
      return std::nullopt;
    d.exps_[i] = exps_[i] / 2;
  }
  return d;
}

Unit Unit::pow(int n) const {
  double s = 1.0;
  for (int i = 0; i < (n < 0 ? -n : n); ++i)
    s *= scale;
  return {dim.pow(n), n < 0 ? 1.0 / s : s};
}

namespace {
using B = Dimension::Base;
Dimension L(int p = 1) { return Dimension::base(B::Length, p); }
Dimension M(int p = 1) { return Dimension::base(B::Mass, p); }
Dimension T(int p = 1) { return Dimension::base(B::Time, p); }
Dimension I(int p = 1) { return Dimension::base(B::Current, p); }
Dimension K(int p = 1) { return Dimension::base(B::Temperature, p); }
Dimension N(int p = 1) { return Dimension::base(B::Amount, p); }
} // namespace

namespace dims {
Dimension voltage() { return M() * L(2) * T(-3) * I(-1); }
Dimension time() { return T(); }
Dimension rate() { return T(-1); }
Dimension length() { return L(); }
Dimension area() { return L(2); }
Dimension volume() { return L(3); }
Dimension concentration() { return N() * L(-3); }
Dimension temperature() { return K(); }
Dimension current() { return I(); }
Dimension currentDensity() { return I() * L(-2); }
Dimension conductanceDensity() { return I() / voltage() * L(-2); }
Dimension specificCapacitance() { return I() * T() / voltage() * L(-2); }
Dimension permeability() { return L() * T(-1); }
Dimension turnoverDensity() { return N() * L(-2) * T(-1); }
Dimension charge() { return I() * T(); }
} // namespace dims

namespace {

struct Symbol {
  const char *name;
  Unit unit;
  bool prefixable;
};

const std::vector<Symbol> &symbols() {
  static const std::vector<Symbol> table = {
      {"m", {L(), 1}, true},
      {"g", {M(), 1e-3}, true},
      {"s", {T(), 1}, true},
      {"A", {I(), 1}, true},
      {"K", {K(), 1}, true},
      {"mol", {N(), 1}, true},
      {"V", {dims::voltage(), 1}, true},
      {"S", {I() / dims::voltage(), 1}, true},
      {"F", {I() * T() / dims::voltage(), 1}, true},
      {"C", {I() * T(), 1}, true},
      {"J", {M() * L(2) * T(-2), 1}, true},
      {"W", {M() * L(2) * T(-3), 1}, true},
      {"N", {M() * L() * T(-2), 1}, true},
      {"Pa", {M() * L(-1) * T(-2), 1}, true},
      {"Hz", {T(-1), 1}, true},
      {"ohm", {dims::voltage() / I(), 1}, true},
      {"\u03A9", {dims::voltage() / I(), 1}, true},
      {"\u2126", {dims::voltage() / I(), 1}, true},
      {"L", {L(3), 1e-3}, true},
      {"l", {L(3), 1e-3}, true},
      {"M", {dims::concentration(), 1e3}, true},
      {"min", {T(), 60}, false},
  };
  return table;
}

const std::vector<std::pair<const char *, double>> &prefixes() {
  static const std::vector<std::pair<const char *, double>> table = {
      {"f", 1e-15}, {"p", 1e-12}, {"n", 1e-9}, {"u", 1e-6}, {"\u00B5", 1e-6}, {"\u03BC", 1e-6},
      {"m", 1e-3},  {"c", 1e-2},  {"d", 1e-1}, {"k", 1e3},  {"M", 1e6},       {"G", 1e9},
  };
  return table;
}

std::optional<Unit> lookupPlain(std::string_view s) {
  for (const Symbol &sym : symbols())
    if (s == sym.name)
      return sym.unit;
  for (auto &[prefix, factor] : prefixes()) {
    std::string_view p(prefix);
    if (s.size() > p.size() && s.substr(0, p.size()) == p) {
      std::string_view rest = s.substr(p.size());
      for (const Symbol &sym : symbols())
        if (sym.prefixable && rest == sym.name)
          return Unit{sym.unit.dim, sym.unit.scale * factor};
    }
  }
  return std::nullopt;
}

} // namespace

std::optional<UnitLookup> lookupUnitSymbol(std::string_view symbol) {
  if (symbol == "degC" || symbol == "\u00B0C")
    return UnitLookup{{K(), 1}, true};
  if (auto u = lookupPlain(symbol))
    return UnitLookup{*u, false};
  // A trailing integer is an exponent: cm2, um3.
  size_t digits = symbol.size();
  while (digits > 0 && std::isdigit(static_cast<unsigned char>(symbol[digits - 1])))
    --digits;
  if (digits == 0 || digits == symbol.size())
    return std::nullopt;
  std::string_view head = symbol.substr(0, digits);
  int power = std::atoi(std::string(symbol.substr(digits)).c_str());
  if (power < 1 || power > 9)
    return std::nullopt;
  if (auto u = lookupPlain(head))
    return UnitLookup{u->pow(power), false};
  return std::nullopt;
}

namespace {

std::string superscript(int n) {
  static const char *digits[] = {"\u2070", "\u00B9", "\u00B2", "\u00B3", "\u2074",
                                 "\u2075", "\u2076", "\u2077", "\u2078", "\u2079"};
  std::string out = n < 0 ? "\u207B" : "";
  std::string plain = std::to_string(n < 0 ? -n : n);
  for (char c : plain)
    out += digits[c - '0'];
  return out;
}

struct NamedDimension {
  Dimension dim;
  const char *description;
};

const std::vector<NamedDimension> &namedDimensions() {
  static const std::vector<NamedDimension> table = {
      {Dimension::none(), "a dimensionless number"},
      {dims::voltage(), "a voltage (mV)"},
      {dims::time(), "a time (ms)"},
      {dims::rate(), "a rate (1/ms)"},
      {dims::length(), "a length (um)"},
      {dims::area(), "an area (um2)"},
      {dims::volume(), "a volume (um3)"},
      {dims::concentration(), "a concentration (mM)"},
      {Dimension::base(Dimension::Amount), "an amount of substance (mol)"},
      {dims::temperature(), "a temperature (K)"},
      {dims::current(), "a current (nA)"},
      {dims::currentDensity(), "a current density (uA/cm2)"},
      {I() / dims::voltage(), "a conductance (nS)"},
      {dims::conductanceDensity(), "a conductance density (mS/cm2)"},
      {I() * T() / dims::voltage(), "a capacitance (pF)"},
      {dims::specificCapacitance(), "a specific capacitance (uF/cm2)"},
      {dims::charge(), "a charge (C)"},
      {dims::permeability(), "a permeability (cm/s)"},
      {dims::turnoverDensity(), "a turnover density (mol/m2/s)"},
      {dims::voltage() / I(), "a resistance (Mohm)"},
      {dims::voltage() / I() * L(2), "a specific membrane resistance (ohm*cm2)"},
      {dims::voltage() / I() * L(), "a resistivity (ohm*cm)"},
      {dims::voltage() / T(), "a rate of voltage change (mV/ms)"},
      {M() * L(2) * T(-2), "an energy (J)"},
  };
  return table;
}

} // namespace

std::string formatDimension(const Dimension &d) {
  // Re-express mass through the volt (kg = V·A·s³·m⁻²), which modellers read more easily.
  int v = d[B::Mass];
  int a = d[B::Current] + v;
  int s = d[B::Time] + 3 * v;
  int m = d[B::Length] - 2 * v;
  std::vector<std::pair<const char *, int>> parts = {
      {"V", v}, {"A", a}, {"s", s}, {"m", m}, {"K", d[B::Temperature]}, {"mol", d[B::Amount]}};
  std::string out;
  for (auto &[name, power] : parts) {
    if (power == 0)
      continue;
    if (!out.empty())
      out += "\u00B7";
    out += name;
    if (power != 1)
      out += superscript(power);
  }
  return out.empty() ? "1" : out;
}

std::string describeDimension(const Dimension &d) {
  for (const NamedDimension &n : namedDimensions())
    if (n.dim == d)
      return n.description;
  return "a quantity in " + formatDimension(d);
}

} // namespace saltpan
