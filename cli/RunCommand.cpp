// RunCommand.cpp - `saltpan run`: lower a checked spec for one protocol, compile its kernel
// (JIT, or the reference interpreter), simulate, and write the recorded traces.
#include "Commands.h"
#include "Version.h"

#include "JIT.h"
#include "Lower.h"
#include "Measures.h"
#include "Pipeline.h"
#include "Plot.h"
#include "Run.h"
#include "RunSettings.h"
#include "Simulate.h"
#include "TraceOutput.h"

#include <algorithm>
#include <cctype>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <filesystem>

namespace saltpan::cli {

namespace {

const char *runHelp = R"(usage: saltpan run [options] FILE

Checks FILE, lowers it for one protocol, compiles the model to native code and simulates
it, then writes the recorded quantities. Time is the first column; units are in the header.
Conventions: V is inside minus outside; membrane current is positive outward; injected
current is positive into the cell.

options:
  --protocol NAME      the protocol to run (default: the only one; needed when there are several)
  --set NAME=VALUE     override a parameter, e.g. --set axon.SquidSodium1952.density="100 mS/cm2"
                       (repeatable; `saltpan check --emit ir FILE` lists the parameters)
  --duration T         override the protocol's duration, e.g. 50ms or "50 ms"
  --every T            override the recording interval
  --engine jit|interpreter   native code (default) or the reference interpreter
  --threshold V        spike threshold for the summary (default 0 mV)
  -o FILE              write FILE (.csv or .json) atomically instead of CSV on standard output
  --plot FILE.svg      also draw the recorded quantities as an SVG figure in FILE.svg
  --keep-partial       when the simulation fails, write what was recorded up to the failure
                       to STEM.partial.EXT beside -o FILE (the full output is never written)
  --version            print the version
  --help               show this help

exit status: 0 success, 64 bad usage, 65 the spec has errors or the simulation failed,
             70 internal fault, 73 an output file could not be written or is an input

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

struct RunOptions : RunArguments {
  std::string file, engine = "jit";
  bool keepPartial = false;
  std::string plot;
  double threshold = 0;
};

int usage(const std::string &message) {
  // One line that names the fault; the whole help would bury it.
  std::fprintf(stderr, "saltpan: error: %s (saltpan run --help lists the options)\n", message.c_str());
  return BadUsage;
}

} // namespace

int runCommand(const std::vector<std::string> &args) {
  RunOptions o;
  OptionParser parser;
  addHelpAndVersion(parser, runHelp);
  addRunOptions(parser, o);
  parser.value("--plot", o.plot);
  parser.flag("--keep-partial", o.keepPartial);
  parser.value("--engine", oneOf(o.engine, {"jit", "interpreter"}, "--engine must be 'jit' or 'interpreter'"));
  parser.value("--threshold", [&](const std::string &v) -> std::string {
    auto q = parseQuantity(v);
    if (!q || q->second != dims::voltage())
      return "--threshold needs a voltage, e.g. 0mV";
    o.threshold = q->first;
    return "";
  });
  parser.positional(o.file, "run takes one spec file");
  if (auto code = parser.parse(args, usage))
    return *code;
  if (o.file.empty())
    return usage("no spec file given");
  if (o.keepPartial && o.output.empty())
    return usage("--keep-partial needs -o FILE: the partial trace is written beside it");
  // --plot draws SVG only: a .png (or any other) name would get SVG under a false extension.
  if (!o.plot.empty()) {
    std::string ext = std::filesystem::path(o.plot).extension().string();
    std::transform(ext.begin(), ext.end(), ext.begin(), [](unsigned char ch) { return char(std::tolower(ch)); });
    if (ext != ".svg")
      return usage("--plot writes SVG; name the file *.svg, not '" + o.plot + "'");
  }

  Compilation c;
  compileFile(o.file, c);
  for (const Diagnostic &d : c.diags.all())
    std::fputs(renderText(d).c_str(), stderr);
  if (c.diags.errorCount() > 0)
    return BadInput;
  if (std::string clash = outputClash({{"-o", o.output}, {"--plot", o.plot}}, c.sources); !clash.empty()) {
    std::fprintf(stderr, "saltpan: error: %s\n", clash.c_str());
    return CannotWrite;
  }
  auto all = protocols(c.program);
  const ast::ProtocolDecl *protocol = nullptr;
  if (!o.protocol.empty()) {
    if (!(protocol = namedProtocol(c, o.protocol, o.file)))
      return BadUsage;
  } else if (all.size() == 1) {
    protocol = all.front();
  } else if (all.size() > 1) {
    std::fprintf(stderr, "saltpan: error: '%s' has %zu protocols; choose one with --protocol\n", o.file.c_str(),
                 all.size());
    return BadUsage;
  } else {
    std::fprintf(stderr, "saltpan: error: '%s' has no protocol to run\n", o.file.c_str());
    return BadUsage;
  }
  const ir::Model *lowered = loweredModel(c, *protocol);
  if (!lowered)
    return InternalFault;
  ir::Model model = *lowered; // a copy: --duration and --every change its protocol
  std::vector<double> params = model.params;
  std::string settingError;
  for (const std::string &s : o.sets)
    if (!applyParameterSetting(model, s, params, "`saltpan check --emit ir " + o.file + "` lists them", settingError)) {
      std::fprintf(stderr, "saltpan: error: %s\n", settingError.c_str());
      return BadUsage;
    }
  if (!applyTiming(model.protocol, o.duration, o.every, settingError))
    return usage(settingError);

  KernelCompiler compile;
  std::unique_ptr<JIT> jit;
  std::string jitError;
  if (o.engine == "jit") {
    jit = JIT::create(jitError);
    if (!jit) {
      std::fprintf(stderr, "saltpan: internal error: the JIT failed: %s\n", jitError.c_str());
      return InternalFault;
    }
    compile = [&jit](const ir::Kernel &k, int lanes, std::string &error) { return jit->compile(k, lanes, error); };
  }
  RunOutcome outcome = runModel(model, params, compile);
  if (compile && !outcome.native) {
    std::fprintf(stderr, "saltpan: internal error: the JIT failed: %s\n", outcome.compileError.c_str());
    return InternalFault;
  }
  const SimulationFailure &failure = outcome.failure;
  const SimulationStats &stats = outcome.stats;
  Trace &trace = outcome.trace;
  if (failure.failed) {
    std::fprintf(stderr, "saltpan: error: the simulation failed at t = %.6g ms: '%s' %s\n", failure.time * 1e3,
                 failure.variable.c_str(), failure.reason.c_str());
    if (!o.keepPartial) {
      std::fprintf(stderr, "note: no output was written (--keep-partial keeps what was recorded)\n");
      return BadInput;
    }
    // Named so that it cannot be taken for a finished run's output.
    std::filesystem::path out(o.output);
    std::string partial = (out.parent_path() / (out.stem().string() + ".partial" + out.extension().string())).string();
    std::string text = isJsonPath(o.output) ? traceJson(trace, model, c.modelHash(), SALTPAN_VERSION) : traceCsv(trace);
    std::string error;
    if (!writeFileAtomically(partial, text, error)) {
      std::fprintf(stderr, "saltpan: %s\n", error.c_str());
      return CannotWrite;
    }
    std::fprintf(stderr, "note: %zu samples up to the failure written to %s; %s was not written\n", trace.time.size(),
                 partial.c_str(), o.output.c_str());
    return BadInput;
  }
  std::string text = isJsonPath(o.output) ? traceJson(trace, model, c.modelHash(), SALTPAN_VERSION) : traceCsv(trace);
  if (o.output.empty()) {
    std::fputs(text.c_str(), stdout);
  } else {
    std::string error;
    if (!writeFileAtomically(o.output, text, error)) {
      std::fprintf(stderr, "saltpan: %s\n", error.c_str());
      return CannotWrite;
    }
  }
  if (!o.plot.empty()) {
    std::string error;
    if (!writeFileAtomically(
            o.plot, plotSvg(trace, (model.name.empty() ? "" : model.name + ": ") + model.protocol.name), error)) {
      std::fprintf(stderr, "saltpan: %s\n", error.c_str());
      return CannotWrite;
    }
  }
  std::fprintf(stderr, "ran %s: %s, step %g ms, %g ms simulated, %ld steps; compile %.1f ms, simulate %.1f ms\n",
               model.protocol.name.c_str(), ir::methodName(model.protocol.method), model.protocol.step * 1e3,
               model.protocol.duration * 1e3, stats.steps, outcome.compileMs, outcome.simulateMs);
  if (!std::isnan(stats.chargeBalanceError))
    std::fprintf(stderr, "charge balance: membrane charge and dynamic ion charge agree to %.3g (relative)\n",
                 stats.chargeBalanceError);
  for (size_t col = 0; col < trace.columns(); ++col) {
    if (trace.units[col] != "mV" || trace.names[col].find(".reversal") != std::string::npos)
      continue;
    std::vector<double> values;
    for (size_t r = 0; r < trace.time.size(); ++r)
      values.push_back(trace.at(r, col) * 1e-3);
    // A clamped potential follows its command: crossings of the threshold are not spikes.
    bool clamped = std::any_of(model.compartments.begin(), model.compartments.end(), [&](const ir::Compartment &k) {
      return k.clampedOutput >= 0 && trace.names[col] == k.name + ".V";
    });
    if (clamped) {
      std::fprintf(stderr, "%s: under voltage clamp", trace.names[col].c_str());
    } else {
      auto spikes = measures::spikeTimes(trace.time, values, o.threshold);
      auto rate = measures::firingRate(spikes);
      std::fprintf(stderr, "%s: %zu spike%s above %g mV", trace.names[col].c_str(), spikes.size(),
                   spikes.size() == 1 ? "" : "s", o.threshold * 1e3);
      if (!spikes.empty())
        std::fprintf(stderr, ", first at %.4f ms", spikes.front() * 1e3);
      if (rate)
        std::fprintf(stderr, ", %.3f Hz", *rate);
    }
    std::fprintf(stderr, "; peak %.3f mV, minimum %.3f mV, mean %.3f mV, final %.3f mV\n", measures::peak(values) * 1e3,
                 measures::minimum(values) * 1e3, measures::mean(trace.time, values) * 1e3,
                 values.empty() ? NAN : values.back() * 1e3);
  }
  return Ok;
}

} // namespace saltpan::cli
