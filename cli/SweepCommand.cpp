// SweepCommand.cpp - `saltpan sweep`: many runs of one model, one per point of a grid or a
// sample, on every core, in SIMD lanes, checkpointed; `--shard` splits it across machines.
#include "Commands.h"
#include "Version.h"

#include "Diagnostics.h"
#include "JIT.h"
#include "Pipeline.h"
#include "Shard.h"
#include "Sweep.h"
#include "SweepRun.h"
#include "SweepSupport.h"
#include "TraceOutput.h"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <thread>

namespace saltpan::cli {

namespace {

const char *sweepHelp = R"(usage: saltpan sweep [options] FILE

Runs a sweep: the model once per point, each point a set of parameter values, and writes one
row per point (the point's index, its parameters, then its measures, each with its unit, and
why the point's run failed if it did). The sweep is a `sweep NAME { ... }` declaration in FILE,
or is written on the command line with --vary, --values, --sample and --measure.

Points run on every core; with exponential Euler or RK4 the model is compiled to advance several
points in lockstep in the CPU's SIMD lanes (8 with AVX-512, 4 with AVX2). Each lane computes
only its own point, so a point's numbers do not depend on the thread count, the lanes beside it
or the shard. With -o, finished points are checkpointed to FILE.journal: run the same command
again after a crash or a kill and only unfinished points are computed; the final file is the
same as an uninterrupted run's. The journal is locked while the sweep runs (a second sweep on
the same output is refused), never followed through a link, and each of its lines is checked
against the sweep before it is resumed.

options:
  --sweep NAME            the sweep to run (default: the only one in FILE)
  --vary NAME=A:B:N       vary a parameter over N points from A to B, e.g.
                          --vary axon.SquidSodium1952.density=60mS/cm2:180mS/cm2:16
  --vary-log NAME=A:B:N   the same, spaced evenly in logarithm
  --values NAME=A,B,...   a list of values
  --sample N              draw N points from the --vary ranges (no grid; N is not needed in them)
  --design D              latin_hypercube (default) or uniform, with --sample
  --seed S                the sample's seed (default 1)
  --measure TEXT          a measure, e.g. 'step10: spike_count(axon.V)' or 'rest(axon)' (repeatable)
  -o FILE                 write FILE (.csv or .json; repeatable) when the sweep is complete
  --shard I/N             compute only shard I (0 to N-1) of N; `saltpan merge` joins the JSON files
  --shard env[/N]         take I (and N) from a batch scheduler's array-task variables
  --threads N             worker threads (default: every core)
  --engine E              batched (default), scalar (one point at a time, as `saltpan run`) or interpreter
  --lanes N               points per lockstep batch: 2, 4 or 8 (default: the CPU's widest)
  --checkpoint N          points per journal entry (default 256; an entry is also written each second)
  --restart               discard an existing journal and start again
  --progress P            auto (default: a bar on a terminal, else a line every 10 s), bar, log or none
  --version               print the version
  --help                  show this help

exit status: 0 success (failed points are reported in the output), 64 bad usage, 65 the spec has
             errors, 70 internal fault, 73 an output could not be written or is an input

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

struct SweepOptions : sweep::RunArguments {
  std::string file;
  std::vector<std::string> axes, measures, outputs; // axes: spec text of `vary` items
  std::string sample, design = "latin_hypercube", seed = "1";
  std::string engine = "batched";
  int lanes = 0;
};

int usage(const std::string &message) { return usageError("saltpan sweep: error", message, sweepHelp); }

// NAME=A:B:N -> "vary NAME from A to B points N"
bool varyItem(const std::string &v, bool logarithmic, std::string &item, std::string &error) {
  size_t eq = v.find('=');
  std::vector<std::string> parts;
  if (eq != std::string::npos) {
    std::string rest = v.substr(eq + 1);
    size_t pos = 0;
    for (size_t colon; (colon = rest.find(':', pos)) != std::string::npos; pos = colon + 1)
      parts.push_back(rest.substr(pos, colon - pos));
    parts.push_back(rest.substr(pos));
  }
  if (eq == std::string::npos || eq == 0 || (parts.size() != 3 && parts.size() != 2)) {
    error = "--vary needs NAME=FROM:TO:POINTS (or NAME=FROM:TO with --sample), not '" + v + "'";
    return false;
  }
  item = "vary " + v.substr(0, eq) + " from " + parts[0] + " to " + parts[1];
  if (parts.size() == 3)
    item += " points " + parts[2];
  if (logarithmic)
    item += " logarithmic";
  return true;
}

// The text of a sweep written on the command line, using FILE.
std::string commandLineSpec(const SweepOptions &o) {
  std::string text = "use \"" + std::filesystem::absolute(o.file).string() + "\"\n\nsweep command_line {\n";
  for (const std::string &a : o.axes)
    text += "  " + a + "\n";
  if (!o.sample.empty())
    text += "  sample " + o.sample + " " + o.design + " seed " + o.seed + "\n";
  for (const std::string &m : o.measures)
    text += "  measure " + m + "\n";
  return text + "}\n";
}

} // namespace

int sweepCommand(const std::vector<std::string> &args) {
  SweepOptions o;
  OptionParser parser;
  addHelpAndVersion(parser, sweepHelp);
  sweep::addRunOptions(parser, o);
  parser.value("--seed", [&](const std::string &v) -> std::string {
    o.seed = v;
    long n = 0;
    return wholeNumber(v, 0, 9007199254740992L, n) ? "" : "--seed needs a whole number from 0 to 2^53";
  });
  for (bool logarithmic : {false, true})
    parser.value(logarithmic ? "--vary-log" : "--vary", [&o, logarithmic](const std::string &v) {
      std::string item, error;
      if (varyItem(v, logarithmic, item, error))
        o.axes.push_back(item);
      return error;
    });
  parser.value("--values", [&](const std::string &v) -> std::string {
    size_t eq = v.find('=');
    if (eq == std::string::npos || eq == 0 || eq + 1 == v.size())
      return "--values needs NAME=A,B,..., not '" + v + "'";
    o.axes.push_back("vary " + v.substr(0, eq) + " values " + v.substr(eq + 1));
    return "";
  });
  parser.repeated("--measure", o.measures);
  parser.value("--sample", [&](const std::string &v) -> std::string {
    o.sample = v;
    long n = 0;
    return wholeNumber(v, 1, 100000000, n) ? "" : "--sample needs a whole number of points from 1 to 100000000";
  });
  parser.value("--design",
               oneOf(o.design, {"latin_hypercube", "uniform"}, "--design must be 'latin_hypercube' or 'uniform'"));
  parser.repeated("-o", o.outputs);
  parser.value("--lanes", [&](const std::string &v) -> std::string {
    if (v != "2" && v != "4" && v != "8")
      return "--lanes must be 2, 4 or 8";
    o.lanes = std::stoi(v);
    return "";
  });
  parser.value("--engine", oneOf(o.engine, {"batched", "scalar", "interpreter"},
                                 "--engine must be 'batched', 'scalar' or 'interpreter'"));
  parser.positional(o.file, "sweep takes one spec file");
  if (auto code = parser.parse(args, usage))
    return *code;
  if (o.file.empty())
    return usage("no spec file given");
  bool onCommandLine = !o.axes.empty() || !o.measures.empty() || !o.sample.empty();
  if (onCommandLine && !o.sweep.empty())
    return usage(
        "--sweep names a sweep of the file; it cannot be combined with --vary, --values, --sample or --measure");
  for (const std::string &out : o.outputs)
    if (std::string problem = sweep::tableOutputProblem(out); !problem.empty())
      return usage(problem);
  sweep::ShardChoice shard;
  if (!o.shard.empty()) {
    std::string error;
    if (!sweep::parseShard(o.shard, shard, error))
      return usage(error);
  }

  Compilation c;
  if (onCommandLine) {
    std::error_code ec;
    if (!std::filesystem::is_regular_file(o.file, ec)) {
      std::fprintf(stderr, "saltpan sweep: error: cannot read '%s'\n", o.file.c_str());
      return BadInput;
    }
    compileText("<command line>", commandLineSpec(o), c);
  } else {
    compileFile(o.file, c);
  }
  for (const Diagnostic &d : c.diags.all())
    std::fputs(renderText(d).c_str(), stderr);
  if (c.diags.errorCount() > 0)
    return BadInput;
  std::vector<NamedFile> outputs;
  for (const std::string &out : o.outputs)
    outputs.push_back({"-o", out});
  if (!o.outputs.empty())
    outputs.push_back({"the journal", o.outputs.front() + ".journal"});
  std::string clash = outputClash(outputs, c.sources);
  if (clash.empty())
    clash = findOutputClash(outputs, {{"the spec", o.file}});
  if (!clash.empty()) {
    std::fprintf(stderr, "saltpan sweep: error: %s\n", clash.c_str());
    return CannotWrite;
  }
  auto sweeps = rootSweeps(c.program);
  const ast::SweepDecl *chosen = nullptr;
  for (const ast::SweepDecl *s : sweeps)
    if (s->name == o.sweep || (o.sweep.empty() && sweeps.size() == 1))
      chosen = s;
  if (!chosen) {
    std::string names;
    for (const ast::SweepDecl *s : sweeps)
      names += (names.empty() ? "" : ", ") + s->name;
    if (sweeps.empty())
      std::fprintf(stderr, "saltpan sweep: error: '%s' declares no sweep; write one, or use --vary and --measure\n",
                   o.file.c_str());
    else if (o.sweep.empty())
      std::fprintf(stderr, "saltpan sweep: error: '%s' has %zu sweeps (%s); choose one with --sweep\n", o.file.c_str(),
                   sweeps.size(), names.c_str());
    else
      std::fprintf(stderr, "saltpan sweep: error: there is no sweep '%s' in '%s'; it has %s\n", o.sweep.c_str(),
                   o.file.c_str(), names.c_str());
    return BadUsage;
  }
  SweepPlan plan = planSweep(c, *chosen);

  // The table of this shard's points.
  sweep::Table table;
  table.sweep = chosen->name;
  table.version = SALTPAN_VERSION;
  table.modelHash = c.modelHash();
  table.design = plan.design;
  for (size_t a = 0; a < plan.parameters.size(); ++a)
    table.parameters.push_back({plan.parameters[a], plan.parameterUnits[a].name, plan.parameterUnits[a].scale});
  for (const SweepMeasure &m : plan.measures)
    table.measures.push_back({m.decl->text, m.unit.name, m.unit.scale});
  sweep::setUpTable(table, plan.points, shard);

  int threads = o.threads > 0 ? o.threads : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
  SweepEngine engine = o.engine == "scalar"        ? SweepEngine::Scalar
                       : o.engine == "interpreter" ? SweepEngine::Interpreter
                                                   : SweepEngine::Batched;
  KernelCompiler compile;
  int lanes = o.lanes;
  std::unique_ptr<JIT> jit;
  if (engine != SweepEngine::Interpreter) {
    std::string jitError;
    jit = JIT::create(jitError);
    if (!jit) {
      std::fprintf(stderr, "saltpan sweep: internal error: the JIT failed: %s\n", jitError.c_str());
      return InternalFault;
    }
    if (lanes > jit->nativeLanes())
      return usage("this CPU's vectors hold at most " + std::to_string(jit->nativeLanes()) + " lanes");
    if (lanes == 0)
      lanes = jit->nativeLanes();
    compile = [&jit](const ir::Kernel &k, int width, std::string &error) { return jit->compile(k, width, error); };
  }
  SweepEvaluator evaluator(c, plan, engine, compile, lanes, threads);
  std::string error;
  if (!evaluator.ready(error)) {
    std::fprintf(stderr, "saltpan sweep: internal error: %s\n", error.c_str());
    return InternalFault;
  }
  table.engine = evaluator.description();
  table.sweepHash = sweep::sweepHash(table);

  sweep::RunOptions run;
  run.threads = threads;
  run.batch = evaluator.batch();
  run.chunk = o.checkpoint;
  run.fingerprint = sweep::journalFingerprint(table);
  sweep::parseProgress(o.progress, run.progress);
  sweep::Journal journal;
  if (!o.outputs.empty()) {
    if (!journal.open(o.outputs.front() + ".journal", o.restart, error)) {
      std::fprintf(stderr, "saltpan sweep: error: %s\n", error.c_str());
      return CannotWrite;
    }
    run.journal = &journal;
  }
  sweep::RunReport report;
  auto evaluate = [&](const std::vector<size_t> &local, std::vector<sweep::PointResult> &out, int worker) {
    std::vector<size_t> global(local);
    for (size_t &g : global)
      g += table.first;
    evaluator.evaluate(global, out, worker);
  };
  if (!sweep::runSweep(table, evaluate, run, report, error)) {
    std::fprintf(stderr, "saltpan sweep: error: %s\n", error.c_str());
    return sweep::cannotWriteJournal(error) ? CannotWrite : BadUsage;
  }

  if (!sweep::writeOutputs(table, o.outputs, run.journal, error)) {
    std::fprintf(stderr, "saltpan sweep: %s\n", error.c_str());
    std::fprintf(stderr, "note: the finished points are kept in '%s'\n", journal.path().c_str());
    return CannotWrite;
  }
  std::fputs(sweep::summary(table, report, threads).c_str(), stderr);
  return Ok;
}

} // namespace saltpan::cli
