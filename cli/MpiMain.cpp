// MpiMain.cpp - saltpan-mpi: `saltpan sweep` spread over the ranks of an MPI job.
//
// Rank r of n computes shard r/n of the sweep exactly as `saltpan sweep --shard r/n` would
// (with its own checkpoint journal, so a relaunched job resumes), into a JSON file beside
// the first output; when every rank has succeeded, rank 0 joins the shards with
// `saltpan merge` into the requested outputs and removes them. The outputs are therefore the
// bytes one unsharded `saltpan sweep` writes. The ranks share a file system, as on a cluster.
#include "Commands.h"

#include <mpi.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <thread>
#include <vector>

namespace {

const char *mpiHelp = R"(usage: mpirun -n N saltpan-mpi sweep [sweep options] -o FILE [-o FILE...] SPEC

Runs `saltpan sweep` with its points split over the N ranks of an MPI job: rank r computes
shard r of N (checkpointed, so relaunching the same job resumes), and rank 0 joins the
shards into each -o FILE, the same bytes one `saltpan sweep` would write. Every option of
`saltpan sweep` except --shard is accepted; at least one -o is required.

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

} // namespace

int main(int argc, char **argv) {
  MPI_Init(&argc, &argv);
  int rank = 0, size = 1;
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  MPI_Comm_size(MPI_COMM_WORLD, &size);
  std::vector<std::string> args(argv + 1, argv + argc);
  int rc = saltpan::Ok;
  std::vector<std::string> outputs, sweepArgs;
  if (args.empty() || args[0] != "sweep" || (args.size() > 1 && (args[1] == "--help" || args[1] == "-h"))) {
    if (rank == 0)
      std::fputs(mpiHelp, args.size() > 1 && args[1] == "--help" ? stdout : stderr);
    MPI_Finalize();
    return args.size() > 1 && args[1] == "--help" ? saltpan::Ok : saltpan::BadUsage;
  }
  // Only -o and --shard are read here; everything else goes on to `saltpan sweep` as given.
  saltpan::OptionParser parser;
  parser.repeated("-o", outputs);
  auto passOn = [&](const std::string &a) {
    if (saltpan::namesOption(a, "--shard"))
      rc = saltpan::BadUsage;
    else
      sweepArgs.push_back(a);
    return std::string();
  };
  parser.positional(passOn);
  parser.unknown(passOn);
  parser.parse(std::vector<std::string>(args.begin() + 1, args.end()), [](const std::string &) { return 0; });
  if (rc != saltpan::Ok || outputs.empty()) {
    if (rank == 0)
      std::fprintf(stderr, "saltpan-mpi: error: %s\n\n%s",
                   outputs.empty() ? "give at least one output with -o FILE"
                                   : "the ranks choose the shards; drop --shard",
                   mpiHelp);
    MPI_Finalize();
    return saltpan::BadUsage;
  }
  auto shardFile = [&](int r) {
    return outputs.front() + ".rank-" + std::to_string(r) + "-of-" + std::to_string(size) + ".json";
  };
  std::vector<std::string> mine = sweepArgs;
  // Ranks on one machine share its cores: without --threads, each takes its share.
  bool threadsGiven = false;
  for (const std::string &a : sweepArgs)
    threadsGiven = threadsGiven || saltpan::namesOption(a, "--threads");
  const char *local = std::getenv("OMPI_COMM_WORLD_LOCAL_SIZE");
  if (!threadsGiven && local && std::atoi(local) > 0) {
    unsigned cores = std::max(1u, std::thread::hardware_concurrency());
    mine.insert(mine.end(),
                {"--threads", std::to_string(std::max(1u, cores / static_cast<unsigned>(std::atoi(local))))});
  }
  mine.insert(mine.end(), {"--shard", std::to_string(rank) + "/" + std::to_string(size), "-o", shardFile(rank)});
  if (rank != 0)
    mine.insert(mine.end(), {"--progress", "none"});
  rc = saltpan::cli::sweepCommand(mine);
  int worst = 0;
  MPI_Allreduce(&rc, &worst, 1, MPI_INT, MPI_MAX, MPI_COMM_WORLD);
  if (worst == saltpan::Ok && rank == 0) {
    std::vector<std::string> merge;
    for (const std::string &o : outputs)
      merge.insert(merge.end(), {"-o", o});
    for (int r = 0; r < size; ++r)
      merge.push_back(shardFile(r));
    worst = saltpan::cli::mergeCommand(merge);
    if (worst == saltpan::Ok)
      for (int r = 0; r < size; ++r)
        std::filesystem::remove(shardFile(r));
  }
  MPI_Bcast(&worst, 1, MPI_INT, 0, MPI_COMM_WORLD);
  MPI_Finalize();
  return worst;
}
