// CheckCharge.cpp - Stage 6: every ion's charge is known and conserved by the model.
#include "CheckCharge.h"

#include "Analyze.h"
#include "Diagnostics.h"

#include <cmath>
#include <cstdio>

namespace saltpan {

using namespace ast;

namespace {

std::string number(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

std::string signedMillimolar(double v) {
  char buf[48];
  std::snprintf(buf, sizeof buf, "%+.4g mM", v);
  return buf;
}

class ChargeChecker {
public:
  ChargeChecker(const AnalyzedModel &model, DiagnosticEngine &diags) : model_(model), diags_(diags) {}

  void run(const Program &program) {
    for (auto &m : program.modules)
      for (auto &d : m->decls) {
        if (auto *ion = dyn_cast<IonDecl>(d.get()))
          valence(*ion);
        else if (auto *ch = dyn_cast<ChannelDecl>(d.get()))
          channel(*ch);
        else if (auto *p = dyn_cast<PumpDecl>(d.get()))
          pump(*p);
        else if (auto *s = dyn_cast<SolutionDecl>(d.get()))
          if (auto it = model_.baths.find(s); it != model_.baths.end())
            electroneutrality(s->body, it->second, "outside solution '" + s->name + "'");
      }
    for (const CompartmentValues &c : model_.compartments) {
      if (c.piece > 0) // a cable's pieces share what is checked here
        continue;
      if (c.decl->hasInside)
        electroneutrality(c.decl->inside, c.inside, "the inside of compartment '" + c.decl->name + "'");
      for (const Placement &p : c.placements)
        placement(p, c);
    }
  }

private:
  const AnalyzedModel &model_;
  DiagnosticEngine &diags_;

  void valence(const IonDecl &ion) {
    double z = ion.valence.value;
    if (z == 0) {
      auto &d = diags_.error(ion.valence.range, "ion '" + ion.name + "' has valence 0");
      DiagnosticEngine::note(d, {}, "an ion's valence is a non-zero whole number, such as +1 or -2; "
                                    "neutral solutes do not carry current");
    } else if (z != std::floor(z)) {
      diags_.error(ion.valence.range, "the valence of '" + ion.name + "' must be a whole number, not " + number(z));
    } else if (std::fabs(z) > 3) {
      diags_.warning(ion.valence.range, "ion '" + ion.name + "' has an unusually large valence (" + number(z) +
                                            "); permeant ions have valences from -3 to +3");
    }
  }

  void channel(const ChannelDecl &ch) {
    if (ch.carries.empty() && !ch.reversal) {
      auto &d = diags_.error(ch.nameRange, "channel '" + ch.name + "' carries no ion and has no reversal potential");
      DiagnosticEngine::note(d, {}, "add 'carries K' (Nernst reversal) or 'reversal -54 mV'");
      return;
    }
    if (ch.carries.size() > 1) {
      for (const CarriedIon &k : ch.carries)
        if (!k.hasRatio) {
          auto &d = diags_.error(k.range, "channel '" + ch.name + "' carries several ions, so '" + k.ion +
                                              "' needs a permeability ratio");
          DiagnosticEngine::note(d, {}, "write e.g. 'carries Na 1, K 1.3': the ratios set the GHK reversal potential");
        }
    } else if (ch.carries.size() == 1 && ch.carries[0].hasRatio && ch.carries[0].ratio.value != 1) {
      diags_.warning(ch.carries[0].ratio.range, "a permeability ratio has no effect when a channel carries one ion");
    }
    for (const CarriedIon &k : ch.carries)
      if (k.hasRatio && k.ratio.value <= 0)
        diags_.error(k.ratio.range, "the permeability ratio of '" + k.ion + "' must be positive");
  }

  void pump(const PumpDecl &p) {
    std::string what = std::string(p.exchanger ? "exchanger" : "pump") + " '" + p.name + "'";
    if (p.cycle.empty()) {
      auto &d = diags_.error(p.nameRange, what + " has no cycle");
      DiagnosticEngine::note(d, {}, "say what one cycle moves, e.g. 'cycle 3 Na out, 2 K in'");
    }
    if (!p.activity) {
      auto &d = diags_.error(p.nameRange, what + " has no activity law");
      DiagnosticEngine::note(d, {},
                             "give the fraction of the maximal rate, e.g. 'activity = hill([Na]in, 10 mM, 1.5)'");
    }
    bool in = false, out = false;
    for (size_t i = 0; i < p.cycle.size(); ++i) {
      const StoichTerm &t = p.cycle[i];
      (t.direction == Direction::In ? in : out) = true;
      double n = t.count.value;
      if (n <= 0 || n != std::floor(n))
        diags_.error(t.count.range, "a cycle moves a positive whole number of ions, not " + number(n));
      for (size_t j = 0; j < i; ++j)
        if (p.cycle[j].ion == t.ion) {
          auto &d = diags_.error(t.ionRange, "'" + t.ion + "' appears twice in the cycle of " + what);
          DiagnosticEngine::note(d, p.cycle[j].range, "first listed here");
        }
    }
    if (p.exchanger && !p.cycle.empty() && !(in && out)) {
      auto &d = diags_.error(p.cycleRange, "exchanger '" + p.name + "' moves ions only " + (in ? "in" : "out"));
      DiagnosticEngine::note(d, {}, "an exchanger swaps ions across the membrane; declare a one-way mover as a 'pump'");
    }
  }

  void placement(const Placement &p, const CompartmentValues &c) {
    const MembraneEntry &m = *p.entry;
    if (p.pump) {
      auto it = model_.pumps.find(p.pump);
      if (m.reversal) {
        auto &d = diags_.error(m.reversal->range, "a pump has no reversal potential to set");
        DiagnosticEngine::note(d, {}, "its current follows from its cycle and activity");
      }
      if (it != model_.pumps.end() && it->second.chargeKnown && it->second.netOutwardCharge == 0 &&
          p.densityKind == DensityKind::Current) {
        auto &d = diags_.error(m.density->range, "'" + p.pump->name +
                                                     "' moves no net charge per cycle, so it cannot carry a current");
        DiagnosticEngine::note(d, p.pump->cycleRange, "this cycle is electroneutral");
        DiagnosticEngine::note(d, {}, "give its density as a cycle rate per area, e.g. 1e-12 mol/cm2/s");
      }
      for (const StoichTerm &t : p.pump->cycle)
        presentOnBothSides(t.target, c, m, "moves");
      return;
    }
    if (!p.channel)
      return;
    // Ions must be present on both sides when the reversal comes from concentrations.
    if (p.reversalKind == ReversalKind::Nernst || p.reversalKind == ReversalKind::Ghk)
      for (const CarriedIon &k : p.channel->carries)
        presentOnBothSides(k.target, c, m, "carries");
  }

  void presentOnBothSides(const IonDecl *ion, const CompartmentValues &c, const MembraneEntry &m, const char *verb) {
    if (!ion)
      return;
    bool inside = c.inside.get(ion).has_value();
    bool outside = c.outside && c.outside->get(ion).has_value();
    if (inside && outside)
      return;
    std::string side = !inside && !outside ? "on either side" : !inside ? "inside" : "outside";
    auto &d = diags_.error(m.nameRange, "'" + m.name + "' " + verb + " '" + ion->name + "', but compartment '" +
                                            c.decl->name + "' has no concentration of '" + ion->name + "' " + side);
    if (!inside)
      DiagnosticEngine::note(d, c.decl->hasInside ? c.decl->inside.range : c.decl->nameRange,
                             "add '[" + ion->name + "] = ...' to the inside of '" + c.decl->name + "'");
    if (!outside && c.bath)
      DiagnosticEngine::note(d, c.bath->nameRange, "add '[" + ion->name + "] = ...' to outside solution '" +
                                                       c.bath->name + "'");
  }

  void electroneutrality(const SolutionBody &body, const SolutionValues &values, const std::string &what) {
    bool valencesKnown = true;
    for (const ImpermeantEntry &i : body.impermeants) {
      double z = i.valence.value;
      if (z == 0 || z != std::floor(z)) {
        diags_.error(i.valence.range, "an impermeant ion's valence must be a non-zero whole number, not " + number(z));
        valencesKnown = false;
      }
    }
    if (values.concentration.empty() || !valencesKnown)
      return;
    double positive = 0, negative = 0;
    for (auto &[ion, c] : values.concentration) {
      auto z = integerValence(*ion);
      if (!z)
        return; // its valence is reported on its own
      (*z > 0 ? positive : negative) += std::fabs(*z * c);
    }
    for (auto &[z, c] : values.impermeant)
      (z > 0 ? positive : negative) += std::fabs(z * c);
    double net = positive - negative; // mol/m^3 of charge = mM
    // A small mismatch is rounding in published recipes; half a millimolar is not.
    if (std::fabs(net) <= 0.5)
      return;
    auto &d = diags_.warning(body.range, what + " is not electroneutral: net charge " + signedMillimolar(net));
    char buf[160];
    std::snprintf(buf, sizeof buf, "cations carry %.4g mM and anions %.4g mM of charge", positive, negative);
    DiagnosticEngine::note(d, {}, buf);
    DiagnosticEngine::note(d, {}, std::string("declare the missing ions, or the fixed charge as 'impermeant ") +
                                      number(std::fabs(net)) + " mM valence " + (net > 0 ? "-1" : "+1") + "'");
  }
};

} // namespace

bool checkCharge(const Program &program, const AnalyzedModel &model, DiagnosticEngine &diags) {
  size_t before = diags.errorCount();
  ChargeChecker(model, diags).run(program);
  return diags.errorCount() == before;
}

} // namespace saltpan
