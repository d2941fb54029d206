// StandaloneSweep.cpp - the `sweep` mode of the executables `saltpan build` writes: a sweep of
// the spec, planned by saltpan at build time, run with the compiled-in kernels one point per
// run, written byte for byte as `saltpan sweep --engine scalar` writes it.
#include "Measures.h"
#include "Options.h"
#include "Run.h"
#include "StandaloneMain.h"
#include "StandaloneModel.h"
#include "SweepSupport.h"
#include "TraceOutput.h"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <thread>

namespace saltpan::standalone {

namespace {

std::string helpText(const ModelBundle &b, const std::string &program) {
  return "usage: " + program +
         " sweep [options]\n\n"
         "Runs one of the sweeps compiled in: the model once per point, each point a set of parameter\n"
         "values, and writes one row per point (the point's index, its parameters, then its measures,\n"
         "each with its unit, and why the point's run failed if it did). The points were planned by\n"
         "saltpan when it built this program; each is run with the native kernels compiled in, one point\n"
         "at a time, and the outputs are byte for byte those of `saltpan sweep --engine scalar` for the\n"
         "same sweep and shard, so `saltpan merge` joins shards from either. With -o, finished points are\n"
         "checkpointed to FILE.journal: run the same command again after a crash or a kill and only\n"
         "unfinished points are computed. The journal is locked while the sweep runs, never followed\n"
         "through a link, and each of its lines is checked against the sweep before it is resumed.\n\n"
         "options:\n"
         "  --sweep NAME         the sweep to run (default: the only one)\n"
         "  -o FILE              write FILE (.csv or .json; repeatable) when the sweep is complete;\n"
         "                       without -o, CSV on standard output\n"
         "  --shard I/N          compute only shard I (0 to N-1) of N; `saltpan merge` joins the JSON files\n"
         "  --shard env[/N]      take I (and N) from a batch scheduler's array-task variables\n"
         "  --threads N          worker threads (default: every core)\n"
         "  --checkpoint N       points per journal entry (default 256; an entry is also written each second)\n"
         "  --restart            discard an existing journal and start again\n"
         "  --progress P         auto (default: a bar on a terminal, else a line every 10 s), bar, log or none\n"
         "  --help               show this help\n\n" +
         sweepList(b) +
         "\nexit status: 0 success (failed points are reported in the output), 64 bad usage,\n"
         "             70 internal fault, 73 an output could not be written or is this program\n\n"
         "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.\n";
}

struct SweepOptions : sweep::RunArguments {
  std::vector<std::string> outputs;
};

} // namespace

std::string sweepList(const ModelBundle &b) {
  if (b.sweeps.empty())
    return "sweeps: none built in\n";
  std::string text = "sweeps (run with `sweep --sweep NAME`):\n";
  char line[512];
  for (const BundledSweep &s : b.sweeps) {
    std::snprintf(line, sizeof line, "  %-20s %zu point%s (%s), %zu measure%s\n", s.name.c_str(), s.points.size(),
                  s.points.size() == 1 ? "" : "s", s.design.c_str(), s.measures.size(),
                  s.measures.size() == 1 ? "" : "s");
    text += line;
  }
  return text;
}

int sweepMode(const ModelBundle &bundle, const std::vector<std::string> &args, const std::string &program) {
  auto bad = [&](const std::string &message) {
    return usage(program + " sweep", message, "run '" + program + " sweep --help' for the options and sweeps");
  };
  SweepOptions o;
  OptionParser parser(OptionParser::MissingValue::NeedsAValue);
  parser.stop({"--help", "-h"}, [&] {
    std::fputs(helpText(bundle, program).c_str(), stdout);
    return Ok;
  });
  sweep::addRunOptions(parser, o);
  parser.value("-o", [&](const std::string &v) {
    o.outputs.push_back(v);
    return sweep::tableOutputProblem(v);
  });
  if (auto code = parser.parse(args, bad))
    return *code;
  std::vector<NamedFile> outputs;
  for (const std::string &out : o.outputs)
    outputs.push_back({"-o", out});
  if (!o.outputs.empty())
    outputs.push_back({"the journal", o.outputs.front() + ".journal"});
  if (std::string clash = findOutputClash(outputs, {{"this program", "/proc/self/exe"}}); !clash.empty()) {
    std::fprintf(stderr, "%s sweep: error: %s\n", program.c_str(), clash.c_str());
    return CannotWrite;
  }
  sweep::ShardChoice shard;
  std::string error;
  if (!o.shard.empty() && !sweep::parseShard(o.shard, shard, error))
    return bad(error);
  const BundledSweep *chosen = nullptr;
  std::string names;
  for (const BundledSweep &s : bundle.sweeps) {
    names += (names.empty() ? "" : ", ") + s.name;
    if (s.name == o.sweep || (o.sweep.empty() && bundle.sweeps.size() == 1))
      chosen = &s;
  }
  if (!chosen) {
    if (bundle.sweeps.empty())
      return bad("no sweep was built in (saltpan builds in the sweeps whose measures are all protocol runs)");
    if (o.sweep.empty())
      return bad(std::to_string(bundle.sweeps.size()) + " sweeps are built in (" + names +
                 "); choose one with --sweep");
    return bad("there is no built-in sweep '" + o.sweep + "'; the built-in sweeps are " + names +
               " (`saltpan build` leaves out sweeps with rest or input_resistance measures)");
  }

  sweep::Table table;
  table.sweep = chosen->name;
  table.version = bundle.toolVersion;
  table.modelHash = bundle.modelHash;
  table.design = chosen->design;
  table.engine = "scalar"; // one point per run, as `saltpan sweep --engine scalar`
  table.parameters = chosen->parameters;
  for (const BundledSweep::Measure &m : chosen->measures)
    table.measures.push_back(m.column);
  sweep::setUpTable(table, chosen->points, shard);
  table.sweepHash = sweep::sweepHash(table);

  // Each protocol records only what its measures read, as in saltpan: the same kernels run.
  std::vector<ir::Model> models;
  for (const BundledSweep::Protocol &p : chosen->protocols) {
    std::vector<std::string> paths;
    for (const BundledSweep::Measure &m : chosen->measures)
      if (m.protocol == p.protocol)
        paths.push_back(m.recorded);
    models.push_back(bundle.protocols[static_cast<size_t>(p.protocol)]);
    sweep::recordOnly(models.back(), paths);
  }
  // The kernels a run of each protocol calls, found once among the compiled-in ones.
  std::vector<PlannedKernels> kernels;
  for (const ir::Model &m : models) {
    kernels.emplace_back(planKernels(m, KernelUse::Run), embeddedKernel);
    if (!kernels.back().native()) {
      std::fprintf(stderr, "%s sweep: internal error: %s\n", program.c_str(), kernels.back().compileError().c_str());
      return InternalFault;
    }
  }
  auto evaluate = [&](const std::vector<size_t> &local, std::vector<sweep::PointResult> &out, int) {
    for (size_t k = 0; k < local.size(); ++k) {
      const std::vector<double> &point = chosen->points[table.first + local[k]];
      out[k].measures.assign(chosen->measures.size(), NAN);
      for (size_t j = 0; j < models.size(); ++j) {
        const BundledSweep::Protocol &p = chosen->protocols[j];
        std::vector<double> params = models[j].params;
        for (size_t a = 0; a < point.size(); ++a)
          params[static_cast<size_t>(p.parameters[a])] = point[a];
        SimulationFailure failure;
        Trace trace = simulatePlanned(models[j], params, kernels[j], failure);
        if (failure.failed) {
          sweep::addFailure(out[k], sweep::failureText(models[j].protocol.name, failure));
          continue;
        }
        for (size_t m = 0; m < chosen->measures.size(); ++m) {
          const BundledSweep::Measure &x = chosen->measures[m];
          if (x.protocol != p.protocol)
            continue;
          std::string why;
          auto v = measures::ofTrace(x.measure, x.recorded, x.argument, models[j], trace, why);
          out[k].measures[m] = v ? *v * x.column.scale : NAN;
        }
      }
    }
  };

  int threads = o.threads > 0 ? o.threads : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  sweep::RunOptions run;
  run.threads = threads;
  run.batch = 1;
  run.chunk = o.checkpoint;
  run.fingerprint = sweep::journalFingerprint(table);
  run.label = program + " sweep";
  sweep::parseProgress(o.progress, run.progress);
  sweep::Journal journal;
  if (!o.outputs.empty()) {
    if (!journal.open(o.outputs.front() + ".journal", o.restart, error)) {
      std::fprintf(stderr, "%s sweep: error: %s\n", program.c_str(), error.c_str());
      return CannotWrite;
    }
    run.journal = &journal;
  }
  sweep::RunReport report;
  if (!sweep::runSweep(table, evaluate, run, report, error)) {
    std::fprintf(stderr, "%s sweep: error: %s\n", program.c_str(), error.c_str());
    return sweep::cannotWriteJournal(error)             ? CannotWrite
           : error.find("journal") != std::string::npos ? BadUsage
                                                        : InternalFault;
  }
  if (!sweep::writeOutputs(table, o.outputs, run.journal, error)) {
    std::fprintf(stderr, "%s sweep: error: %s\nnote: the finished points are kept in '%s'\n", program.c_str(),
                 error.c_str(), journal.path().c_str());
    return CannotWrite;
  }
  std::fputs(sweep::summary(table, report, threads).c_str(), stderr);
  return Ok;
}

} // namespace saltpan::standalone
