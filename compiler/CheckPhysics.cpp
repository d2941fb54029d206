// CheckPhysics.cpp - Stage 7: ranges, reversal consistency and sampled gate kinetics.
#include "CheckPhysics.h"

#include "Analyze.h"
#include "Diagnostics.h"
#include "Evaluate.h"
#include "Physics.h"

#include <cmath>
#include <cstdio>

namespace saltpan {

using namespace ast;

namespace {

// Documented thresholds (docs/language.md, "Checks").
constexpr double reversalToleranceVolts = 1e-3;
constexpr double minCelsius = 0, maxCelsius = 50;
constexpr double minCapacitance = 0.5e-2, maxCapacitance = 2e-2; // F/m^2 = 0.5..2 uF/cm2
constexpr double sampleLowVolts = -0.150, sampleHighVolts = 0.100, sampleStepVolts = 0.001;

std::string fmt(const char *format, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}
std::string mV(double volts) { return fmt("%.4g mV", volts * 1e3); }

class PhysicsChecker {
public:
  PhysicsChecker(const AnalyzedModel &model, Evaluator &evaluator, DiagnosticEngine &diags)
      : model_(model), evaluator_(evaluator), diags_(diags) {}

  void run(const Program &program) {
    temperature(program);
    for (auto &m : program.modules)
      for (auto &d : m->decls) {
        if (auto *s = dyn_cast<SolutionDecl>(d.get()))
          if (auto it = model_.baths.find(s); it != model_.baths.end())
            concentrations(s->body, it->second, "outside solution '" + s->name + "'");
        if (auto *ch = dyn_cast<ChannelDecl>(d.get()))
          channel(*ch);
      }
    for (const CompartmentValues &c : model_.compartments)
      if (c.piece <= 0) // a cable's pieces share what is checked here
        compartment(c);
  }

private:
  const AnalyzedModel &model_;
  Evaluator &evaluator_;
  DiagnosticEngine &diags_;

  void temperature(const Program &) {
    if (!model_.temperature || !model_.temperatureDecl)
      return;
    double k = *model_.temperature;
    const Expr &at = *model_.temperatureDecl->value;
    if (k <= 0) {
      diags_.error(at.range, "the temperature " + fmt("%.6g K", k) + " is at or below absolute zero");
      return;
    }
    double c = k - physics::zeroCelsius;
    if (c < minCelsius || c > maxCelsius) {
      auto &d = diags_.warning(at.range, "the temperature " + fmt("%.4g degC", c) + " is outside 0 to 50 degC");
      DiagnosticEngine::note(d, {}, "membrane models are measured and fitted between 0 and 50 degC; "
                                    "is the unit right (degC or K)?");
    }
  }

  void concentrations(const SolutionBody &body, const SolutionValues &values, const std::string &where) {
    for (const ConcentrationEntry &e : body.entries) {
      if (!e.target)
        continue;
      auto v = values.get(e.target);
      if (v && *v <= 0) {
        auto &d = diags_.error(e.value->range, "the concentration of '" + e.ion + "' in " + where +
                                                   " must be positive, got " + fmt("%.4g mM", *v));
        DiagnosticEngine::note(d, {}, "reversal potentials take the logarithm of concentrations; "
                                      "leave an absent ion out instead");
      }
    }
    for (size_t i = 0; i < body.impermeants.size() && i < values.impermeant.size(); ++i)
      if (values.impermeant[i].second < 0)
        diags_.error(body.impermeants[i].amount->range, "an impermeant concentration cannot be negative");
  }

  void positive(const Expr *e, std::optional<double> v, const std::string &what) {
    if (e && v && *v <= 0)
      diags_.error(e->range, what + " must be positive");
  }

  void compartment(const CompartmentValues &c) {
    const CompartmentDecl &d = *c.decl;
    std::string of = " of '" + d.name + "'";
    if (d.hasInside)
      concentrations(d.inside, c.inside, "the inside of '" + d.name + "'");
    positive(d.geometry.diameter.get(),
             d.geometry.diameter ? evaluator_.evaluate(*d.geometry.diameter, {}) : std::nullopt, "the diameter" + of);
    positive(d.geometry.length.get(), d.geometry.length ? evaluator_.evaluate(*d.geometry.length, {}) : std::nullopt,
             "the length" + of);
    positive(d.geometry.area.get(), c.area, "the membrane area" + of);
    const char *kind = d.cable ? "cable" : "compartment";
    if (!d.capacitance && !(d.cable && c.capacitance)) { // a cable may take its parent's
      auto &diag = diags_.error(d.nameRange, std::string(kind) + " '" + d.name + "' has no capacitance");
      DiagnosticEngine::note(diag, {}, "add e.g. 'capacitance 1 uF/cm2' (the classical value for nerve membrane)");
    } else if (c.capacitance && d.capacitance) {
      double cm = *c.capacitance;
      if (cm <= 0)
        diags_.error(d.capacitance->range, "the capacitance" + of + " must be positive");
      else if (cm < minCapacitance || cm > maxCapacitance) {
        auto &diag =
            diags_.warning(d.capacitance->range, "the capacitance" + of + " is " + fmt("%.4g uF/cm2", cm * 100) +
                                                     ", outside the usual 0.5 to 2 uF/cm2");
        DiagnosticEngine::note(diag, {}, "lipid bilayers measure close to 1 uF/cm2; check the unit");
      }
    }
    if (c.initialV && d.initialV && (*c.initialV < sampleLowVolts || *c.initialV > sampleHighVolts))
      diags_.warning(d.initialV->range, "the initial potential" + of + " is " + mV(*c.initialV) +
                                            ", outside -150 to +100 mV");
    if (c.placements.empty())
      diags_.warning(d.nameRange, std::string(kind) + " '" + d.name + "' has no channels or pumps in its membrane");
    for (const Placement &p : c.placements)
      placement(p, c);
  }

