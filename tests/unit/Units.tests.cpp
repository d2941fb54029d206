// Units.tests.cpp - the unit table: symbols, prefixes, exponents, degC, dimension names.
#include "TestSupport.h"
#include "Units.h"

using namespace saltpan;
using Catch::Matchers::WithinRel;

namespace {

// Looks a symbol up and requires that it is known and not a Celsius temperature.
Unit plain(const char *symbol) {
  INFO("symbol " << symbol);
  auto u = lookupUnitSymbol(symbol);
  REQUIRE(u.has_value());
  CHECK_FALSE(u->celsius);
  return u->unit;
}

} // namespace

TEST_CASE("SI prefixes scale the base symbols", "[units]") {
  // SI prefix factors: common practice (BIPM SI Brochure, 9th edition, table 7).
  CHECK(plain("mV").dim == dims::voltage());
  CHECK_THAT(plain("mV").scale, WithinRel(1e-3, 1e-15));
  CHECK(plain("ms").dim == dims::time());
  CHECK_THAT(plain("ms").scale, WithinRel(1e-3, 1e-15));
  CHECK_THAT(plain("ns").scale, WithinRel(1e-9, 1e-15));
  CHECK_THAT(plain("pF").scale, WithinRel(1e-12, 1e-15));
  CHECK_THAT(plain("fA").scale, WithinRel(1e-15, 1e-15));
  CHECK_THAT(plain("kHz").scale, WithinRel(1e3, 1e-15));
  CHECK_THAT(plain("GHz").scale, WithinRel(1e9, 1e-15));
  CHECK_THAT(plain("Mohm").scale, WithinRel(1e6, 1e-15));
  CHECK(plain("Mohm").dim == dims::voltage() / dims::current());
  CHECK_THAT(plain("dm").scale, WithinRel(0.1, 1e-15));
  // The gram is 1e-3 of the coherent kilogram, so "kg" has scale 1.
  CHECK_THAT(plain("kg").scale, WithinRel(1.0, 1e-15));
  CHECK(plain("kg").dim == Dimension::base(Dimension::Mass));
}

TEST_CASE("mS is a millisiemens, a conductance", "[units]") {
  Unit u = plain("mS");
  CHECK(u.dim == dims::current() / dims::voltage());
  CHECK_THAT(u.scale, WithinRel(1e-3, 1e-15));
  CHECK(plain("S").dim == u.dim);
}

TEST_CASE("a trailing digit is an exponent: cm2, um3", "[units]") {
  Unit cm2 = plain("cm2");
  CHECK(cm2.dim == dims::area());
  CHECK_THAT(cm2.scale, WithinRel(1e-4, 1e-14));
  Unit um3 = plain("um3");
  CHECK(um3.dim == dims::volume());
  CHECK_THAT(um3.scale, WithinRel(1e-18, 1e-14));
  CHECK(plain("m2").dim == dims::area());
}

TEST_CASE("exponents outside 1..9 and bare digits are not units", "[units]") {
  CHECK_FALSE(lookupUnitSymbol("cm0"));
  CHECK_FALSE(lookupUnitSymbol("cm10"));
  CHECK_FALSE(lookupUnitSymbol("2"));
  CHECK_FALSE(lookupUnitSymbol("cmx2"));
}

TEST_CASE("cm^2 written through the parser is an area of 1e-4 m2", "[units]") {
  auto c = testing::compile("const a: m^2 = 1 cm^2\n"
                            "const b: m2 = 3 cm2\n"
                            "const g: mS/cm^2 = 36 mS/cm^2\n");
  CHECK_THAT(testing::constantValue(*c, "a"), WithinRel(1e-4, 1e-14));
  CHECK_THAT(testing::constantValue(*c, "b"), WithinRel(3e-4, 1e-14));
  // 36 mS/cm2 = 360 S/m2 (1 mS/cm2 = 10 S/m2): common practice.
  CHECK_THAT(testing::constantValue(*c, "g"), WithinRel(360.0, 1e-14));
}

TEST_CASE("molar units: M is mol/L, mM is the coherent mol/m3", "[units]") {
  // 1 M = 1 mol/L = 1000 mol/m3: common practice.
  Unit M = plain("M");
  CHECK(M.dim == dims::concentration());
  CHECK_THAT(M.scale, WithinRel(1e3, 1e-15));
  CHECK(plain("mM").dim == dims::concentration());
  CHECK_THAT(plain("mM").scale, WithinRel(1.0, 1e-15));
  Unit uM = plain("uM");
  CHECK(uM.dim == dims::concentration());
  CHECK_THAT(uM.scale, WithinRel(1e-3, 1e-15));
  CHECK_THAT(plain("nM").scale, WithinRel(1e-6, 1e-15));
  // mol/L written out equals M.
  Unit molPerL = plain("mol") / plain("L");
  CHECK(molPerL.dim == M.dim);
  CHECK_THAT(molPerL.scale, WithinRel(M.scale, 1e-15));
  CHECK_THAT(plain("mmol").scale, WithinRel(1e-3, 1e-15));
}

