// Shard.tests.cpp - `--shard I/N`, `env` and `env/N` (runtime/Shard), with the array-task
// variables of the batch schedulers set and restored around each case.
#include "Shard.h"

#include <catch2/catch.hpp>

#include <cstdlib>
#include <initializer_list>
#include <map>
#include <optional>
#include <string>

using namespace saltpan::sweep;

namespace {

const char *const schedulerVariables[] = {
    "SLURM_ARRAY_TASK_ID", "SLURM_ARRAY_TASK_MIN", "SLURM_ARRAY_TASK_COUNT", "SGE_TASK_ID",
    "SGE_TASK_FIRST",      "SGE_TASK_LAST",        "SGE_TASK_STEPSIZE",      "PBS_ARRAY_INDEX",
    "LSB_JOBINDEX",        "LSB_JOBINDEX_END"};

// Clears every scheduler variable for the life of the object and sets the given ones; the
// process's own values (a test run inside a batch job) come back afterwards.
class SchedulerEnvironment {
public:
  explicit SchedulerEnvironment(std::initializer_list<std::pair<const char *, const char *>> set) {
    for (const char *name : schedulerVariables) {
      const char *v = std::getenv(name);
      saved_[name] = v ? std::optional<std::string>(v) : std::nullopt;
      ::unsetenv(name);
    }
    for (auto &[name, value] : set)
      ::setenv(name, value, 1);
  }
  ~SchedulerEnvironment() {
    for (auto &[name, value] : saved_)
      if (value)
        ::setenv(name.c_str(), value->c_str(), 1);
      else
        ::unsetenv(name.c_str());
  }

private:
  std::map<std::string, std::optional<std::string>> saved_;
};

ShardChoice parsed(const std::string &text) {
  ShardChoice s;
  std::string error;
  INFO(text << ": " << error);
  REQUIRE(parseShard(text, s, error));
  return s;
}

bool refused(const std::string &text) {
  ShardChoice s;
  std::string error;
  bool ok = parseShard(text, s, error);
  INFO(text);
  CHECK(ok == error.empty());
  return !ok;
}

} // namespace

TEST_CASE("parseShard: --shard I/N names shard I of N", "[sweep]") {
  SchedulerEnvironment none({});
  CHECK(parsed("0/4").index == 0);
  CHECK(parsed("0/4").count == 4);
  CHECK(parsed("3/4").index == 3);
  CHECK(parsed("3/4").count == 4);
  CHECK(parsed("0/1").count == 1);
  CHECK(parsed("999999/1000000").index == 999999);
}

TEST_CASE("parseShard: --shard refuses shards that do not exist and text that is not I/N", "[sweep]") {
  SchedulerEnvironment none({});
  for (const char *bad : {"4/4", "5/4", "-1/2", "a/b", "1", "", "/", "1/", "/2", "0/0", "1/2/3", "1.5/4", " 1/4",
                          "0x1/4", "0/1000001", "env2", "env/", "env/x"})
    CHECK(refused(bad));
  // Without a scheduler in the environment, env has nothing to read.
  CHECK(refused("env"));
  CHECK(refused("env/4"));
}

TEST_CASE("parseShard: --shard env reads SLURM's array-task variables", "[sweep]") {
  {
    SchedulerEnvironment slurm(
        {{"SLURM_ARRAY_TASK_ID", "1"}, {"SLURM_ARRAY_TASK_MIN", "0"}, {"SLURM_ARRAY_TASK_COUNT", "3"}});
    ShardChoice s = parsed("env");
    CHECK(s.index == 1);
    CHECK(s.count == 3);
    // env/N overrides the count.
    CHECK(parsed("env/8").count == 8);
    CHECK(parsed("env/8").index == 1);
    CHECK(refused("env/1")); // task 1 of 1 does not exist
  }
  {
    // An array numbered from 5: the first task is shard 0.
    SchedulerEnvironment slurm({{"SLURM_ARRAY_TASK_ID", "7"}, {"SLURM_ARRAY_TASK_MIN", "5"}, {"SLURM_ARRAY_TASK_COUNT", "4"}});
    ShardChoice s = parsed("env");
    CHECK(s.index == 2);
    CHECK(s.count == 4);
  }
  {
    // No count in the environment: env alone is refused, env/N is fine.
    SchedulerEnvironment slurm({{"SLURM_ARRAY_TASK_ID", "2"}});
    CHECK(refused("env"));
    CHECK(parsed("env/3").index == 2);
  }
}

TEST_CASE("parseShard: --shard env reads SGE's task range and step", "[sweep]") {
  {
    SchedulerEnvironment sge({{"SGE_TASK_ID", "3"}, {"SGE_TASK_FIRST", "1"}, {"SGE_TASK_LAST", "4"}});
    ShardChoice s = parsed("env");
    CHECK(s.index == 2);
    CHECK(s.count == 4);
  }
  {
    // Tasks 10, 20, ..., 50: task 30 is shard 2 of 5.
    SchedulerEnvironment sge({{"SGE_TASK_ID", "30"},
                              {"SGE_TASK_FIRST", "10"},
                              {"SGE_TASK_LAST", "50"},
                              {"SGE_TASK_STEPSIZE", "10"}});
    ShardChoice s = parsed("env");
    CHECK(s.index == 2);
    CHECK(s.count == 5);
  }
  {
    // Outside an array job SGE writes "undefined"; that is no index.
    SchedulerEnvironment sge({{"SGE_TASK_ID", "undefined"}});
    CHECK(refused("env/4"));
  }
}

TEST_CASE("parseShard: --shard env reads PBS and LSF indices", "[sweep]") {
  {
    SchedulerEnvironment pbs({{"PBS_ARRAY_INDEX", "2"}});
    CHECK(refused("env")); // PBS gives no count
    CHECK(parsed("env/3").index == 2);
  }
  {
    // LSF counts from 1.
    SchedulerEnvironment lsf({{"LSB_JOBINDEX", "1"}, {"LSB_JOBINDEX_END", "6"}});
    ShardChoice s = parsed("env");
    CHECK(s.index == 0);
    CHECK(s.count == 6);
  }
  {
    SchedulerEnvironment lsf({{"LSB_JOBINDEX", "6"}, {"LSB_JOBINDEX_END", "6"}});
    CHECK(parsed("env").index == 5);
  }
}

TEST_CASE("the scheduler variables are restored after a case", "[sweep]") {
  ::setenv("SLURM_ARRAY_TASK_ID", "9", 1);
  {
    SchedulerEnvironment cleared({});
    CHECK(std::getenv("SLURM_ARRAY_TASK_ID") == nullptr);
  }
  const char *back = std::getenv("SLURM_ARRAY_TASK_ID");
  REQUIRE(back != nullptr);
  CHECK(std::string(back) == "9");
  ::unsetenv("SLURM_ARRAY_TASK_ID");
}
