// Analyze.cpp - Stage 5: static values of the model, computed once.
#include "Analyze.h"

#include "Diagnostics.h"
#include "Evaluate.h"
#include "Physics.h"

#include <algorithm>
#include <cmath>
#include <set>

namespace saltpan {

using namespace ast;

std::optional<int> integerValence(const IonDecl &ion) {
  double z = ion.valence.value;
  if (z == 0 || z != std::floor(z) || std::fabs(z) > 100)
    return std::nullopt;
  return static_cast<int>(z);
}

std::optional<double> CompartmentValues::concentration(const IonDecl *ion, Side side) const {
  if (side == Side::Inside)
    return inside.get(ion);
  return outside ? outside->get(ion) : std::nullopt;
}

std::optional<double> CompartmentValues::nernst(const IonDecl *ion, double kelvin) const {
  auto z = integerValence(*ion);
  auto in = inside.get(ion);
  auto out = outside ? outside->get(ion) : std::nullopt;
  if (!z || !in || !out || *in <= 0 || *out <= 0)
    return std::nullopt;
  return physics::nernst(*z, *out, *in, kelvin);
}

namespace {

class Analyzer {
public:
  Analyzer(const SymbolTable &symbols, Evaluator &evaluator, DiagnosticEngine &diags, AnalyzedModel &model)
      : symbols_(symbols), evaluator_(evaluator), diags_(diags), model_(model) {}

  void run(const Program &program) {
    model_.header = symbols_.model;
    model_.temperatureDecl = symbols_.temperature;
    for (auto &[name, decl] : symbols_.byName) {
      if (auto *ion = dyn_cast<IonDecl>(decl))
        model_.ions.push_back(ion);
      if (auto *channel = dyn_cast<ChannelDecl>(decl))
        model_.channels.push_back(channel);
      if (auto *pump = dyn_cast<PumpDecl>(decl))
        model_.pumps[pump] = pumpValues(*pump);
    }
    // A constant that cannot be computed is an error even when nothing uses it.
    for (auto &[name, decl] : symbols_.byName)
      if (auto *c = dyn_cast<ConstDecl>(decl); c && c->value && c->value->type.known)
        value(*c->value, "the value of '" + c->name + "'");
    if (symbols_.temperature && symbols_.temperature->value)
      model_.temperature = value(*symbols_.temperature->value, "the temperature");
    std::vector<const SolutionDecl *> baths;
    std::vector<const CompartmentDecl *> compartments;
    for (auto &m : program.modules)
      for (auto &d : m->decls) {
        if (auto *s = dyn_cast<SolutionDecl>(d.get())) {
          baths.push_back(s);
          model_.baths[s] = solution(s->body);
        } else if (auto *c = dyn_cast<CompartmentDecl>(d.get())) {
          compartments.push_back(c);
        }
      }
    if (!compartments.empty() && !symbols_.temperature) {
      auto &d = diags_.error(compartments.front()->nameRange, "the model has compartments but no temperature");
      DiagnosticEngine::note(d, {}, "reversal potentials depend on it; add e.g. 'temperature 37 degC'");
    }
    for (const CompartmentDecl *c : compartments)
      model_.compartments.push_back(compartment(*c, baths));
  }

private:
  const SymbolTable &symbols_;
  Evaluator &evaluator_;
  DiagnosticEngine &diags_;
  AnalyzedModel &model_;

  std::optional<double> value(const Expr &e, const std::string &what, const EvalEnv &env = {}) {
    if (!e.type.known)
      return std::nullopt; // CheckUnits already reported it
    EvalFailure failure;
    auto v = evaluator_.evaluate(e, env, &failure);
    if (!v)
      diags_.error(failure.range.valid() ? failure.range : e.range,
                   "cannot compute " + what + ": " + failure.reason);
    return v;
  }

  static PumpValues pumpValues(const PumpDecl &p) {
    PumpValues values;
    values.chargeKnown = !p.cycle.empty();
    for (const StoichTerm &t : p.cycle) {
      auto z = t.target ? integerValence(*t.target) : std::nullopt;
      double n = t.count.value;
      if (!z || n != std::floor(n) || n <= 0 || n > 1000) {
        values.chargeKnown = false;
        continue;
      }
      int moved = static_cast<int>(n) * *z;
      values.netOutwardCharge += t.direction == Direction::Out ? moved : -moved;
    }
    return values;
  }