  void placement(const Placement &p, const CompartmentValues &c) {
    const MembraneEntry &m = *p.entry;
    if (p.density && m.density) {
      if (*p.density < 0)
        diags_.error(m.density->range, "the density of '" + m.name + "' cannot be negative");
      else if (*p.density == 0)
        diags_.warning(m.density->range, "'" + m.name + "' has zero density and adds nothing to the membrane");
    }
    if (p.channel && p.reversalKind == ReversalKind::Written && p.reversal && p.concentrationReversal &&
        std::fabs(*p.reversal - *p.concentrationReversal) > reversalToleranceVolts) {
      const char *law = p.channel->carries.size() > 1 ? "GHK" : "Nernst";
      auto &d = diags_.warning(p.writtenReversal->range,
                               "the reversal potential of '" + p.channel->name + "' in '" + c.decl->name +
                                   "' is written as " + mV(*p.reversal) + ", but the concentrations give " +
                                   mV(*p.concentrationReversal) + " (" + law + ", " +
                                   fmt("%.4g degC", *model_.temperature - physics::zeroCelsius) + ")");
      DiagnosticEngine::note(d, p.channel->carriesRange, "the ions it carries");
      DiagnosticEngine::note(d, {}, "drop the written value to use the concentrations, or correct the concentrations");
    }
    if (p.channel)
      sampleGates(*p.channel, &c, &m);
    else if (p.pump && p.pump->activity)
      sampleActivity(*p.pump, c, m);
  }

  void channel(const ChannelDecl &ch) {
    if (ch.q10) {
      auto q = ch.q10->type.known ? evaluator_.evaluate(*ch.q10, {}) : std::nullopt;
      if (q && *q <= 0)
        diags_.error(ch.q10->range, "a Q10 factor must be positive");
      else if (q && (*q < 1 || *q > 6))
        diags_.warning(ch.q10->range, "a Q10 of " + fmt("%.3g", *q) + " is unusual; channel kinetics have Q10 from 1 to 6");
      auto ref = ch.q10Reference->type.known ? evaluator_.evaluate(*ch.q10Reference, {}) : std::nullopt;
      if (ref && *ref <= 0)
        diags_.error(ch.q10Reference->range, "the Q10 reference temperature must be above absolute zero");
    }
    for (const Gate &g : ch.gates) {
      double power = g.power.value;
      if (g.hasPower && (power != std::floor(power) || power < 1 || power > 8))
        diags_.error(g.power.range, "a gate's power is a whole number from 1 to 8, not " + fmt("%g", power));
      bool rates = g.opening || g.closing, steady = g.steady || g.tau;
      std::string what = "gate '" + g.name + "' of '" + ch.name + "'";
      if (rates && steady) {
        auto &d = diags_.error(g.nameRange, what + " mixes opening/closing rates with steady/tau");
        DiagnosticEngine::note(d, {}, "give either 'opening' and 'closing', or 'steady' and 'tau'");
      } else if (!rates && !steady) {
        auto &d = diags_.error(g.nameRange, what + " has no kinetics");
        DiagnosticEngine::note(d, {}, "give either 'opening' and 'closing', or 'steady' and 'tau'");
      } else if (rates && !(g.opening && g.closing)) {
        diags_.error(g.nameRange, what + " has " + (g.opening ? "an opening rate but no closing rate"
                                                              : "a closing rate but no opening rate"));
      } else if (steady && !(g.steady && g.tau)) {
        diags_.error(g.nameRange, what + " has " + (g.steady ? "a steady value but no time constant 'tau'"
                                                             : "a time constant but no steady value"));
      }
    }
    // A channel placed nowhere is still sampled when its kinetics need no concentrations
    // (stdlib channel types, for one).
    bool placed = false;
    for (const CompartmentValues &c : model_.compartments)
      for (const Placement &p : c.placements)
        placed = placed || p.channel == &ch;
    if (!placed)
      sampleGates(ch, nullptr, nullptr);
  }

