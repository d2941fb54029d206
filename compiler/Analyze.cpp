// Analyze.cpp - Stage 5: static values of the model, computed once.
#include "Analyze.h"

#include "Decimal.h"
#include "Diagnostics.h"
#include "Evaluate.h"
#include "Physics.h"
#include "Places.h"

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
  Analyzer(const SymbolTable &symbols, Evaluator &evaluator, DiagnosticEngine &diags, AnalyzedModel &model,
           const CableMembranes *membranes)
      : symbols_(symbols), evaluator_(evaluator), diags_(diags), model_(model), membranes_(membranes) {}

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
      if (!c->cable)
        model_.compartments.push_back(compartment(*c, baths));
    // Cables after what they grow from, so a cable's junction and inherited values are known.
    std::vector<const CompartmentDecl *> waiting;
    for (const CompartmentDecl *c : compartments)
      if (c->cable)
        waiting.push_back(c);
    for (bool progress = true; progress && !waiting.empty();) {
      progress = false;
      for (auto it = waiting.begin(); it != waiting.end();) {
        const CompartmentDecl *parent = (*it)->cable->parentDecl;
        if (parent && parent->cable && !cableOf(parent)) {
          ++it;
          continue;
        }
        cable(**it, baths);
        it = waiting.erase(it);
        progress = true;
      }
    }
  }

