// MergeCommand.cpp - `saltpan merge`: the JSON results of a sweep's shards, joined into the
// file (CSV or JSON) that one unsharded run of the sweep writes.
#include "Commands.h"

#include "SweepTable.h"
#include "TraceOutput.h"

#include <algorithm>
#include <cstdio>
#include <fstream>
#include <sstream>

namespace saltpan::cli {

namespace {

const char *mergeHelp = R"(usage: saltpan merge -o FILE [-o FILE...] SHARD.json...

Joins the JSON results that `saltpan sweep --shard I/N -o SHARD.json` wrote for every shard of one
sweep into FILE (.csv or .json), byte for byte the file one unsharded run would have written.
Every shard from 0 to N-1 must be given once, and all must come from the same sweep of the same
spec with the same saltpan version and engine (their sweep_hash fields agree).

options:
  -o FILE     the merged output (.csv or .json; repeatable; never one of the shards)
  --version   print the version
  --help      show this help

Every point of every shard is checked (its number of values, their types), and the shards'
columns must agree; anything else is refused, never joined into a ragged table.

exit status: 0 success, 64 bad usage, 65 the shards do not make one sweep, 73 cannot write, or -o names a shard

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

int usage(const std::string &message) { return usageError("saltpan merge: error", message, mergeHelp); }

int refuse(const std::string &message) {
  std::fprintf(stderr, "saltpan merge: error: %s\n", message.c_str());
  return BadInput;
}

} // namespace

int mergeCommand(const std::vector<std::string> &args) {
  std::vector<std::string> outputs, inputs;
  OptionParser parser;
  addHelpAndVersion(parser, mergeHelp);
  parser.value("-o", [&](const std::string &v) {
    outputs.push_back(v);
    return sweep::tableOutputProblem(v);
  });
  parser.positional(inputs);
  if (auto code = parser.parse(args, usage))
    return *code;
  if (outputs.empty())
    return usage("no output given (-o FILE)");
  if (inputs.empty())
    return usage("no shard files given");

  std::vector<NamedFile> named, shardFiles;
  for (const std::string &out : outputs)
    named.push_back({"-o", out});
  for (const std::string &in : inputs)
    shardFiles.push_back({"the shard", in});
  if (std::string clash = findOutputClash(named, shardFiles); !clash.empty()) {
    std::fprintf(stderr, "saltpan merge: error: %s\n", clash.c_str());
    return CannotWrite;
  }

  std::vector<sweep::Table> shards(inputs.size());
  for (size_t i = 0; i < inputs.size(); ++i) {
    std::ifstream in(inputs[i], std::ios::binary);
    if (!in)
      return refuse("cannot read '" + inputs[i] + "'");
    std::stringstream text;
    text << in.rdbuf();
    std::string error;
    if (!sweep::fromJson(text.str(), shards[i], error))
      return refuse("'" + inputs[i] + "': " + error);
  }
  const sweep::Table &first = shards.front();
  std::vector<int> holder(static_cast<size_t>(first.shardCount), -1);
  for (size_t i = 0; i < shards.size(); ++i) {
    const sweep::Table &s = shards[i];
    if (s.sweepHash != first.sweepHash || s.shardCount != first.shardCount)
      return refuse("'" + inputs[i] + "' comes from a different sweep than '" + inputs[0] +
                    "' (another spec, sweep, saltpan version, engine or shard count)");
    // The hash is only text in the file: the columns themselves must agree too, or the merged
    // table would be ragged.
    if (std::string why = sweep::differingColumns(first, s); !why.empty())
      return refuse("'" + inputs[i] + "' and '" + inputs[0] + "' do not have the same columns: " + why);
    int &slot = holder[static_cast<size_t>(s.shardIndex)];
    if (slot >= 0)
      return refuse("shard " + std::to_string(s.shardIndex) + " is given twice: '" + inputs[static_cast<size_t>(slot)] +
                    "' and '" + inputs[i] + "'");
    slot = static_cast<int>(i);
  }
  for (size_t k = 0; k < holder.size(); ++k)
    if (holder[k] < 0)
      return refuse("shard " + std::to_string(k) + " of " + std::to_string(first.shardCount) + " is missing");

  sweep::Table merged = first;
  merged.shardIndex = 0;
  merged.shardCount = 1;
  merged.first = 0;
  merged.parameterValues.clear();
  merged.results.clear();
  for (int index : holder) {
    const sweep::Table &s = shards[static_cast<size_t>(index)];
    if (s.first != merged.results.size())
      return refuse("'" + inputs[static_cast<size_t>(index)] + "' does not start where the shard before it ends");
    merged.parameterValues.insert(merged.parameterValues.end(), s.parameterValues.begin(), s.parameterValues.end());
    merged.results.insert(merged.results.end(), s.results.begin(), s.results.end());
  }
  if (merged.results.size() != merged.totalPoints)
    return refuse("the shards hold " + std::to_string(merged.results.size()) + " points, the sweep " +
                  std::to_string(merged.totalPoints));
  for (const std::string &out : outputs) {
    std::string error;
    if (!writeFileAtomically(out, isJsonPath(out) ? sweep::toJson(merged) : sweep::toCsv(merged), error)) {
      std::fprintf(stderr, "saltpan merge: %s\n", error.c_str());
      return CannotWrite;
    }
  }
  std::fprintf(stderr, "merged %zu shards of %s: %zu points\n", shards.size(), merged.sweep.c_str(),
               merged.results.size());
  return Ok;
}

} // namespace saltpan::cli
