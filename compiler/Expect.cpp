// Expect.cpp - Stage 11: validating and measuring expectations.
#include "Expect.h"

#include "Diagnostics.h"
#include "Fuse.h"
#include "Interpret.h"
#include "Measures.h"
#include "Physics.h"
#include "Pipeline.h"
#include "Rest.h"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

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

DisplayUnit displayUnit(const Dimension &d) {
  if (d == dims::voltage())
    return {"mV", 1e3};
  if (d == dims::time())
    return {"ms", 1e3};
  if (d == dims::rate())
    return {"Hz", 1};
  if (d == dims::area())
    return {"um2", 1e12};
  if (d == dims::voltage() / dims::current())
    return {"Mohm", 1e-6};
  if (d == dims::currentDensity())
    return {"uA/cm2", 100};
  if (d == dims::conductanceDensity())
    return {"mS/cm2", 0.1};
  if (d == dims::concentration())
    return {"mM", 1};
  if (d == dims::specificCapacitance())
    return {"uF/cm2", 100};
  if (d == dims::permeability())
    return {"cm/s", 100};
  if (d == Dimension::none())
    return {"", 1};
  return {formatDimension(d), 1}; // coherent SI

}

namespace {

enum class Arg { Ion, Compartment, Pump, Trace, Threshold, Time, File };

struct MeasureSpec {
  const char *name;
  bool protocol;               // measured on a protocol's run
  std::vector<Arg> args;
  size_t required;             // leading args that must be given
  const char *dimension;       // "voltage", "area", "none", "rate", "time", "resistance", or "trace"
  const char *description;
};

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

// A probe's display unit back to its dimension.
Dimension unitDimension(const std::string &unit) {
  if (unit == "mV")
    return dims::voltage();
  if (unit == "uA/cm2")
    return dims::currentDensity();
  if (unit == "mS/cm2")
    return dims::conductanceDensity();
  if (unit == "mM")
    return dims::concentration();
  return Dimension::none();
}

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
  return Dimension::none();
}

// A value in the unit modellers read for its dimension.
std::string display(double si, const Dimension &d) {
  DisplayUnit u = displayUnit(d);
  bool wide = d == dims::voltage() || d == dims::time() || d == dims::rate();
  char buf[64];
  std::snprintf(buf, sizeof buf, wide ? "%.8g" : "%.6g", si * u.scale);
  return u.name.empty() ? buf : std::string(buf) + " " + u.name;
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
  int r = m->findProbe(e.args[0].path);
  if (r < 0)
    return std::nullopt;
  return unitDimension(m->probes[r].unit);
}

// A whole cell read as a finite number ("nan", "inf", "", "1.5x" are not).
std::optional<double> finiteNumber(const std::string &cell) {
  const char *begin = cell.c_str();
  char *end = nullptr;
  double v = std::strtod(begin, &end);
  while (*end == ' ' || *end == '\r')
    ++end;
  if (end == begin || *end != '\0' || !std::isfinite(v))
    return std::nullopt;
  return v;
}

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
      diags_.error(e.measureRange, "'" + e.measure + "' takes " +
                                       (spec->required == spec->args.size()
                                            ? std::to_string(spec->required)
                                            : std::to_string(spec->required) + " or " + std::to_string(spec->args.size())) +
                                       " argument" + (spec->args.size() == 1 ? "" : "s") + ", not " +
                                       std::to_string(e.args.size()));
      return;
    }
    bool ok = true;
    for (size_t i = 0; i < e.args.size(); ++i)
      ok = argument(e, spec->args[i], e.args[i]) && ok;
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
      if (!needPath("a recorded quantity such as soma.V"))
        return false;
      const ir::Model *m = loweredFor(c_, e.target);
      if (m && m->findProbe(a.path) < 0) {
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
    case Arg::Threshold:
      return valueArgument(a, dims::voltage(), "a threshold");
    case Arg::Time:
      return valueArgument(a, dims::time(), "a time");
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
      diags_.error(e->range, std::string(what) + " must be " + describeDimension(d) + ", got " +
                                 describeDimension(e->type.dim));
  }
};

