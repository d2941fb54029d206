// DisplayUnits.cpp - the table of display units and its look-ups.
#include "DisplayUnits.h"

namespace saltpan {

const std::vector<DisplayUnitRow> &displayUnits() {
  static const std::vector<DisplayUnitRow> table = {
      {dims::voltage(), "mV", 1e3, "V"},
      {dims::time(), "ms", 1e3, "s"},
      {dims::rate(), "Hz", 1, "Hz"},
      {dims::area(), "um2", 1e12, "m2"},
      {dims::voltage() / dims::current(), "Mohm", 1e-6, "ohm"},
      {dims::currentDensity(), "uA/cm2", 100, "A/m2"},
      {dims::conductanceDensity(), "mS/cm2", 0.1, "S/m2"},
      {dims::concentration(), "mM", 1, "mol/m3"},
      {dims::specificCapacitance(), "uF/cm2", 100, "F/m2"},
      {dims::permeability(), "cm/s", 100, "m/s"},
      {dims::turnoverDensity(), "mol/cm2/s", 1e-4, "mol/m2/s", true},
  };
  return table;
}

namespace {

const DisplayUnitRow *rowOf(const Dimension &d) {
  for (const DisplayUnitRow &r : displayUnits())
    if (r.dim == d)
      return &r;
  return nullptr;
}

} // namespace

DisplayUnit displayUnit(const Dimension &d) {
  if (const DisplayUnitRow *r = rowOf(d); r && !r->measuredInSi)
    return {r->unit, r->scale};
  if (d == Dimension::none())
    return {"", 1};
  return {formatDimension(d), 1}; // coherent SI
}

Dimension unitDimension(const std::string &unit) {
  for (const DisplayUnitRow &r : displayUnits())
    if (unit == r.unit)
      return r.dim;
  return Dimension::none();
}

Dimension densityDimension(DensityKind k) {
  switch (k) {
  case DensityKind::Conductance: return dims::conductanceDensity();
  case DensityKind::Permeability: return dims::permeability();
  case DensityKind::Current: return dims::currentDensity();
  case DensityKind::Turnover: return dims::turnoverDensity();
  case DensityKind::Unknown: break;
  }
  return Dimension::none();
}

DisplayUnit densityUnit(DensityKind k) {
  const DisplayUnitRow *r = k == DensityKind::Unknown ? nullptr : rowOf(densityDimension(k));
  return r ? DisplayUnit{r->unit, r->scale} : DisplayUnit{"", 1};
}

const char *densitySiUnit(DensityKind k) {
  const DisplayUnitRow *r = k == DensityKind::Unknown ? nullptr : rowOf(densityDimension(k));
  return r ? r->si : "";
}

} // namespace saltpan
