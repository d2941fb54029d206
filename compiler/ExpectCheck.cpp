// ExpectCheck.cpp - Stage 11, checking half: the table of measures, and checkExpectations, which
// validates every expectation (a known measure, arguments of the right kind, values in its dimension).
#include "ExpectInternal.h"

#include "Diagnostics.h"
#include "Pipeline.h"
#include "Places.h"

#include <string>

namespace saltpan {

using namespace ast;

std::vector<const ExpectDecl *> expectations(const Program &program) {
  std::vector<const ExpectDecl *> out;
  for (auto &m : program.modules)
    for (auto &d : m->decls)
      if (auto *e = dyn_cast<ExpectDecl>(d.get()))
        out.push_back(e);
  return out;
}

namespace {

Dimension namedDimension(const std::string &name) {
  if (name == "voltage")
    return dims::voltage();
  if (name == "area")
    return dims::area();
  if (name == "rate")
    return dims::rate();
  if (name == "time")
    return dims::time();
  if (name == "resistance")
    return dims::voltage() / dims::current();
  if (name == "velocity")
    return dims::length() / dims::time();
  return Dimension::none();
}

} // namespace

namespace expectation {

const std::vector<MeasureSpec> &measureSpecs() {
  static const std::vector<MeasureSpec> specs = {
      {"reversal",
       false,
       {Arg::Ion, Arg::Compartment},
       2,
       "voltage",
       "the Nernst potential of an ion in a compartment"},
      {"ghk_rest", false, {Arg::Compartment}, 1, "voltage", "the GHK resting potential of a compartment"},
      {"area", false, {Arg::Compartment}, 1, "area", "the membrane area of a compartment"},
      {"net_charge", false, {Arg::Pump}, 1, "none", "the elementary charges a pump moves out per cycle"},
      {"rest", false, {Arg::Compartment}, 1, "voltage", "the compartment's one stable steady state"},
      {"input_resistance", false, {Arg::Compartment}, 1, "resistance", "the input resistance at rest"},
      {"spike_count", true, {Arg::Trace, Arg::Threshold}, 1, "none", "upward crossings of a threshold (0 mV)"},
      {"firing_rate", true, {Arg::Trace, Arg::Threshold}, 1, "rate", "spikes per second, first to last spike"},
      {"first_spike", true, {Arg::Trace, Arg::Threshold}, 1, "time", "the time of the first spike"},
      {"last_interval", true, {Arg::Trace, Arg::Threshold}, 1, "time", "the last interspike interval"},
      {"conduction_velocity",
       true,
       {Arg::Trace, Arg::Trace, Arg::Threshold},
       2,
       "velocity",
       "path distance between two places over the difference of their first spikes"},
      {"peak", true, {Arg::Trace}, 1, "trace", "the largest recorded value"},
      {"minimum", true, {Arg::Trace}, 1, "trace", "the smallest recorded value"},
      {"mean", true, {Arg::Trace}, 1, "trace", "the time-weighted mean"},
      {"final", true, {Arg::Trace}, 1, "trace", "the value at the end of the run"},
      {"value", true, {Arg::Trace, Arg::Time}, 2, "trace", "the value at a time (linear interpolation)"},
      {"snapshot_max_error",
       true,
       {Arg::Trace, Arg::File},
       2,
       "trace",
       "the largest difference from a snapshot's column (saltpan snapshot)"},
      {"snapshot_rms_error",
       true,
       {Arg::Trace, Arg::File},
       2,
       "trace",
       "the root-mean-square difference from a snapshot's column"},
  };
  return specs;
}

const MeasureSpec *findMeasure(const std::string &name) {
  for (const MeasureSpec &m : measureSpecs())
    if (name == m.name)
      return &m;
  return nullptr;
}

// What Analyze computed for the compartment an argument names, or nullptr when it names none.
const CompartmentValues *compartmentOf(const AnalyzedModel &m, const ExpectArg &a) {
  const auto *decl = dyn_cast<CompartmentDecl>(a.target);
  for (const CompartmentValues &c : m.compartments)
    if (decl && c.decl == decl)
      return &c;
  return nullptr;
}

const ir::Model *loweredFor(const Compilation &c, const ProtocolDecl *p) {
  auto it = c.lowered.find(p);
  return it == c.lowered.end() ? nullptr : &it->second;
}

// The dimension a measure's value has, or nullopt when it cannot be known (reported).
std::optional<Dimension> measureDimension(const Compilation &c, const ExpectDecl &e, const MeasureSpec &spec) {
  if (std::string(spec.dimension) != "trace")
    return namedDimension(spec.dimension);
  const ir::Model *m = e.target ? loweredFor(c, e.target) : nullptr;
  if (!m || e.args.empty())
    return std::nullopt;
  int r = m->findProbe(probeAtPlace(c.model, e.args[0].path, e.args[0].position));
  if (r < 0)
    return std::nullopt;
  return unitDimension(m->probes[r].unit);
}

} // namespace expectation

namespace {

using namespace expectation;

class Validator {
public:
  Validator(Compilation &c, DiagnosticEngine &diags) : c_(c), diags_(diags) {}