// ---- measuring ----

struct Run {
  bool ok = false;
  std::string error;
  Trace trace;
};

class Measurer {
public:
  Measurer(Compilation &c, const KernelCompiler &compile) : c_(c), compile_(compile) {}

  ExpectResult measure(const ExpectDecl &e) {
    ExpectResult r;
    r.decl = &e;
    const MeasureSpec *spec = findMeasure(e.measure);
    auto dim = spec ? measureDimension(c_, e, *spec) : std::nullopt;
    if (!spec || !dim) {
      r.measuredText = "cannot be measured";
      return r;
    }
    std::string why;
    r.measured = value(e, *spec, why);
    r.expectedText = expected(e, *dim);
    if (!r.measured) {
      r.measuredText = why;
      return r;
    }
    r.measuredText = display(*r.measured, *dim);
    r.passed = judge(e, *r.measured);
    return r;
  }

private:
  Compilation &c_;
  const KernelCompiler &compile_;
  std::map<const ProtocolDecl *, Run> runs_;
  std::optional<std::vector<rest::CompartmentRest>> rest_;
  std::string restError_;

  double eval(const Expr &e) { return c_.evaluator.evaluate(e, {}).value_or(NAN); }

  std::string expected(const ExpectDecl &e, const Dimension &d) {
    double v = e.value ? eval(*e.value) : NAN;
    switch (e.check) {
    case CheckKind::Equal:
      if (!e.tolerance)
        return display(v, d) + " exactly";
      if (e.relative)
        return display(v, d) + " within " + display(eval(*e.tolerance), Dimension::none()) + " relative";
      return display(v, d) + " within " + display(eval(*e.tolerance), d);
    case CheckKind::Range: return display(v, d) + " to " + display(eval(*e.high), d);
    case CheckKind::Less: return "< " + display(v, d);
    case CheckKind::LessEqual: return "<= " + display(v, d);
    case CheckKind::Greater: return "> " + display(v, d);
    case CheckKind::GreaterEqual: return ">= " + display(v, d);
    case CheckKind::Measured: return "";
    }
    return "";
  }

  bool judge(const ExpectDecl &e, double m) {
    double v = e.value ? eval(*e.value) : NAN;
    switch (e.check) {
    case CheckKind::Equal: {
      if (!e.tolerance)
        return m == v;
      double tol = eval(*e.tolerance);
      return std::fabs(m - v) <= (e.relative ? tol * std::fabs(v) : tol);
    }
    case CheckKind::Range: return m >= v && m <= eval(*e.high);
    case CheckKind::Less: return m < v;
    case CheckKind::LessEqual: return m <= v;
    case CheckKind::Greater: return m > v;
    case CheckKind::GreaterEqual: return m >= v;
    case CheckKind::Measured: return true;
    }
    return false;
  }

  std::optional<double> value(const ExpectDecl &e, const MeasureSpec &spec, std::string &why) {
    std::string name = spec.name;
    const AnalyzedModel &m = c_.model;
    if (name == "reversal") {
      auto *comp = compartmentOf(m, e.args[1]);
      auto *ion = dyn_cast<IonDecl>(e.args[0].target);
      auto v = comp && m.temperature ? comp->nernst(ion, *m.temperature) : std::nullopt;
      if (!v)
        why = "no concentrations of '" + e.args[0].path + "' on both sides";
      return v;
    }
    if (name == "ghk_rest" || name == "area") {
      auto *comp = compartmentOf(m, e.args[0]);
      auto v = name == "area" ? comp->area : comp->ghkRest;
      if (!v)
        why = name == "area" ? "the compartment has no geometry" : "no GHK resting potential (no ungated permeability channels)";
      return v;
    }
    if (name == "net_charge") {
      auto *pump = dyn_cast<PumpDecl>(e.args[0].target);
      auto it = m.pumps.find(pump);
      if (it == m.pumps.end() || !it->second.chargeKnown) {
        why = "the cycle's charge is unknown";
        return std::nullopt;
      }
      return static_cast<double>(it->second.netOutwardCharge);
    }
    if (name == "rest" || name == "input_resistance")
      return restValue(e.args[0].path, name == "input_resistance", why);
    return protocolValue(e, name, why);
  }

