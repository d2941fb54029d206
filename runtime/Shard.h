// Shard.h - which part of a sweep this process computes: `--shard I/N`, or the array-task
// index a batch scheduler puts in the environment (`--shard env`, `--shard env/N`).
#pragma once
#include <string>

namespace saltpan::sweep {

struct ShardChoice {
  int index = 0; // from 0
  int count = 1;
};

/// Parses "I/N" (0 <= I < N), "env" or "env/N". For "env" the index (and, when the
/// scheduler gives it, the count) come from SLURM_ARRAY_TASK_ID / _MIN / _COUNT,
/// SGE_TASK_ID / _FIRST / _LAST / _STEPSIZE, PBS_ARRAY_INDEX or LSB_JOBINDEX /
/// LSB_JOBINDEX_END. Returns false with `error` when the text or the environment does not
/// say which shard this is.
bool parseShard(const std::string &text, ShardChoice &shard, std::string &error);

} // namespace saltpan::sweep