  void check(const ExpectDecl &e) {
    const MeasureSpec *spec = findMeasure(e.measure);
    if (!spec) {
      auto &d = diags_.error(e.measureRange, "unknown measure '" + e.measure + "'");
      std::string names;
      for (const MeasureSpec &m : measureSpecs())
        names += (names.empty() ? "" : ", ") + std::string(m.name);
      DiagnosticEngine::note(d, {}, "the measures are " + names);
      return;
    }
    if (spec->protocol && e.protocol.empty()) {
      auto &d = diags_.error(e.measureRange, "'" + e.measure + "' is measured on a protocol's run");
      DiagnosticEngine::note(d, {}, "name the protocol: expect PROTOCOL: " + e.measure + "(...) ...");
      return;
    }
    if (!spec->protocol && !e.protocol.empty()) {
      diags_.error(e.protocolRange, "'" + e.measure + "' is a property of the model, not of a protocol's run");
      return;
    }
    if (!e.protocol.empty() && !e.target)
      return; // Resolve reported it
    if (e.args.size() < spec->required || e.args.size() > spec->args.size()) {
      diags_.error(e.measureRange,
                   "'" + e.measure + "' takes " +
                       (spec->required == spec->args.size()
                            ? std::to_string(spec->required)
                            : std::to_string(spec->required) + " or " + std::to_string(spec->args.size())) +
                       " argument" + (spec->args.size() == 1 ? "" : "s") + ", not " + std::to_string(e.args.size()));
      return;
    }
    bool ok = true;
    for (size_t i = 0; i < e.args.size(); ++i)
      ok = argument(e, spec->args[i], e.args[i]) && ok;
    if (ok && e.measure == std::string("conduction_velocity"))
      ok = twoPlaces(e);
    if (!ok)
      return;
    auto dim = measureDimension(c_, e, *spec);
    if (!dim)
      return;
    expectDimension(e.value.get(), *dim, "the expected value");
    expectDimension(e.high.get(), *dim, "the upper end of the range");
    if (e.tolerance)
      expectDimension(e.tolerance.get(), e.relative ? Dimension::none() : *dim, "the tolerance");
  }

private:
  Compilation &c_;
  DiagnosticEngine &diags_;

  bool argument(const ExpectDecl &e, Arg kind, const ExpectArg &a) {
    auto needPath = [&](const char *what) {
      if (a.path.empty()) {
        diags_.error(a.range, std::string("expected ") + what + " here");
        return false;
      }
      return true;
    };
    switch (kind) {
    case Arg::Ion: {
      if (!needPath("an ion"))
        return false;
      if (!isa<IonDecl>(a.target)) {
        diags_.error(a.range, "'" + a.path + "' is not an ion");
        return false;
      }
      return true;
    }
    case Arg::Compartment:
      if (!needPath("a compartment"))
        return false;
      if (!compartmentOf(c_.model, a)) {
        diags_.error(a.range, "there is no compartment '" + a.path + "'");
        return false;
      }
      return true;
    case Arg::Pump: {
      if (!needPath("a pump"))
        return false;
      if (!isa<PumpDecl>(a.target)) {
        diags_.error(a.range, "'" + a.path + "' is not a pump or exchanger");
        return false;
      }
      return true;
    }
    case Arg::Trace: {
      if (!needPath("a recorded quantity such as soma.V") || !place(a))
        return false;
      const ir::Model *m = loweredFor(c_, e.target);
      if (m && m->findProbe(probeAtPlace(c_.model, a.path, a.position)) < 0) {
        auto &d = diags_.error(a.range, "protocol '" + e.protocol + "' has nothing called '" + a.path + "' to measure");
        DiagnosticEngine::note(d, {}, "`saltpan check --emit ir FILE` lists the probes (recorded quantities)");
        return false;
      }
      return true;
    }
    case Arg::File:
      if (!a.isString) {
        diags_.error(a.range, "expected a snapshot file name in quotes here");
        return false;
      }
      return true;
    case Arg::Threshold: return valueArgument(a, dims::voltage(), "a threshold");
    case Arg::Time: return valueArgument(a, dims::time(), "a time");
    }
    return true;
  }