  std::optional<double> restValue(const std::string &compartment, bool resistance, std::string &why) {
    if (!rest_) {
      const ir::Model *model = c_.unstimulated();
      if (!model) {
        restError_ = "the model cannot be lowered for a steady-state search";
        rest_.emplace();
      } else {
        try {
          rest_ = rest::findSteadyStates(*model, &c_.model);
        } catch (std::exception &ex) {
          restError_ = ex.what();
          rest_.emplace();
        }
      }
    }
    if (auto v = restMeasure(*rest_, compartment, resistance, why))
      return v;
    if (!restError_.empty())
      why = restError_;
    return std::nullopt;
  }

  // Runs a protocol once, recording everything its expectations measure.
  Run &run(const ProtocolDecl *p) {
    auto found = runs_.find(p);
    if (found != runs_.end())
      return found->second;
    Run &r = runs_[p];
    const ir::Model *lowered = loweredFor(c_, p);
    if (!lowered) {
      r.error = "the protocol could not be lowered";
      return r;
    }
    ir::Model model = *lowered;
    for (const ExpectDecl *e : expectations(c_.program))
      if (e->target == p && !e->args.empty() && !e->args[0].path.empty()) {
        int index = model.findProbe(e->args[0].path);
        if (index >= 0 && std::find(model.protocol.record.begin(), model.protocol.record.end(), index) ==
                              model.protocol.record.end())
          model.protocol.record.push_back(index);
      }
    RunOutcome outcome = runModel(model, model.params, compile_);
    const SimulationFailure &failure = outcome.failure;
    r.trace = std::move(outcome.trace);
    if (failure.failed) {
      char buf[96];
      std::snprintf(buf, sizeof buf, "the run failed at %.6g ms: ", failure.time * 1e3);
      r.error = buf + failure.variable + " " + failure.reason;
      return r;
    }
    r.ok = true;
    return r;
  }

  // Compares a recorded column with the same column of a snapshot file (relative to the
  // spec's directory), sample by sample; the sample times must agree.
  std::optional<double> snapshotError(const ExpectDecl &e, const std::string &file, const Trace &t, size_t column,
                                      double scale, bool rms, std::string &why) {
    std::filesystem::path path = std::filesystem::path(e.range.begin.file->path()).parent_path() / file;
    // Opening a FIFO would block until a writer comes; a device need never end.
    std::error_code ec;
    auto status = std::filesystem::status(path, ec);
    if (!ec && status.type() != std::filesystem::file_type::regular) {
      why = "the snapshot '" + path.string() + "' is not a regular file";
      return std::nullopt;
    }
    std::ifstream in(path);
    if (!in) {
      why = "cannot read the snapshot '" + path.string() + "' (make it with `saltpan snapshot`)";
      return std::nullopt;
    }
    std::string line;
    std::vector<std::string> header;
    size_t row = 0;
    long wanted = -1;
    double worst = 0, sumSquares = 0;
    while (std::getline(in, line)) {
      if (line.empty() || line[0] == '#')
        continue;
      std::vector<std::string> cells;
      std::stringstream s(line);
      std::string cell;
      while (std::getline(s, cell, ','))
        cells.push_back(cell);
      if (header.empty()) {
        header = cells;
        for (size_t i = 0; i < header.size(); ++i)
          if (header[i].rfind(t.names[column] + " (", 0) == 0)
            wanted = static_cast<long>(i);
        if (wanted < 0) {
          why = "the snapshot has no column '" + t.names[column] + "'";
          return std::nullopt;
        }
        continue;
      }
      if (row >= t.time.size() || cells.size() != header.size()) {
        why = "the snapshot has more samples than the run, or a short row";
        return std::nullopt;
      }
      auto time = finiteNumber(cells[0]);
      if (time)
        *time *= 1e-3;
      if (!time || std::fabs(*time - t.time[row]) > 1e-9 * std::max(1.0, std::fabs(*time)) + 1e-12) {
        why = "the snapshot's sample times differ from the run's";
        return std::nullopt;
      }
      // A NaN on either side would drop out of max() and the sum; it fails the measure instead.
      auto reference = finiteNumber(cells[static_cast<size_t>(wanted)]);
      char at[64];
      std::snprintf(at, sizeof at, " at %.6g ms", t.time[row] * 1e3);
      if (!reference) {
        why = "the snapshot's value" + std::string(at) + " is not a finite number";
        return std::nullopt;
      }
      if (!std::isfinite(t.at(row, column))) {
        why = "the recorded value" + std::string(at) + " is not a finite number";
        return std::nullopt;
      }
      double diff = (*reference - t.at(row, column)) / scale;
      worst = std::max(worst, std::fabs(diff));
      sumSquares += diff * diff;
      ++row;
    }
    if (row != t.time.size()) {
      why = "the snapshot has " + std::to_string(row) + " samples, the run " + std::to_string(t.time.size());
      return std::nullopt;
    }
    return rms ? std::sqrt(sumSquares / static_cast<double>(row)) : worst;
  }

