// Standalone.cpp - main() of the executables `saltpan build` writes: runs one of the compiled-in
// protocols with the options of `saltpan run` and writes the same CSV or JSON bytes, or with
// `sweep` first, one of the compiled-in sweeps (StandaloneSweep.cpp).
#include "Options.h"
#include "Run.h"
#include "RunSettings.h"
#include "StandaloneMain.h"
#include "StandaloneModel.h"
#include "TraceOutput.h"

#include <cmath>
#include <cstdio>
#include <exception>
#include <string>
#include <vector>

namespace saltpan::standalone {

int usage(const std::string &program, const std::string &message, const std::string &hint) {
  std::fprintf(stderr, "%s: error: %s\n%s\n", program.c_str(), message.c_str(), hint.c_str());
  return BadUsage;
}

} // namespace saltpan::standalone

namespace {

using namespace saltpan;
using namespace saltpan::standalone;

std::string program = "model"; // argv[0] without its directory, for messages

std::string helpText(const ModelBundle &b) {
  const ir::Model &first = b.protocols.front();
  std::string text = "usage: " + program + " [options]\n       " + program + " sweep [sweep options]\n\n";
  text += "Runs the model '" + first.name + "' from " + b.source + "\n(" + b.modelHash + "),\ncompiled by saltpan " +
          b.toolVersion +
          " to native code for the CPU it was built on, and writes the recorded\n"
          "quantities: time first, units in the header. The options are those of `saltpan run`, and the\n"
          "output is byte for byte what `saltpan run` writes for the same options.\n"
          "Conventions: V is inside minus outside; membrane current is positive outward; injected\n"
          "current is positive into the cell.\n"
          "With `sweep` first it runs one of the sweeps below instead and writes what\n"
          "`saltpan sweep --engine scalar` writes; `" +
          program +
          " sweep --help` lists its options.\n\n"
          "options:\n"
          "  --protocol NAME      the protocol to run (default: the only one; needed when there are several)\n"
          "  --set NAME=VALUE     override a parameter with a unit, e.g. --set NAME=\"100 mS/cm2\" (repeatable)\n"
          "  --duration T         override the protocol's duration, e.g. 50ms or \"50 ms\"\n"
          "  --every T            override the recording interval\n"
          "  -o FILE              write FILE (.csv or .json) atomically instead of CSV on standard output\n"
          "  --version            print the version\n"
          "  --help               show this help\n\n"
          "protocols:\n";
  char line[256];
  for (const ir::Model &m : b.protocols) {
    std::snprintf(line, sizeof line, "  %-20s %s, step %g ms, %g ms, recorded every %g ms\n", m.protocol.name.c_str(),
                  ir::methodName(m.protocol.method), m.protocol.step * 1e3, m.protocol.duration * 1e3,
                  m.protocol.every * 1e3);
    text += line;
  }
  text += "\nparameters (--set takes any unit of the same dimension):\n";
  for (size_t i = 0; i < first.paramNames.size(); ++i) {
    // The value in the unit the description names ("a voltage (mV)"), so label and number agree.
    std::string what = describeDimension(first.paramDims[i]);
    std::string unit;
    double value = first.params[i];
    if (size_t open = what.rfind('('); open != std::string::npos && what.back() == ')') {
      unit = what.substr(open + 1, what.size() - open - 2);
      auto scale = parseQuantity("1 " + unit);
      if (scale && scale->second == first.paramDims[i] && scale->first != 0)
        value /= scale->first;
      else
        unit = "(SI)";
    }
    std::snprintf(line, sizeof line, "  %-44s %-10.6g %-9s %s\n", first.paramNames[i].c_str(), value, unit.c_str(),
                  what.c_str());
    text += line;
  }
  text += "\n" + sweepList(b);
  text += "\nexit status: 0 success, 64 bad usage, 65 the simulation failed, 70 internal fault,\n"
          "             73 the output file could not be written or is this program\n\n"
          "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.\n";
  return text;
}

int usage(const std::string &message) {
  return standalone::usage(program, message, "run '" + program + " --help' for the options, protocols and parameters");
}

int run(const std::vector<std::string> &args) {
  ModelBundle bundle;
  std::string error;
  if (!loadEmbeddedBundle(bundle, error) || bundle.protocols.empty()) {
    std::fprintf(stderr, "%s: internal error: %s\n", program.c_str(), error.empty() ? "no protocol" : error.c_str());
    return InternalFault;
  }
  if (!args.empty() && args[0] == "sweep")
    return sweepMode(bundle, std::vector<std::string>(args.begin() + 1, args.end()), program);
  RunArguments o;
  // The options of `saltpan run` that a built executable has; a missing value is named.
  OptionParser parser(OptionParser::MissingValue::NeedsAValue);
  parser.stop({"--help", "-h"}, [&] {
    std::fputs(helpText(bundle).c_str(), stdout);
    return Ok;
  });
  parser.stop({"--version"}, [&] {
    std::printf("%s: model %s (%s), built by saltpan %s\n", program.c_str(), bundle.protocols.front().name.c_str(),
                bundle.modelHash.c_str(), bundle.toolVersion.c_str());
    return Ok;
  });
  addRunOptions(parser, o);
  if (auto code = parser.parse(args, [](const std::string &message) { return usage(message); }))
    return *code;

  if (std::string clash = findOutputClash({{"-o", o.output}}, {{"this program", "/proc/self/exe"}});
      !o.output.empty() && !clash.empty()) {
    std::fprintf(stderr, "%s: error: %s\n", program.c_str(), clash.c_str());
    return CannotWrite;
  }

  const ir::Model *chosen = nullptr;
  if (!o.protocol.empty()) {
    std::string names;
    for (const ir::Model &m : bundle.protocols) {
      names += (names.empty() ? "" : ", ") + m.protocol.name;
      if (m.protocol.name == o.protocol)
        chosen = &m;
    }
    if (!chosen)
      return usage("there is no protocol '" + o.protocol + "'; the model has " + names);
  } else if (bundle.protocols.size() == 1) {
    chosen = &bundle.protocols.front();
  } else {
    return usage("the model has " + std::to_string(bundle.protocols.size()) + " protocols; choose one with --protocol");
  }
  ir::Model model = *chosen;
  std::vector<double> params = model.params;
  for (const std::string &s : o.sets)
    if (!applyParameterSetting(model, s, params, "`" + program + " --help` lists them", error))
      return usage(error);
  if (!applyTiming(model.protocol, o.duration, o.every, error))
    return usage(error);

  // runModel fuses and picks kernels exactly as for `saltpan run`; each one it asks for is
  // found among the compiled-in kernels by fingerprint.
  KernelCompiler compile = embeddedKernel;
  RunOutcome outcome = runModel(model, params, compile);
  if (!outcome.native) {
    std::fprintf(stderr, "%s: internal error: %s\n", program.c_str(), outcome.compileError.c_str());
    return InternalFault;
  }
  if (outcome.failure.failed) {
    std::fprintf(stderr, "%s: error: the simulation failed at t = %.6g ms: '%s' %s\nnote: no output was written\n",
                 program.c_str(), outcome.failure.time * 1e3, outcome.failure.variable.c_str(),
                 outcome.failure.reason.c_str());
    return BadInput;
  }
  std::string text = isJsonPath(o.output) ? traceJson(outcome.trace, model, bundle.modelHash, bundle.toolVersion)
                                          : traceCsv(outcome.trace);
  if (o.output.empty()) {
    std::fputs(text.c_str(), stdout);
  } else if (!writeFileAtomically(o.output, text, error)) {
    std::fprintf(stderr, "%s: error: %s\n", program.c_str(), error.c_str());
    return CannotWrite;
  }
  std::fprintf(stderr, "ran %s: %s, step %g ms, %g ms simulated, %ld steps; simulate %.1f ms\n",
               model.protocol.name.c_str(), ir::methodName(model.protocol.method), model.protocol.step * 1e3,
               model.protocol.duration * 1e3, outcome.stats.steps, outcome.simulateMs);
  return Ok;
}

} // namespace

int main(int argc, char **argv) {
  if (argc > 0 && argv[0]) {
    program = argv[0];
    program = program.substr(program.find_last_of('/') + 1);
  }
  try {
    return run(std::vector<std::string>(argv + 1, argv + argc));
  } catch (const std::exception &e) {
    std::fprintf(stderr, "%s: internal error: %s\n", program.c_str(), e.what());
  } catch (...) {
    std::fprintf(stderr, "%s: internal error\n", program.c_str());
  }
  return InternalFault;
}