  EvalEnv environment(const CompartmentValues *c, const ChannelDecl *ch) {
    EvalEnv env;
    env.T = model_.temperature;
    if (!env.T && ch && ch->q10Reference)
      env.T = evaluator_.evaluate(*ch->q10Reference, {});
    if (!env.T)
      env.T = physics::zeroCelsius + 20; // a room-temperature stand-in for modules without a model
    if (c) {
      env.concentration = [c](const IonDecl *ion, Side side) { return c->concentration(ion, side); };
      double kelvin = *env.T;
      env.reversal = [c, kelvin](const IonDecl *ion) { return c->nernst(ion, kelvin); };
    }
    return env;
  }

  struct Range {
    double low, high;
    const char *what;
  };

  // Reports the first voltage where an expression fails, leaves its range, or is not finite.
  void sample(const Expr *e, const EvalEnv &base, const std::string &what, Range allowed, bool errorOnRange,
              const CompartmentValues *c, const MembraneEntry *m) {
    if (!e || !e->type.known)
      return;
    EvalEnv env = base;
    // Whole millivolts, computed as written literals are (n * 1e-3), so a removable
    // singularity such as V = -40 mV is hit exactly rather than stepped over.
    int steps = static_cast<int>(std::lround((sampleHighVolts - sampleLowVolts) / sampleStepVolts));
    int first = static_cast<int>(std::lround(sampleLowVolts / sampleStepVolts));
    for (int i = 0; i <= steps; ++i) {
      double v = (first + i) * 1e-3;
      env.V = v;
      EvalFailure failure;
      auto value = evaluator_.evaluate(*e, env, &failure);
      if (!value) {
        if (failure.missingIon) {
          if (!c || alreadyReported(failure.missingIon, *c, *m))
            return; // unplaced: nothing to say until it sits in a compartment
          auto &d = diags_.error(m->nameRange, what + " " + failure.reason + ", which compartment '" + c->decl->name +
                                                   "' does not give");
          DiagnosticEngine::note(d, failure.range, "used here");
          return;
        }
        auto &d = diags_.warning(e->range, what + " cannot be computed at V = " + mV(v) + ": " + failure.reason);
        if (c)
          DiagnosticEngine::note(d, m->nameRange, "in compartment '" + c->decl->name + "'");
        if (failure.reason == "division by zero")
          DiagnosticEngine::note(d, {},
                                 "a rate of the form a*x / (1 - exp(-x)) is a / exprel(-x) (use std.math), "
                                 "which is exact at x = 0");
        return;
      }
      if (*value < allowed.low || *value > allowed.high) {
        std::string message = what + " is " + inUnits(*value, e->type.dim) + " at V = " + mV(v) + "; " + allowed.what;
        if (errorOnRange)
          diags_.error(e->range, message);
        else
          diags_.warning(e->range, message);
        return;
      }
    }
  }

  // CheckCharge has already said that a moved or carried ion is missing from a compartment.
  static bool alreadyReported(const IonDecl *ion, const CompartmentValues &c, const MembraneEntry &m) {
    for (const Placement &p : c.placements) {
      if (p.entry != &m)
        continue;
      if (p.pump)
        for (const StoichTerm &t : p.pump->cycle)
          if (t.target == ion)
            return true;
      if (p.channel && (p.reversalKind == ReversalKind::Nernst || p.reversalKind == ReversalKind::Ghk))
        for (const CarriedIon &k : p.channel->carries)
          if (k.target == ion)
            return true;
    }
    return false;
  }

  static std::string inUnits(double v, const Dimension &d) {
    if (d == dims::rate())
      return fmt("%.4g /ms", v * 1e-3);
    if (d == dims::time())
      return fmt("%.4g ms", v * 1e3);
    return fmt("%.4g", v);
  }

  void sampleGates(const ChannelDecl &ch, const CompartmentValues *c, const MembraneEntry *m) {
    EvalEnv env = environment(c, &ch);
    constexpr double inf = INFINITY;
    for (const Gate &g : ch.gates) {
      std::string of = " of gate '" + g.name + "' in '" + ch.name + "'";
      sample(g.opening.get(), env, "the opening rate" + of, {0, inf, "a rate cannot be negative"}, false, c, m);
      sample(g.closing.get(), env, "the closing rate" + of, {0, inf, "a rate cannot be negative"}, false, c, m);
      sample(g.steady.get(), env, "the steady value" + of, {0, 1, "a steady value lies between 0 and 1"}, false, c, m);
      sample(g.tau.get(), env, "the time constant" + of, {1e-300, inf, "a time constant must be positive"}, false, c, m);
    }
  }

  void sampleActivity(const PumpDecl &p, const CompartmentValues &c, const MembraneEntry &m) {
    sample(p.activity.get(), environment(&c, nullptr), "the activity of '" + p.name + "'",
           {0, 1, "an activity is a fraction of the maximal rate, from 0 to 1"}, false, &c, &m);
  }
};

} // namespace

bool checkPhysics(const Program &program, const AnalyzedModel &model, Evaluator &evaluator, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  PhysicsChecker(model, evaluator, diags).run(program);
  return diags.errorCount() == before;
}

} // namespace saltpan