  SolutionValues solution(const SolutionBody &body) {
    SolutionValues s;
    for (const ConcentrationEntry &e : body.entries) {
      if (!e.target || !e.value)
        continue;
      if (auto v = value(*e.value, "the concentration of '" + e.ion + "'")) {
        s.concentration[e.target] = *v;
        s.entry[e.target] = &e;
      }
    }
    for (const ImpermeantEntry &i : body.impermeants)
      if (i.amount)
        if (auto v = value(*i.amount, "an impermeant concentration"))
          s.impermeant.push_back({i.valence.value, *v});
    return s;
  }

  const SolutionDecl *chooseBath(const CompartmentDecl &c, const std::vector<const SolutionDecl *> &baths) {
    if (c.bath)
      return c.bath;
    if (!c.bathName.empty())
      return nullptr; // Resolve reported the bad name
    if (baths.size() == 1)
      return baths.front();
    if (baths.size() > 1) {
      auto &d = diags_.error(c.nameRange, "compartment '" + c.name + "' must say which outside solution it faces");
      for (const SolutionDecl *s : baths)
        DiagnosticEngine::note(d, s->nameRange, "outside solution '" + s->name + "' declared here");
      DiagnosticEngine::note(d, {}, "add 'outside NAME' to the compartment");
    }
    return nullptr;
  }

  CompartmentValues compartment(const CompartmentDecl &c, const std::vector<const SolutionDecl *> &baths) {
    CompartmentValues v;
    v.decl = &c;
    v.bath = chooseBath(c, baths);
    if (v.bath)
      v.outside = &model_.baths[v.bath];
    if (c.hasInside)
      v.inside = solution(c.inside);
    std::string of = " of '" + c.name + "'";
    const Geometry &g = c.geometry;
    std::optional<double> diameter;
    if (g.diameter)
      diameter = value(*g.diameter, "the diameter" + of);
    double d = diameter.value_or(0);
    if (g.shape == Shape::Sphere && diameter)
      v.area = M_PI * d * d;
    if (g.shape == Shape::Cylinder && diameter && g.length)
      if (auto len = value(*g.length, "the length" + of))
        v.area = M_PI * d * *len; // the side wall; the ends join other compartments
    if (g.shape == Shape::Area && g.area)
      v.area = value(*g.area, "the membrane area" + of);
    if (g.shape == Shape::Sphere && diameter)
      v.volume = M_PI * d * d * d / 6;
    if (g.shape == Shape::Cylinder && diameter && v.area)
      v.volume = *v.area * d / 4;
    if (c.hasInside)
      for (const ConcentrationEntry &e : c.inside.entries) {
        if (!e.dynamic || !e.target)
          continue;
        CompartmentValues::Pool pool{e.target, &e, 0};
        if (e.shellDepth) {
          auto depth = value(*e.shellDepth, "the shell depth of '" + e.ion + "'");
          if (depth && *depth > 0)
            pool.areaPerVolume = 1 / *depth; // a thin shell: volume = area * depth
          else if (depth)
            diags_.error(e.shellDepth->range, "a shell depth must be positive");
        } else if (v.volume && v.area && *v.volume > 0) {
          pool.areaPerVolume = *v.area / *v.volume;
        } else {
          auto &diag = diags_.error(e.dynamicRange, "a dynamic concentration needs a volume");
          DiagnosticEngine::note(diag, {}, "give compartment '" + c.name +
                                               "' a sphere or cylinder geometry, or write 'dynamic shell 0.1 um'");
        }
        if (pool.areaPerVolume > 0)
          v.pools.push_back(pool);
      }
    if (c.capacitance)
      v.capacitance = value(*c.capacitance, "the capacitance" + of);
    if (c.initialV)
      v.initialV = value(*c.initialV, "the initial potential" + of);

    std::set<const IonDecl *> ions;
    for (auto &[ion, conc] : v.inside.concentration)
      ions.insert(ion);
    if (v.outside)
      for (auto &[ion, conc] : v.outside->concentration)
        ions.insert(ion);
    v.ions.assign(ions.begin(), ions.end());
    std::sort(v.ions.begin(), v.ions.end(), [](auto *a, auto *b) { return a->name < b->name; });

    for (const MembraneEntry &m : c.membrane)
      v.placements.push_back(placement(m, v));
    ghkRest(v);
    return v;
  }

  EvalEnv environment(const CompartmentValues &v) {
    EvalEnv env;
    env.T = model_.temperature;
    env.concentration = [&v](const IonDecl *ion, Side side) { return v.concentration(ion, side); };
    double kelvin = model_.temperature.value_or(NAN);
    env.reversal = [&v, kelvin](const IonDecl *ion) { return v.nernst(ion, kelvin); };
    return env;
  }

