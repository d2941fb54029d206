// DisplayUnits.tests.cpp - the table of display units: each row's unit and SI spelling mean
// what they say, and the look-ups of recorded quantities, expectations and densities read it.
#include "DisplayUnits.h"
#include "RunSettings.h"

#include <catch2/catch.hpp>

#include <cmath>

using namespace saltpan;

TEST_CASE("every row's unit is its dimension at its scale, and its SI spelling is coherent SI", "[units]") {
  for (const DisplayUnitRow &r : displayUnits()) {
    INFO(r.unit);
    auto shown = parseQuantity(std::string("1 ") + r.unit);
    REQUIRE(shown);
    CHECK(shown->second == r.dim);
    CHECK(shown->first * r.scale == Approx(1).epsilon(1e-12));
    auto si = parseQuantity(std::string("1 ") + r.si);
    REQUIRE(si);
    CHECK(si->second == r.dim);
    CHECK(si->first == Approx(1).epsilon(1e-12));
    int rows = 0;
    for (const DisplayUnitRow &other : displayUnits())
      rows += other.dim == r.dim;
    CHECK(rows == 1);
  }
}

TEST_CASE("recorded quantities and expectations are shown in their row's unit", "[units]") {
  DisplayUnit mV = displayUnit(dims::voltage());
  CHECK(mV.name == "mV");
  CHECK(mV.scale == 1e3);
  CHECK(displayUnit(dims::currentDensity()).name == "uA/cm2");
  CHECK(displayUnit(dims::conductanceDensity()).scale == 0.1);
  CHECK(displayUnit(dims::concentration()).name == "mM");
  CHECK(displayUnit(dims::rate()).name == "Hz");
  CHECK(displayUnit(Dimension::none()).name.empty());
  // Without a row, and for a turnover density: coherent SI at scale 1.
  CHECK(displayUnit(dims::charge()).name == formatDimension(dims::charge()));
  CHECK(displayUnit(dims::turnoverDensity()).name == formatDimension(dims::turnoverDensity()));
  CHECK(displayUnit(dims::turnoverDensity()).scale == 1);
}

TEST_CASE("a probe's unit leads back to its dimension", "[units]") {
  for (const DisplayUnitRow &r : displayUnits())
    CHECK(unitDimension(r.unit) == r.dim);
  CHECK(unitDimension("nS") == Dimension::none()); // a total conductance: scaled by the area
  CHECK(unitDimension("") == Dimension::none());
}

TEST_CASE("densities in show and methods, and in SI for --emit values", "[units]") {
  CHECK(densityUnit(DensityKind::Conductance).name == "mS/cm2");
  CHECK(densityUnit(DensityKind::Permeability).scale == 100);
  CHECK(densityUnit(DensityKind::Current).name == "uA/cm2");
  CHECK(densityUnit(DensityKind::Turnover).name == "mol/cm2/s");
  CHECK(densityUnit(DensityKind::Turnover).scale == 1e-4);
  CHECK(densityUnit(DensityKind::Unknown).name.empty());
  CHECK(densityUnit(DensityKind::Unknown).scale == 1);
  CHECK(std::string(densitySiUnit(DensityKind::Conductance)) == "S/m2");
  CHECK(std::string(densitySiUnit(DensityKind::Turnover)) == "mol/m2/s");
  CHECK(std::string(densitySiUnit(DensityKind::Unknown)).empty());
  for (DensityKind k : {DensityKind::Conductance, DensityKind::Permeability, DensityKind::Current})
    CHECK(densityUnit(k).name == displayUnit(densityDimension(k)).name);
}