TEST_CASE("micro is written u, U+00B5 (micro sign) or U+03BC (Greek mu)", "[units]") {
  for (const char *symbol : {"um", "\u00B5m", "\u03BCm"}) {
    INFO(symbol);
    Unit u = plain(symbol);
    CHECK(u.dim == dims::length());
    CHECK_THAT(u.scale, WithinRel(1e-6, 1e-15));
  }
  CHECK_THAT(plain("\u00B5F").scale, WithinRel(1e-6, 1e-15));
  CHECK_THAT(plain("\u03BCM").scale, WithinRel(1e-3, 1e-15));
  CHECK_THAT(plain("\u00B5m2").scale, WithinRel(1e-12, 1e-14));
}

TEST_CASE("ohm is spelled ohm, U+03A9 or U+2126", "[units]") {
  for (const char *symbol : {"ohm", "\u03A9", "\u2126", "k\u03A9"}) {
    INFO(symbol);
    CHECK(plain(symbol).dim == dims::voltage() / dims::current());
  }
}

TEST_CASE("degC and the degree sign are flagged celsius", "[units]") {
  for (const char *symbol : {"degC", "\u00B0C"}) {
    INFO(symbol);
    auto u = lookupUnitSymbol(symbol);
    REQUIRE(u);
    CHECK(u->celsius);
    CHECK(u->unit.dim == dims::temperature());
  }
  auto kelvin = lookupUnitSymbol("K");
  REQUIRE(kelvin);
  CHECK_FALSE(kelvin->celsius);
  CHECK(kelvin->unit.dim == dims::temperature());
  // A prefixed or raised Celsius is meaningless.
  CHECK_FALSE(lookupUnitSymbol("mdegC"));
  CHECK_FALSE(lookupUnitSymbol("degC2"));
}

TEST_CASE("unknown symbols are not units", "[units]") {
  for (const char *symbol : {"", "foo", "mX", "mmin", "kmin", "xV", "mv", "Ms2x", "\u00B5", "u"}) {
    INFO("symbol '" << symbol << "'");
    CHECK_FALSE(lookupUnitSymbol(symbol));
  }
  // min is a unit but takes no prefix.
  REQUIRE(lookupUnitSymbol("min"));
  CHECK_THAT(lookupUnitSymbol("min")->unit.scale, WithinRel(60.0, 1e-15));
}

TEST_CASE("unit arithmetic multiplies dimensions and scales", "[units]") {
  Unit perMs = Unit{} / plain("ms");
  CHECK(perMs.dim == dims::rate());
  CHECK_THAT(perMs.scale, WithinRel(1e3, 1e-15));
  Unit cm = plain("cm");
  CHECK(cm.pow(2).dim == dims::area());
  CHECK_THAT(cm.pow(-2).scale, WithinRel(1e4, 1e-14));
  CHECK(cm.pow(0).dim.dimensionless());
  CHECK(dims::area().sqrt() == dims::length());
  CHECK_FALSE(dims::volume().sqrt());
}

TEST_CASE("describeDimension names common dimensions", "[units]") {
  CHECK(describeDimension(Dimension::none()) == "a dimensionless number");
  CHECK(describeDimension(dims::voltage()) == "a voltage (mV)");
  CHECK(describeDimension(dims::time()) == "a time (ms)");
  CHECK(describeDimension(dims::rate()) == "a rate (1/ms)");
  CHECK(describeDimension(dims::concentration()) == "a concentration (mM)");
  CHECK(describeDimension(dims::conductanceDensity()) == "a conductance density (mS/cm2)");
  CHECK(describeDimension(dims::specificCapacitance()) == "a specific capacitance (uF/cm2)");
  CHECK(describeDimension(dims::permeability()) == "a permeability (cm/s)");
  CHECK(describeDimension(dims::temperature()) == "a temperature (K)");
  CHECK(describeDimension(dims::voltage() / dims::time()) == "a rate of voltage change (mV/ms)");
  // Without a name: the SI form.
  CHECK(describeDimension(dims::area().pow(2)) == "a quantity in m\u2074");
  CHECK(describeDimension(dims::voltage() * dims::time()) == "a quantity in V\u00B7s");
}

TEST_CASE("formatDimension writes SI through V, A, s, m, K, mol", "[units]") {
  CHECK(formatDimension(Dimension::none()) == "1");
  CHECK(formatDimension(dims::voltage()) == "V");
  CHECK(formatDimension(dims::rate()) == "s\u207B\u00B9");
  CHECK(formatDimension(dims::voltage() / dims::time()) == "V\u00B7s\u207B\u00B9");
  CHECK(formatDimension(dims::volume() / Dimension::base(Dimension::Amount)) == "m\u00B3\u00B7mol\u207B\u00B9");
  CHECK(formatDimension(dims::concentration()) == "m\u207B\u00B3\u00B7mol");
  // S/m2 = A/(V m2).
  CHECK(formatDimension(dims::conductanceDensity()) == "V\u207B\u00B9\u00B7A\u00B7m\u207B\u00B2");
  // kg = V A s3 m-2 once mass is written through the volt.
  CHECK(formatDimension(Dimension::base(Dimension::Mass)) == "V\u00B7A\u00B7s\u00B3\u00B7m\u207B\u00B2");
  CHECK(formatDimension(dims::temperature().pow(-1)) == "K\u207B\u00B9");
  CHECK(formatDimension(dims::length().pow(12)) == "m\u00B9\u00B2");
}
