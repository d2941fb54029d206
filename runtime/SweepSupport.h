// SweepSupport.h - what `saltpan sweep` and the `sweep` mode of a built executable share, so
// that both lay out the same table, hash it the same way, keep the same journal and write the
// same bytes: `saltpan merge` then takes shards from either.
#pragma once
#include "IR.h"
#include "Shard.h"
#include "Simulate.h"
#include "SweepPoints.h"
#include "SweepRun.h"
#include "SweepTable.h"

#include <string>
#include <vector>

namespace saltpan {
class OptionParser;
}

namespace saltpan::sweep {

/// How to run a sweep, as given on the command line of `saltpan sweep` or of a built
/// executable's `sweep` mode.
struct RunArguments {
  std::string sweep, shard, progress = "auto";
  int threads = 0; // 0: every core
  size_t checkpoint = 256;
  bool restart = false;
};

/// Declares --sweep, --shard, --threads, --checkpoint, --restart and --progress, read into
/// `into` (numbers and the progress style checked as they are read).
void addRunOptions(OptionParser &parser, RunArguments &into);

/// Fills the shard's part of `t` from `points` (SI, one value per parameter column):
/// totalPoints, the shard, first, the parameter values as shown and empty results. The
/// columns must be set.
void setUpTable(Table &t, const std::vector<Point> &points, const ShardChoice &shard);
/// What decides the numbers (version, model, sweep, engine, point count), as t.sweepHash.
std::string sweepHash(const Table &t);
/// The journal a table's run may resume: its sweep hash and shard.
std::string journalFingerprint(const Table &t);
/// "auto", "bar", "log" or "none"; false for anything else.
bool parseProgress(const std::string &text, Progress &progress);

/// Makes `m` record only `paths` (probe names, each once, in order): fewer columns, and
/// often the state-only kernel.
void recordOnly(ir::Model &m, const std::vector<std::string> &paths);
/// Why a point's run of protocol `protocol` failed, as a table's failure column says it.
std::string failureText(const std::string &protocol, const SimulationFailure &f);
/// Appends `text` to a point's failures.
void addFailure(PointResult &r, const std::string &text);

/// Writes the finished table to each output (.json as JSON, anything else as CSV), or CSV to
/// standard output when there is none, then removes `journal` (may be null). False with
/// `error` when an output cannot be written (the journal is kept).
bool writeOutputs(const Table &t, const std::vector<std::string> &outputs, Journal *journal, std::string &error);
/// Whether an error of runSweep is a journal that could not be written (exit 73) rather than
/// one that cannot be used (bad usage).
bool cannotWriteJournal(const std::string &error);
/// "swept NAME: N points (shard ...), K failed; ENGINE, T threads, S s (R points/s)".
std::string summary(const Table &t, const RunReport &report, int threads);

} // namespace saltpan::sweep