  static DensityKind densityKind(const Expr &density) {
    if (!density.type.known)
      return DensityKind::Unknown;
    const Dimension &d = density.type.dim;
    if (d == dims::conductanceDensity())
      return DensityKind::Conductance;
    if (d == dims::permeability())
      return DensityKind::Permeability;
    if (d == dims::currentDensity())
      return DensityKind::Current;
    if (d == dims::turnoverDensity())
      return DensityKind::Turnover;
    return DensityKind::Unknown;
  }

  /// Reversal potential that the concentrations give for what the channel carries.
  std::optional<double> concentrationReversal(const ChannelDecl &ch, const CompartmentValues &v) {
    if (!model_.temperature || ch.carries.empty())
      return std::nullopt;
    if (ch.carries.size() == 1)
      return ch.carries[0].target ? v.nernst(ch.carries[0].target, *model_.temperature) : std::nullopt;
    std::vector<physics::PermeantIon> ions;
    for (const CarriedIon &k : ch.carries) {
      if (!k.target || !k.hasRatio || k.ratio.value <= 0)
        return std::nullopt;
      auto z = integerValence(*k.target);
      auto in = v.inside.get(k.target);
      auto out = v.outside ? v.outside->get(k.target) : std::nullopt;
      if (!z || !in || !out || *in <= 0 || *out <= 0)
        return std::nullopt;
      ions.push_back({*z, k.ratio.value, *in, *out});
    }
    return physics::ghkZeroCurrentPotential(ions, *model_.temperature);
  }

  Placement placement(const MembraneEntry &m, const CompartmentValues &v) {
    Placement p;
    p.entry = &m;
    p.channel = dyn_cast<ChannelDecl>(m.target);
    p.pump = dyn_cast<PumpDecl>(m.target);
    std::string what = "the density of '" + m.name + "' in '" + v.decl->name + "'";
    if (m.density) {
      p.densityKind = densityKind(*m.density);
      p.density = value(*m.density, what);
    }
    if (!p.channel)
      return p;
    const ChannelDecl &ch = *p.channel;
    p.concentrationReversal = concentrationReversal(ch, v);
    if (m.reversal) {
      p.reversalKind = ReversalKind::Written;
      p.writtenReversal = m.reversal.get();
      p.reversal = value(*m.reversal, "the reversal potential of '" + m.name + "'");
    } else if (ch.reversal) {
      p.reversalKind = ReversalKind::Written;
      p.writtenReversal = ch.reversal.get();
      if (ch.reversal->type.known) {
        EvalFailure failure;
        p.reversal = evaluator_.evaluate(*ch.reversal, environment(v), &failure);
        if (!p.reversal) {
          auto &d = diags_.error(m.nameRange, "cannot compute the reversal potential of '" + ch.name + "' in '" +
                                                  v.decl->name + "': " + failure.reason);
          DiagnosticEngine::note(d, failure.range, "in this expression");
        }
      }
    } else {
      p.reversalKind = ch.carries.size() > 1 ? ReversalKind::Ghk : ReversalKind::Nernst;
      p.reversal = p.concentrationReversal;
    }
    return p;
  }

  void ghkRest(CompartmentValues &v) {
    if (!model_.temperature)
      return;
    std::map<const IonDecl *, double> permeability;
    for (const Placement &p : v.placements) {
      if (!p.channel || p.densityKind != DensityKind::Permeability || !p.density || !p.channel->gates.empty())
        continue;
      bool usable = !p.channel->carries.empty();
      for (const CarriedIon &k : p.channel->carries)
        usable = usable && k.target && (k.hasRatio || p.channel->carries.size() == 1);
      if (!usable)
        continue;
      ++v.ghkChannels;
      for (const CarriedIon &k : p.channel->carries)
        permeability[k.target] += *p.density * (k.hasRatio ? k.ratio.value : 1.0);
    }
    if (permeability.empty())
      return;
    std::vector<physics::PermeantIon> ions;
    for (auto &[ion, perm] : permeability) {
      auto z = integerValence(*ion);
      auto in = v.inside.get(ion);
      auto out = v.outside ? v.outside->get(ion) : std::nullopt;
      if (!z || !in || !out || *in <= 0 || *out <= 0 || perm <= 0)
        return;
      ions.push_back({*z, perm, *in, *out});
    }
    v.ghkRest = physics::ghkZeroCurrentPotential(ions, *model_.temperature);
  }
};

} // namespace

bool analyze(const Program &program, const SymbolTable &symbols, Evaluator &evaluator, DiagnosticEngine &diags,
             AnalyzedModel &model) {
  size_t before = diags.errorCount();
  Analyzer(symbols, evaluator, diags, model).run(program);
  return diags.errorCount() == before;
}

} // namespace saltpan
