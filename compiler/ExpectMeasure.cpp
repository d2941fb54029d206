// ExpectMeasure.cpp - Stage 11, measuring half: runExpectations (`saltpan test`) measures every
// expectation, running each protocol and the steady-state search once, and judges it.
#include "ExpectInternal.h"

#include "Measures.h"
#include "Pipeline.h"
#include "Places.h"
#include "Rest.h"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

namespace saltpan {

using namespace ast;
using namespace expectation;

namespace {

// A value in the unit modellers read for it (measuredUnit).
std::string displayed(double si, const Dimension &d, const DisplayUnit &u) {
  bool wide = d == dims::voltage() || d == dims::time() || d == dims::rate();
  char buf[64];
  std::snprintf(buf, sizeof buf, wide ? "%.8g" : "%.6g", si * u.scale);
  return u.name.empty() ? buf : std::string(buf) + " " + u.name;
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
    r.measuredText = displayed(*r.measured, *dim, measuredUnit(c_, e));
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
    DisplayUnit unit = measuredUnit(c_, e);
    auto display = [&](double si, const Dimension &dim) {
      return displayed(si, dim, dim == Dimension::none() ? DisplayUnit{} : unit);
    };
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
        why = name == "area" ? "the compartment has no geometry"
                             : "no GHK resting potential (no ungated permeability channels)";
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
      return restValue(probeAtPlace(c_.model, e.args[0].path, e.args[0].position), name == "input_resistance", why);
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
          rest_ = rest::steadyStatesOfEach(*model, &c_.model);
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
      if (e->target == p)
        for (const std::string &trace : measureArgs(c_, *e).traces) {
          int index = model.findProbe(trace);
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
    MeasureArgs args = measureArgs(c_, e);
    if (name == "snapshot_max_error" || name == "snapshot_rms_error") {
      size_t column = 0;
      while (column < r.trace.columns() && r.trace.names[column] != args.traces[0])
        ++column;
      if (column == r.trace.columns()) {
        why = "'" + e.args[0].path + "' was not recorded";
        return std::nullopt;
      }
      const ir::Model *m = loweredFor(c_, e.target);
      double scale = m->probes[m->findProbe(args.traces[0])].scale;
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

std::optional<double> traceMeasure(const ExpectDecl &e, const MeasureArgs &args, const ir::Model &model, const Trace &t,
                                   std::string &why) {
  if (e.measure == "conduction_velocity") {
    if (args.traces.size() != 2)
      return std::nullopt;
    std::string whyFirst, whySecond;
    auto first = measures::ofTrace("first_spike", args.traces[0], args.value, model, t, whyFirst);
    auto second = measures::ofTrace("first_spike", args.traces[1], args.value, model, t, whySecond);
    if (!first || !second) {
      why = !first ? "no spike at '" + args.traces[0] + "' (" + whyFirst + ")"
                   : "no spike arrives at '" + args.traces[1] + "' (" + whySecond + ")";
      return std::nullopt;
    }
    return measures::conductionVelocity(args.distance, *first, *second, why);
  }
  return measures::ofTrace(e.measure, args.traces.empty() ? "" : args.traces[0], args.value, model, t, why);
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
