// RunCommand.cpp - `brine run`: lower a checked spec for one protocol, compile its kernel
// (JIT, or the reference interpreter), simulate, and write the recorded traces.
#include "Commands.h"

#include "ModelHash.h"
#include "Run.h"
#include "Lower.h"
#include "Measures.h"
#include "Pipeline.h"
#include "Plot.h"
#include "Simulate.h"
#ifdef BRINE_HAVE_JIT
#include "JIT.h"
#endif

#include <chrono>
#include <cmath>
#include <cstdio>
#include <nlohmann/json.hpp>

#ifndef BRINE_VERSION
#define BRINE_VERSION "unknown"
#endif

namespace brine::cli {

namespace {

const char *runHelp = R"(usage: brine run [options] FILE

Checks FILE, lowers it for one protocol, compiles the model to native code and simulates
it, then writes the recorded quantities. Time is the first column; units are in the header.
Conventions: V is inside minus outside; membrane current is positive outward; injected
current is positive into the cell.

options:
  --protocol NAME      the protocol to run (default: the only one; needed when there are several)
  --set NAME=VALUE     override a parameter, e.g. --set axon.SquidSodium1952.density="100 mS/cm2"
                       (repeatable; `brine check --emit ir FILE` lists the parameters)
  --duration T         override the protocol's duration, e.g. 50ms or "50 ms"
  --every T            override the recording interval
  --engine jit|interpreter   native code (default) or the reference interpreter
  --threshold V        spike threshold for the summary (default 0 mV)
  -o FILE              write FILE (.csv or .json) atomically instead of CSV on standard output
  --plot FILE          also draw the recorded quantities as an SVG figure in FILE
  --version            print the version
  --help               show this help

exit status: 0 success, 64 bad usage, 65 the spec has errors or the simulation failed,
             70 internal fault, 73 the output file could not be written

brine is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

// "100 mS/cm2", "50ms", "-20 mV" -> SI value and dimension.
std::optional<std::pair<double, Dimension>> parseQuantity(const std::string &text) {
  const char *begin = text.c_str();
  char *end = nullptr;
  double number = std::strtod(begin, &end);
  if (end == begin || !std::isfinite(number))
    return std::nullopt;
  std::string unit(end);
  unit.erase(0, unit.find_first_not_of(' '));
  while (!unit.empty() && unit.back() == ' ')
    unit.pop_back();
  Unit total;
  bool divide = false;
  size_t i = 0;
  if (!unit.empty() && unit[0] == '/') {
    divide = true;
    i = 1;
  }
  while (i < unit.size()) {
    size_t j = unit.find_first_of("*/", i);
    std::string factor = unit.substr(i, j == std::string::npos ? std::string::npos : j - i);
    int power = 1;
    if (size_t caret = factor.find('^'); caret != std::string::npos) {
      power = std::atoi(factor.c_str() + caret + 1);
      factor = factor.substr(0, caret);
    }
    auto found = lookupUnitSymbol(factor);
    if (!found || found->celsius || power == 0)
      return std::nullopt;
    Unit u = found->unit.pow(power);
    total = divide ? total / u : total * u;
    if (j == std::string::npos)
      break;
    divide = unit[j] == '/';
    i = j + 1;
  }
  return std::make_pair(number * total.scale, total.dim);
}

struct RunOptions {
  std::string file, protocol, output, engine = "jit";
  std::string plot;
  std::vector<std::string> sets;
  std::string duration, every;
  double threshold = 0;
};

int usage(const std::string &message) {
  std::fprintf(stderr, "brine: %s\n\n%s", message.c_str(), runHelp);
  return Usage;
}

std::string csv(const Trace &trace) {
  std::string out = "time (ms)";
  for (size_t c = 0; c < trace.columns(); ++c)
    out += "," + trace.names[c] + " (" + trace.units[c] + ")";
  out += "\n";
  char buf[40];
  for (size_t r = 0; r < trace.time.size(); ++r) {
    std::snprintf(buf, sizeof buf, "%.10g", trace.time[r] * 1e3);
    out += buf;
    for (size_t c = 0; c < trace.columns(); ++c) {
      std::snprintf(buf, sizeof buf, ",%.12g", trace.at(r, c));
      out += buf;
    }
    out += "\n";
  }
  return out;
}

std::string json(const Trace &trace, const ir::Model &model, const std::string &hash) {
  nlohmann::ordered_json doc;
  doc["tool"] = "brine";
  doc["version"] = BRINE_VERSION;
  doc["model_hash"] = hash;
  doc["caution"] = "brine is a research modelling tool; it is not for clinical or diagnostic decisions";
  doc["model"] = model.name;
  doc["protocol"] = model.protocol.name;
  doc["method"] = ir::methodName(model.protocol.method);
  doc["step_ms"] = model.protocol.step * 1e3;
  doc["conventions"] = {{"membrane_potential", "inside minus outside"},
                        {"membrane_current", "positive outward"},
                        {"injected_current", "positive into the cell"}};
  std::vector<double> ms;
  for (double t : trace.time)
    ms.push_back(t * 1e3);
  doc["time_ms"] = ms;
  nlohmann::ordered_json columns = nlohmann::ordered_json::array();
  for (size_t c = 0; c < trace.columns(); ++c) {
    std::vector<double> values;
    for (size_t r = 0; r < trace.time.size(); ++r)
      values.push_back(trace.at(r, c));
    columns.push_back({{"name", trace.names[c]}, {"unit", trace.units[c]}, {"values", values}});
  }
  doc["columns"] = columns;
  return doc.dump(1) + "\n";
}

} // namespace

int runCommand(const std::vector<std::string> &args) {
  RunOptions o;
  for (size_t i = 0; i < args.size(); ++i) {
    const std::string &a = args[i];
    auto value = [&](const std::string &name, std::string &into) { return optionValue(args, i, name, into); };
    std::string v;
    if (a == "--help" || a == "-h") {
      std::fputs(runHelp, stdout);
      return Ok;
    } else if (a == "--version") {
      std::printf("brine %s\n", BRINE_VERSION);
      return Ok;
    } else if (value("--protocol", o.protocol) || value("-o", o.output) || value("--plot", o.plot) ||
               value("--duration", o.duration) || value("--every", o.every)) {
    } else if (value("--engine", o.engine)) {
      if (o.engine != "jit" && o.engine != "interpreter")
        return usage("--engine must be 'jit' or 'interpreter'");
    } else if (value("--set", v)) {
      o.sets.push_back(v);
    } else if (value("--threshold", v)) {
      auto q = parseQuantity(v);
      if (!q || q->second != dims::voltage())
        return usage("--threshold needs a voltage, e.g. 0mV");
      o.threshold = q->first;
    } else if (a.size() > 1 && a[0] == '-') {
      return usage("unknown option '" + a + "'");
    } else if (o.file.empty()) {
      o.file = a;
    } else {
      return usage("run takes one spec file");
    }
  }
  if (o.file.empty())
    return usage("no spec file given");

  Compilation c;
  compileFile(o.file, c);
  for (const Diagnostic &d : c.diags.all())
    std::fputs(renderText(d).c_str(), stderr);
  if (c.diags.errorCount() > 0)
    return SpecErrors;
  auto all = protocols(c.program);
  const ast::ProtocolDecl *protocol = nullptr;
  if (!o.protocol.empty()) {
    for (auto *p : all)
      if (p->name == o.protocol)
        protocol = p;
    if (!protocol) {
      std::string names;
      for (auto *p : all)
        names += (names.empty() ? "" : ", ") + p->name;
      std::fprintf(stderr, "brine: error: there is no protocol '%s' in '%s'%s%s\n", o.protocol.c_str(),
                   o.file.c_str(), names.empty() ? "" : "; it has ", names.c_str());
      return Usage;
    }
  } else if (all.size() == 1) {
    protocol = all.front();
  } else if (all.size() > 1) {
    std::fprintf(stderr, "brine: error: '%s' has %zu protocols; choose one with --protocol\n", o.file.c_str(),
                 all.size());
    return Usage;
  } else {
    std::fprintf(stderr, "brine: error: '%s' has no protocol to run\n", o.file.c_str());
    return Usage;
  }
  ir::Model model;
  if (!lowerModel(c.program, c.model, c.evaluator, protocol, c.diags, model)) {
    for (const Diagnostic &d : c.diags.all())
      std::fputs(renderText(d).c_str(), stderr);
    return SpecErrors;
  }
  std::vector<double> params = model.params;
  for (const std::string &s : o.sets) {
    size_t eq = s.find('=');
    if (eq == std::string::npos)
      return usage("--set needs NAME=VALUE, not '" + s + "'");
    std::string name = s.substr(0, eq);
    int index = model.findParam(name);
    if (index < 0)
      return usage("there is no parameter '" + name + "'; `brine check --emit ir " + o.file + "` lists them");
    auto q = parseQuantity(s.substr(eq + 1));
    if (!q)
      return usage("cannot read the value in '" + s + "'; write a number and a unit, e.g. 100 mS/cm2");
    if (q->second != model.paramDims[index])
      return usage("'" + name + "' must be " + describeDimension(model.paramDims[index]) + ", got " +
                   describeDimension(q->second));
    params[index] = q->first;
  }
  auto override = [&](const std::string &text, double &into, const char *what) -> bool {
    if (text.empty())
      return true;
    auto q = parseQuantity(text);
    if (!q || q->second != dims::time() || q->first <= 0) {
      usage(std::string(what) + " needs a positive time, e.g. 50ms");
      return false;
    }
    into = q->first;
    return true;
  };
  if (!override(o.duration, model.protocol.duration, "--duration") ||
      !override(o.every, model.protocol.every, "--every"))
    return Usage;
  if (model.protocol.method != ir::Method::DormandPrince && model.protocol.method != ir::Method::Rosenbrock) {
    double ratio = model.protocol.every / model.protocol.step;
    if (std::fabs(ratio - std::round(ratio)) > 1e-9 * ratio || ratio < 0.5)
      return usage("the recording interval must be a whole number of steps");
  }

  KernelCompiler compile;
#ifdef BRINE_HAVE_JIT
  std::unique_ptr<JIT> jit;
  std::string jitError;
  if (o.engine == "jit") {
    jit = JIT::create(jitError);
    if (!jit) {
      std::fprintf(stderr, "brine: internal error: the JIT failed: %s\n", jitError.c_str());
      return Internal;
    }
    compile = [&jit](const ir::Kernel &k, std::string &error) { return jit->compile(k, error); };
  }
#else
  if (o.engine == "jit")
    std::fprintf(stderr, "brine: note: this build has no JIT; using the reference interpreter\n");
#endif
  RunOutcome outcome = runModel(model, params, compile);
  if (compile && !outcome.native) {
    std::fprintf(stderr, "brine: internal error: the JIT failed: %s\n", outcome.compileError.c_str());
    return Internal;
  }
  const SimulationFailure &failure = outcome.failure;
  const SimulationStats &stats = outcome.stats;
  Trace &trace = outcome.trace;
  if (failure.failed) {
    std::fprintf(stderr, "brine: error: the simulation failed at t = %.6g ms: '%s' %s\n", failure.time * 1e3,
                 failure.variable.c_str(), failure.reason.c_str());
    std::fprintf(stderr, "note: no output was written\n");
    return SpecErrors;
  }
  std::string text = o.output.size() > 5 && o.output.substr(o.output.size() - 5) == ".json" ? json(trace, model, modelHash(c.program))
                                                                                              : csv(trace);
  if (o.output.empty()) {
    std::fputs(text.c_str(), stdout);
  } else {
    std::string error;
    if (!writeFileAtomically(o.output, text, error)) {
      std::fprintf(stderr, "brine: %s\n", error.c_str());
      return CannotWrite;
    }
  }
  if (!o.plot.empty()) {
    std::string error;
    if (!writeFileAtomically(o.plot, plotSvg(trace, model.name + ": " + model.protocol.name), error)) {
      std::fprintf(stderr, "brine: %s\n", error.c_str());
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
    auto spikes = measures::spikeTimes(trace.time, values, o.threshold);
    auto rate = measures::firingRate(spikes);
    std::fprintf(stderr, "%s: %zu spike%s above %g mV", trace.names[col].c_str(), spikes.size(),
                 spikes.size() == 1 ? "" : "s", o.threshold * 1e3);
    if (!spikes.empty())
      std::fprintf(stderr, ", first at %.4f ms", spikes.front() * 1e3);
    if (rate)
      std::fprintf(stderr, ", %.3f Hz", *rate);
    std::fprintf(stderr, "; peak %.3f mV, minimum %.3f mV, mean %.3f mV, final %.3f mV\n",
                 measures::peak(values) * 1e3, measures::minimum(values) * 1e3,
                 measures::mean(trace.time, values) * 1e3, values.empty() ? NAN : values.back() * 1e3);
  }
  return Ok;
}

} // namespace brine::cli