  // A quantity of a cable is measured at a place along it, as it is recorded.
  bool place(const ExpectArg &a) {
    const CableValues *cable = cableOfPath(c_.model, a.path);
    if (!cable || a.position)
      return !cable || !probeAtPlace(c_.model, a.path, a.position).empty() || placeOutside(a.position, *cable);
    auto &d = diags_.error(a.range, "'" + cable->decl->name + "' is a cable: say where along it to measure");
    DiagnosticEngine::note(d, {}, placeExample(a.path));
    return false;
  }
  bool placeOutside(const Position &at, const CableValues &cable) {
    auto &d = diags_.error(at.range, placeOutsideMessage(cable));
    DiagnosticEngine::note(d, {}, placeRangeNote);
    return false;
  }

  // conduction_velocity: two places joined along the tree, in different pieces.
  bool twoPlaces(const ExpectDecl &e) {
    auto a = compartmentIndex(c_.model, probeAtPlace(c_.model, e.args[0].path, e.args[0].position));
    auto b = compartmentIndex(c_.model, probeAtPlace(c_.model, e.args[1].path, e.args[1].position));
    if (!a || !b)
      return true; // a probe of no compartment: nothing to say here beyond the probe checks
    if (*a == *b) {
      diags_.error(e.args[1].range, "both places fall in the same piece '" + c_.model.compartments[*a].name +
                                        "': no distance between them to travel");
      return false;
    }
    if (!pathDistance(c_.model, *a, *b)) {
      diags_.error(e.args[1].range, "'" + c_.model.compartments[*a].name + "' and '" + c_.model.compartments[*b].name +
                                        "' are not joined: no path between them");
      return false;
    }
    return true;
  }

  bool valueArgument(const ExpectArg &a, const Dimension &d, const char *what) {
    if (!a.value) {
      diags_.error(a.range, std::string("expected ") + what + " (" + describeDimension(d) + ") here");
      return false;
    }
    if (a.value->type.known && a.value->type.dim != d) {
      diags_.error(a.value->range, std::string(what) + " must be " + describeDimension(d) + ", got " +
                                       describeDimension(a.value->type.dim));
      return false;
    }
    return true;
  }

  void expectDimension(const Expr *e, const Dimension &d, const char *what) {
    if (e && e->type.known && e->type.dim != d)
      diags_.error(e->range,
                   std::string(what) + " must be " + describeDimension(d) + ", got " + describeDimension(e->type.dim));
  }
};

} // namespace

using namespace expectation;

std::optional<Dimension> measuredDimension(const Compilation &c, const ExpectDecl &e) {
  const MeasureSpec *spec = findMeasure(e.measure);
  return spec ? measureDimension(c, e, *spec) : std::nullopt;
}

DisplayUnit measuredUnit(const Compilation &c, const ExpectDecl &e) {
  const MeasureSpec *spec = findMeasure(e.measure);
  if (spec && std::string(spec->dimension) == "velocity")
    return {"m/s", 1};
  return displayUnit(measuredDimension(c, e).value_or(Dimension::none()));
}

bool measuredOnRun(const ExpectDecl &e) {
  const MeasureSpec *spec = findMeasure(e.measure);
  return spec && spec->protocol;
}

MeasureArgs measureArgs(Compilation &c, const ExpectDecl &e) {
  MeasureArgs args;
  for (const ExpectArg &a : e.args) {
    if (a.value && std::isnan(args.value))
      args.value = c.evaluator.evaluate(*a.value, {}).value_or(NAN);
    else if (!a.path.empty() && !a.isString)
      args.traces.push_back(probeAtPlace(c.model, a.path, a.position));
  }
  if (e.measure == "conduction_velocity" && args.traces.size() == 2) {
    auto a = compartmentIndex(c.model, args.traces[0]), b = compartmentIndex(c.model, args.traces[1]);
    if (a && b)
      args.distance = pathDistance(c.model, *a, *b).value_or(NAN);
  }
  return args;
}

bool checkMeasure(Compilation &c, const ExpectDecl &e, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  Validator(c, diags).check(e);
  return diags.errorCount() == before;
}

bool checkExpectations(Compilation &c, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  Validator v(c, diags);
  for (const ExpectDecl *e : expectations(c.program))
    v.check(*e);
  return diags.errorCount() == before;
}

} // namespace saltpan
