// SweepRun.h - runs every unfinished point of a sweep table on all cores, checkpointing.
//
// Points are handed out in batches (a batch is what one call of the evaluator computes: the
// lanes of one lockstep run, or a few scalar runs). Finished points are appended to a
// journal in chunks, each one line written with one write() and flushed to disk, so a sweep
// killed at any moment loses at most the chunk in progress; started again with the same
// journal it recomputes only the points the journal lacks. A journal written for anything
// else (another spec, sweep, shard or engine) is refused, never mixed in.
#pragma once
#include "SweepTable.h"

#include <functional>
#include <string>
#include <vector>

namespace saltpan::sweep {

/// Computes the results of the table's points `local` (indices into table.results) into
/// `out` (same order). Called from several threads at once, `worker` in [0, threads).
using Evaluate = std::function<void(const std::vector<size_t> &local, std::vector<PointResult> &out, int worker)>;

enum class Progress { Auto, Bar, Log, Quiet };

/// The checkpoint journal of one output (OUT.journal). It is opened without following a
/// symbolic link, must be a regular file of this user, and is locked (flock) for as long as
/// the object lives: a second sweep on the same output is refused, never interleaved.
class Journal {
public:
  Journal() = default;
  ~Journal();
  Journal(const Journal &) = delete;
  Journal &operator=(const Journal &) = delete;
  /// Opens or creates `path` and locks it; `restart` discards what it holds. Returns false
  /// with an `error` that starts "cannot write the checkpoint journal".
  bool open(const std::string &path, bool restart, std::string &error);
  bool isOpen() const { return fd_ >= 0; }
  int fd() const { return fd_; }
  const std::string &path() const { return path_; }
  /// Deletes the journal once the outputs are written; the lock is held until then.
  void remove();

private:
  int fd_ = -1;
  std::string path_;
};

struct RunOptions {
  int threads = 0;        // 0: every core
  size_t batch = 1;       // points per evaluator call
  size_t chunk = 256;     // points per checkpoint (also written at least once a second)
  Journal *journal = nullptr; // an open journal, or none: no checkpoints
  std::string fingerprint; // what the journal must have been written for
  Progress progress = Progress::Auto;
  std::string label = "saltpan sweep"; // prefix of progress lines
};

struct RunReport {
  uint64_t resumed = 0;  // points read back from the journal
  uint64_t computed = 0; // points computed by this run
  double seconds = 0;
};

/// Fills every result of `table` not already done. Returns false with `error` when the
/// journal cannot be used or written, or the evaluator threw.
bool runSweep(Table &table, const Evaluate &evaluate, const RunOptions &options, RunReport &report,
              std::string &error);

} // namespace saltpan::sweep
