// Units.h - dimensions and units as plain values (no AST).
//
// Every quantity is stored in one coherent SI system (V, s, m, mol/m^3 = mM, S/m^2, ...);
// a Unit's scale converts a written number to that system once, at parse time.
#pragma once
#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace saltpan {

/// Exponents over the SI base dimensions used in membrane models.
class Dimension {
public:
  enum Base { Length, Mass, Time, Current, Temperature, Amount, BaseCount };

  Dimension() = default;
  static Dimension base(Base b, int power = 1);
  static Dimension none() { return {}; }

  int operator[](Base b) const { return exps_[b]; }
  bool dimensionless() const;
  bool operator==(const Dimension &o) const = default;
  Dimension operator*(const Dimension &o) const;
  Dimension operator/(const Dimension &o) const;
  Dimension pow(int n) const;
  /// Halves every exponent; nullopt if one is odd (sqrt of m^3, say).
  std::optional<Dimension> sqrt() const;

private:
  std::array<int, BaseCount> exps_{};
};

/// A unit: a dimension and the factor that turns a number in it into coherent SI.
struct Unit {
  Dimension dim;
  double scale = 1.0;
  Unit operator*(const Unit &o) const { return {dim * o.dim, scale * o.scale}; }
  Unit operator/(const Unit &o) const { return {dim / o.dim, scale / o.scale}; }
  Unit pow(int n) const;
};

namespace dims {
Dimension voltage();
Dimension time();
Dimension rate();
Dimension length();
Dimension area();
Dimension volume();
Dimension concentration();
Dimension temperature();
Dimension current();
Dimension currentDensity();
Dimension conductanceDensity();
Dimension specificCapacitance();
Dimension permeability();
Dimension turnoverDensity();
Dimension charge();
} // namespace dims

/// Looks up one unit symbol such as "mS", "cm2", "uM", "µm" (a trailing digit is an
/// exponent). "degC" and "°C" are reported through `celsius` because they are
/// absolute temperatures with an offset, not plain scale factors.
struct UnitLookup {
  Unit unit;
  bool celsius = false;
};
std::optional<UnitLookup> lookupUnitSymbol(std::string_view symbol);

/// Plain-English description with a typical unit: "a voltage (mV)", "a time (ms)";
/// for dimensions without a name, the SI form such as "a quantity in V·s⁻¹".
std::string describeDimension(const Dimension &d);
/// SI form using V, A, s, m, K, mol: "V·s⁻¹", "m³·mol⁻¹", "1".
std::string formatDimension(const Dimension &d);

} // namespace saltpan