private:
  const SymbolTable &symbols_;
  Evaluator &evaluator_;
  DiagnosticEngine &diags_;
  AnalyzedModel &model_;
  const CableMembranes *membranes_;
  std::optional<double> cutFrequency_, cutLengthConstant_; // of the cable being cut

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

  const CableValues *cableOf(const CompartmentDecl *decl) const { return saltpan::cableOf(model_, decl); }

  // What a cable leaves out it takes from what it grows from: the first of the cable and its
  // ancestors that gives the item.
  template <class Has> const CompartmentDecl &from(const CompartmentDecl &c, Has has) const {
    const CompartmentDecl *d = &c;
    for (int depth = 0; d && !has(*d) && d->cable && depth < 10000; ++depth)
      d = d->cable->parentDecl;
    return d && has(*d) ? *d : c;
  }

  // `pieces N per length constant at F`: pieces of at most 1/N of the length constant at F, of
  // the thinnest end for a taper (the shortest length constant along it).
  std::optional<double> countByLengthConstant(const CompartmentDecl &c, const CableShape &shape,
                                              std::optional<double> length, std::optional<double> diameter,
                                              std::optional<double> diameterEnd, std::optional<double> resistivity) {
    auto frequency =
        value(*shape.perLengthConstantAt, "the frequency of the length constant of cable '" + c.name + "'");
    if (frequency && !(*frequency >= 0)) {
      diags_.error(shape.perLengthConstantAt->range, "the frequency of a length constant must be 0 Hz or more");
      return std::nullopt;
    }
    if (!frequency || !length || !diameter || !diameterEnd || !resistivity)
      return std::nullopt;
    if (!membranes_)
      return 1; // provisional: the membrane at rest is not known yet
    auto found = membranes_->find(&c);
    if (found == membranes_->end() || !(found->second.conductance > 0) || !(found->second.capacitance > 0)) {
      auto &d = diags_.error(shape.piecesRange, "cable '" + c.name +
                                                    "' has no length constant to cut by: its membrane conducts "
                                                    "nothing at the initial state");
      DiagnosticEngine::note(d, {}, "give 'pieces N' or 'piece length L'");
      return std::nullopt;
    }
    double lambda = physics::lengthConstantAt(*frequency, std::min(*diameter, *diameterEnd), *resistivity,
                                              found->second.conductance, found->second.capacitance);
    cutFrequency_ = *frequency;
    cutLengthConstant_ = lambda;
    return std::ceil(*length * static_cast<double>(shape.pieces) / lambda - 1e-9);
  }

  // A cable: its shape, its pieces (each a compartment of its own area, with the cable's
  // membrane and solutions) and the junctions between them and to what it grows from.
  void cable(const CompartmentDecl &c, const std::vector<const SolutionDecl *> &baths) {
    const CableShape &shape = *c.cable;
    std::string of = " of cable '" + c.name + "'";
    CableValues cv;
    cv.decl = &c;
    auto need = [&](const ExprPtr &e, const char *what, const char *example) -> std::optional<double> {
      if (!e) {
        auto &d = diags_.error(c.nameRange, "cable '" + c.name + "' has no " + what);
        DiagnosticEngine::note(d, {}, std::string("add e.g. '") + example + "'");
        return std::nullopt;
      }
      auto v = value(*e, std::string("the ") + what + of);
      if (v && !(*v > 0)) {
        diags_.error(e->range, std::string("the ") + what + of + " must be positive");
        return std::nullopt;
      }
      return v;
    };
    auto length = need(shape.length, "length", "length 400 um");
    auto diameter = need(shape.diameter, "diameter", "diameter 2 um");
    auto resistivity = need(shape.axialResistivity, "axial resistivity", "axial resistivity 150 ohm*cm");
    std::optional<double> diameterEnd = diameter;
    if (shape.diameterEnd)
      diameterEnd = need(shape.diameterEnd, "far diameter", "diameter 3 um to 1 um");
    double count = 0; // unknown
    cutFrequency_.reset();
    cutLengthConstant_.reset();
    if (shape.pieces > 0 && shape.perLengthConstantAt) {
      if (auto n = countByLengthConstant(c, shape, length, diameter, diameterEnd, resistivity))
        count = *n;
    } else if (shape.pieces > 0)
      count = static_cast<double>(shape.pieces);
    else if (shape.pieceLength) {
      auto piece = need(shape.pieceLength, "piece length", "piece length 10 um");
      if (piece && length)
        count = std::ceil(*length / *piece - 1e-9);
    } else if (shape.pieces == 0) { // below 0: a piece count already refused
      auto &d = diags_.error(c.nameRange, "cable '" + c.name + "' does not say how to cut it into pieces");
      DiagnosticEngine::note(d, {}, "add 'pieces 40' or 'piece length 10 um'");
    }
    if (count > 1e6) {
      auto &d = diags_.error(shape.piecesRange, "cable '" + c.name + "' would be cut into " +
                                                    std::to_string(static_cast<long long>(count)) +
                                                    " pieces; saltpan takes at most 1000000 per cable");
      DiagnosticEngine::note(d, {}, "give a longer 'piece length'");
      count = 0;
    }
    size_t earlier = 0; // pieces of the cables cut before this one
    for (const CableValues &other : model_.cables)
      earlier += other.pieces;
    if (count >= 1 && static_cast<double>(earlier) + count > static_cast<double>(maxPiecesInAll)) {
      auto &d = diags_.error(shape.piecesRange.begin.line ? shape.piecesRange : c.nameRange,
                             "with cable '" + c.name + "' the cables would have " +
                                 std::to_string(earlier + static_cast<size_t>(count)) +
                                 " pieces in all; saltpan takes at most " + std::to_string(maxPiecesInAll));
      DiagnosticEngine::note(d, {},
                             "each piece is a compartment of its own: memory and compile time grow with the "
                             "pieces; give longer pieces");
      count = 0;
    }
    if (!length || !diameter || !diameterEnd || !resistivity || count < 1)
      return;
    cv.length = *length;
    cv.diameter = *diameter;
    cv.diameterEnd = *diameterEnd;
    cv.axialResistivity = *resistivity;
    cv.pieces = static_cast<size_t>(count);
    cv.cutFrequency = cutFrequency_;
    cv.cutLengthConstant = cutLengthConstant_;
    cv.first = model_.compartments.size();
    model_.cables.push_back(cv);

    CompartmentValues base = compartment(c, baths);
    double piece = cv.pieceLength();
    // The axial resistance of a cone of length h between diameters a and b: 4 Ri h / (pi a b).
    auto resistance = [&](double x0, double x1) {
      return 4 * cv.axialResistivity * (x1 - x0) / (M_PI * cv.diameterAt(x0) * cv.diameterAt(x1));
    };
    for (size_t i = 0; i < cv.pieces; ++i) {
      CompartmentValues v = base;
      v.name = c.name + "[" + std::to_string(i) + "]";
      v.piece = static_cast<int>(i);
      v.from = piece * static_cast<double>(i);
      v.to = i + 1 == cv.pieces ? cv.length : piece * static_cast<double>(i + 1);
      double d = cv.diameterAt(0.5 * (v.from + v.to));
      v.area = M_PI * d * (v.to - v.from); // the side wall; the ends join the neighbours
      v.volume = *v.area * d / 4;
      for (CompartmentValues::Pool &pool : v.pools)
        if (!pool.entry->shellDepth)
          pool.areaPerVolume = 4 / d;
      model_.compartments.push_back(std::move(v));
      if (i > 0) { // centre to the shared end to centre
        const CompartmentValues &before = model_.compartments[cv.first + i - 1], &after = model_.compartments.back();
        double r = resistance(0.5 * (before.from + before.to), before.to) +
                   resistance(after.from, 0.5 * (after.from + after.to));
        model_.junctions.push_back({cv.first + i - 1, cv.first + i, 1 / r});
      }
    }
    if (!shape.parentDecl)
      return;
    // Joined to a compartment as a whole, or to the piece of the parent cable it grows from.
    double r = resistance(0, 0.5 * piece);
    size_t parent = 0;
    if (const CableValues *p = cableOf(shape.parentDecl)) {
      size_t at = p->pieces - 1;
      if (shape.at) {
        auto joined = pieceAtDistance(*p, placeDistance(shape.at, *p));
        if (!joined) {
          auto &d = diags_.error(shape.at.range, "cable '" + p->decl->name + "' is " +
                                                     shortestDecimal(tidyDecimal(p->length * 1e6)) + " um long; '" +
                                                     c.name + "' cannot grow from outside it");
          DiagnosticEngine::note(d, {}, placeRangeNote);
          return;
        }
        at = *joined;
      }
      parent = p->first + at;
      const CompartmentValues &pp = model_.compartments[parent];
      double centre = 0.5 * (pp.from + pp.to);
      r += 4 * p->axialResistivity * 0.5 * (pp.to - pp.from) / (M_PI * p->diameterAt(centre) * p->diameterAt(centre));
    } else {
      for (size_t i = 0; i < model_.compartments.size(); ++i)
        if (model_.compartments[i].decl == shape.parentDecl)
          parent = i;
      if (!model_.compartments[parent].area) {
        auto &d = diags_.error(shape.parentRange,
                               "cable '" + c.name + "' grows from '" + shape.parent + "', which has no membrane area");
        DiagnosticEngine::note(d, shape.parentDecl->nameRange,
                               "give '" + shape.parent +
                                   "' a sphere, cylinder or area: joined currents "
                                   "divide by its area");
        return;
      }
    }
    model_.junctions.push_back({parent, cv.first, 1 / r});
  }

  CompartmentValues compartment(const CompartmentDecl &c, const std::vector<const SolutionDecl *> &baths) {
    CompartmentValues v;
    v.decl = &c;
    v.name = c.name;
    v.bath = chooseBath(from(c, [](const CompartmentDecl &d) { return !d.bathName.empty(); }), baths);
    if (v.bath)
      v.outside = &model_.baths[v.bath];
    const CompartmentDecl &inside = from(c, [](const CompartmentDecl &d) { return d.hasInside; });
    if (inside.hasInside)
      v.inside = solution(inside.inside);
    std::string of = " of '" + c.name + "'";
    if (const CableValues *cv = cableOf(&c)) { // the first piece's, for the pools' checks
      double d = cv->diameterAt(0.5 * cv->pieceLength());
      v.area = M_PI * d * cv->pieceLength();
      v.volume = *v.area * d / 4;
    }
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
    if (inside.hasInside)
      for (const ConcentrationEntry &e : inside.inside.entries) {
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
    const CompartmentDecl &capacitance = from(c, [](const CompartmentDecl &x) { return x.capacitance != nullptr; });
    if (capacitance.capacitance)
      v.capacitance = value(*capacitance.capacitance, "the capacitance" + of);
    const CompartmentDecl &initial = from(c, [](const CompartmentDecl &x) { return x.initialV != nullptr; });
    if (initial.initialV)
      v.initialV = value(*initial.initialV, "the initial potential" + of);

    std::set<const IonDecl *> ions;
    for (auto &[ion, conc] : v.inside.concentration)
      ions.insert(ion);
    if (v.outside)
      for (auto &[ion, conc] : v.outside->concentration)
        ions.insert(ion);
    v.ions.assign(ions.begin(), ions.end());
    std::sort(v.ions.begin(), v.ions.end(), [](auto *a, auto *b) { return a->name < b->name; });

    for (const MembraneEntry &m : from(c, [](const CompartmentDecl &x) { return !x.membrane.empty(); }).membrane)
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
             AnalyzedModel &model, const CableMembranes *membranes) {
  size_t before = diags.errorCount();
  Analyzer(symbols, evaluator, diags, model, membranes).run(program);
  return diags.errorCount() == before;
}

bool cutsByLengthConstant(const SymbolTable &symbols) {
  for (auto &[name, decl] : symbols.byName)
    if (auto *c = dyn_cast<CompartmentDecl>(decl); c && c->cable && c->cable->perLengthConstantAt)
      return true;
  return false;
}

} // namespace saltpan