  std::optional<double> protocolValue(const ExpectDecl &e, const std::string &name, std::string &why) {
    Run &r = run(e.target);
    if (!r.ok) {
      why = r.error;
      return std::nullopt;
    }
    MeasureArgs args;
    if (e.args.size() > 1 && e.args[1].value)
      args.value = eval(*e.args[1].value);
    if (name == "snapshot_max_error" || name == "snapshot_rms_error") {
      size_t column = 0;
      while (column < r.trace.columns() && r.trace.names[column] != e.args[0].path)
        ++column;
      if (column == r.trace.columns()) {
        why = "'" + e.args[0].path + "' was not recorded";
        return std::nullopt;
      }
      const ir::Model *m = loweredFor(c_, e.target);
      double scale = m->probes[m->findProbe(e.args[0].path)].scale;
      return snapshotError(e, e.args[1].text, r.trace, column, scale, name == "snapshot_rms_error", why);
    }
    return traceMeasure(e, args, *loweredFor(c_, e.target), r.trace, why);
  }
};

} // namespace

std::optional<double> restMeasure(const std::vector<rest::CompartmentRest> &analysis, const std::string &compartment,
                                  bool resistance, std::string &why) {
  for (const rest::CompartmentRest &cr : analysis) {
    if (cr.name != compartment)
      continue;
    std::vector<const rest::SteadyState *> stable;
    for (const rest::SteadyState &s : cr.steadyStates)
      if (s.stable)
        stable.push_back(&s);
    if (stable.size() != 1) {
      why = "has " + std::to_string(stable.size()) + " stable steady states from -150 to +100 mV, not one";
      return std::nullopt;
    }
    if (!resistance)
      return stable[0]->v;
    if (!stable[0]->inputResistance)
      why = "the compartment has no area";
    return stable[0]->inputResistance;
  }
  why = "no steady-state analysis of '" + compartment + "'";
  return std::nullopt;
}

std::optional<double> traceMeasure(const ExpectDecl &e, const MeasureArgs &args, const ir::Model &model,
                                   const Trace &t, std::string &why) {
  return measures::ofTrace(e.measure, e.args[0].path, args.value, model, t, why);
}

std::optional<Dimension> measuredDimension(const Compilation &c, const ExpectDecl &e) {
  const MeasureSpec *spec = findMeasure(e.measure);
  return spec ? measureDimension(c, e, *spec) : std::nullopt;
}

bool measuredOnRun(const ExpectDecl &e) {
  const MeasureSpec *spec = findMeasure(e.measure);
  return spec && spec->protocol;
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

std::vector<ExpectResult> runExpectations(Compilation &c, const KernelCompiler &compile) {
  // Only the root file's own expectations: a check file that uses a model with a suite of
  // its own does not measure that suite again.
  Measurer m(c, compile);
  std::vector<ExpectResult> out;
  for (auto &d : c.program.root->decls)
    if (auto *e = dyn_cast<ExpectDecl>(d.get()))
      out.push_back(m.measure(*e));
  return out;
}

} // namespace saltpan
