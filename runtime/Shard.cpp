// Shard.cpp - shard choice from the command line or a scheduler's environment.
#include "Shard.h"

#include <cstdlib>
#include <optional>

namespace saltpan::sweep {

namespace {

std::optional<long> whole(const std::string &s) {
  if (s.empty() || s.size() > 9 || s.find_first_not_of("0123456789") != std::string::npos)
    return std::nullopt;
  return std::strtol(s.c_str(), nullptr, 10);
}

std::optional<long> env(const char *name) {
  const char *v = std::getenv(name);
  return v ? whole(v) : std::nullopt;
}

// The array-task index (from 0) and, when known, the task count.
bool fromEnvironment(long &index, long &count, std::string &error) {
  count = 0;
  if (auto id = env("SLURM_ARRAY_TASK_ID")) {
    index = *id - env("SLURM_ARRAY_TASK_MIN").value_or(0);
    count = env("SLURM_ARRAY_TASK_COUNT").value_or(0);
    return true;
  }
  if (auto id = env("SGE_TASK_ID")) {
    long first = env("SGE_TASK_FIRST").value_or(1), step = env("SGE_TASK_STEPSIZE").value_or(1);
    step = step > 0 ? step : 1;
    index = (*id - first) / step;
    if (auto last = env("SGE_TASK_LAST"))
      count = (*last - first) / step + 1;
    return true;
  }
  if (auto id = env("PBS_ARRAY_INDEX")) {
    index = *id;
    return true;
  }
  if (auto id = env("LSB_JOBINDEX")) { // LSF counts from 1
    index = *id - 1;
    count = env("LSB_JOBINDEX_END").value_or(0);
    return true;
  }
  error = "--shard env: no array-task index in the environment (SLURM_ARRAY_TASK_ID, SGE_TASK_ID, "
          "PBS_ARRAY_INDEX or LSB_JOBINDEX)";
  return false;
}

} // namespace

bool parseShard(const std::string &text, ShardChoice &shard, std::string &error) {
  size_t slash = text.find('/');
  std::string left = text.substr(0, slash), right = slash == std::string::npos ? "" : text.substr(slash + 1);
  long index = 0, count = 0;
  if (left == "env") {
    if (!fromEnvironment(index, count, error))
      return false;
    if (!right.empty()) {
      auto n = whole(right);
      if (!n) {
        error = "--shard env/N needs a whole number N";
        return false;
      }
      count = *n;
    }
    if (count <= 0) {
      error = "--shard env: the environment does not give the number of tasks; write --shard env/N";
      return false;
    }
  } else {
    auto i = whole(left), n = whole(right);
    if (!i || !n) {
      error = "--shard needs I/N (from 0/N to N-1/N), env or env/N, not '" + text + "'";
      return false;
    }
    index = *i;
    count = *n;
  }
  if (count < 1 || count > 1000000 || index < 0 || index >= count) {
    error = "shard " + std::to_string(index) + " of " + std::to_string(count) +
            " does not exist (shards count from 0 to N-1, at most 1000000)";
    return false;
  }
  shard.index = static_cast<int>(index);
  shard.count = static_cast<int>(count);
  return true;
}

} // namespace saltpan::sweep
