// DisplayUnits.h - the one table of the units values are shown in: recorded quantities,
// expectations, sweep columns, `saltpan show`, `saltpan methods` and `--emit values` (SI).
#pragma once
#include "Analyze.h"
#include "Units.h"

#include <string>
#include <vector>

namespace saltpan {

/// The unit a value is shown in, and the factor from SI to it.
struct DisplayUnit {
  std::string name; // "mV", "ms", "Hz", ... ("" for plain numbers)
  double scale = 1;
};

/// One row of the table: a dimension, the unit modellers read it in, and its SI spelling.
struct DisplayUnitRow {
  Dimension dim;
  const char *unit;
  double scale; // SI -> unit
  const char *si;
  // Expectations and sweep columns show it in SI instead (formatDimension): a turnover
  // density, as their tables, and the sweep hashes and journals built on them, always have.
  bool measuredInSi = false;
};
const std::vector<DisplayUnitRow> &displayUnits();

/// The unit of a recorded quantity, an expectation's value or a sweep column of dimension `d`:
/// its row's, "" for a plain number, else coherent SI (formatDimension).
DisplayUnit displayUnit(const Dimension &d);
/// The dimension whose row shows values in `unit` (a probe's unit back to its dimension);
/// Dimension::none() when no row does.
Dimension unitDimension(const std::string &unit);

/// The dimension of a membrane density of kind `k` (none for Unknown).
Dimension densityDimension(DensityKind k);
/// The unit `saltpan show` and `saltpan methods` give a density of kind `k` in ("" and 1 for Unknown).
DisplayUnit densityUnit(DensityKind k);
/// The SI spelling of a density of kind `k` ("S/m2"; "" for Unknown), as `--emit values` shows it.
const char *densitySiUnit(DensityKind k);

} // namespace saltpan
