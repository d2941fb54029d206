// SweepTable.h - the results of a sweep (or of one shard of it) and their CSV and JSON forms.
//
// Values are held in the columns' display units (mS/cm2, mV, Hz, ...), exactly as written,
// so a table read back from JSON (saltpan merge) writes the same bytes again.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

namespace saltpan::sweep {

struct Column {
  std::string name; // "axon.SquidSodium1952.density", "step10: spike_count(axon.V)"
  std::string unit; // "mS/cm2", "" for plain numbers
  double scale = 1; // SI value * scale = the value shown
};

struct PointResult {
  bool done = false;
  std::vector<double> measures; // display units; NaN when the measure has no value here
  std::string failure;          // why the point's run failed; empty when it did not
};

struct Table {
  std::string sweep;        // the sweep's name
  std::string version;      // saltpan's version
  std::string modelHash;    // saltpan hash of the spec (the sweep's definition included)
  std::string sweepHash;    // everything that decides the numbers: model, points, engine
  std::string engine;       // "batched, 8 lanes (AVX-512)", "scalar", "interpreter"
  std::string design;       // "grid", "latin_hypercube", "uniform"
  std::vector<Column> parameters, measures;
  uint64_t totalPoints = 0; // of the whole sweep
  int shardIndex = 0, shardCount = 1;
  uint64_t first = 0;       // global index of this table's first point
  std::vector<std::vector<double>> parameterValues; // per point, display units
  std::vector<PointResult> results;                 // per point
};

/// The points [first, first + count) that shard `index` of `count` holds: contiguous blocks
/// of near-equal size, in order.
void shardRange(uint64_t total, int index, int count, uint64_t &first, uint64_t &size);

/// One row per point: point index, parameters, measures (each "name (unit)"), failure.
std::string toCsv(const Table &t);
/// "" when `path` names a table output (.csv, or .json: isJsonPath), else the usage error for
/// `-o` (saltpan sweep, saltpan merge and a built executable's sweep mode).
std::string tableOutputProblem(const std::string &path);
/// The same with provenance; a shard's JSON also says which shard it is.
std::string toJson(const Table &t);
/// Reads a table written by toJson; returns false with `error` on anything unexpected.
bool fromJson(const std::string &text, Table &t, std::string &error);

/// How the two tables' provenance or columns (names, units, scales, in order) differ, or ""
/// when they could be parts of one sweep.
std::string differingColumns(const Table &a, const Table &b);

/// Shortest text that reads back as the same double ("0.1", "1e-05").
std::string exactNumber(double v);

} // namespace saltpan::sweep
