// ValuesDump.cpp - `saltpan check --emit values`: every value Analyze computed (stage 5), in
// coherent SI and shortest exact decimals, so a number can be traced before lowering folds it.
#include "Analyze.h"
#include "Decimal.h"
#include "DisplayUnits.h"

#include <algorithm>
#include <sstream>

namespace saltpan {

namespace {

std::string value(std::optional<double> v, const char *unit) {
  return v ? shortestDecimal(*v) + (*unit ? std::string(" ") + unit : "") : std::string("unknown");
}

// Ions in the compartment's order (by name): the maps are keyed by pointer.
void solution(std::ostringstream &out, const char *side, const SolutionValues &s,
              const std::vector<const ast::IonDecl *> &ions) {
  for (const ast::IonDecl *ion : ions)
    if (auto c = s.get(ion))
      out << "  [" << ion->name << "]" << side << " = " << shortestDecimal(*c) << " mol/m3\n";
  for (const auto &[valence, amount] : s.impermeant)
    out << "  impermeant valence " << shortestDecimal(valence) << " " << side << " = " << shortestDecimal(amount)
        << " mol/m3\n";
}

} // namespace

const char *reversalSpelling(ReversalKind k) {
  switch (k) {
  case ReversalKind::Nernst: return "nernst";
  case ReversalKind::Ghk: return "ghk";
  case ReversalKind::Written: return "written";
  case ReversalKind::None: break;
  }
  return "none";
}

std::string dumpValues(const AnalyzedModel &m) {
  std::ostringstream out;
  out << "temperature " << value(m.temperature, "K") << "\n";
  for (const CompartmentValues &c : m.compartments) {
    out << "compartment " << c.decl->name << "\n";
    out << "  area " << value(c.area, "m2") << "\n";
    out << "  volume " << value(c.volume, "m3") << "\n";
    out << "  capacitance " << value(c.capacitance, "F/m2") << "\n";
    out << "  initial V " << value(c.initialV, "V") << "\n";
    solution(out, "in", c.inside, c.ions);
    if (c.outside)
      solution(out, "out", *c.outside, c.ions);
    for (const ast::IonDecl *ion : c.ions)
      out << "  E(" << ion->name << ") " << value(m.temperature ? c.nernst(ion, *m.temperature) : std::nullopt, "V")
          << "\n";
    for (const Placement &p : c.placements) {
      const char *what = p.channel ? "channel" : "pump";
      std::string name = p.channel ? p.channel->name : p.pump ? p.pump->name : "?";
      out << "  " << what << " " << name << " density " << value(p.density, densitySiUnit(p.densityKind))
          << " reversal " << reversalSpelling(p.reversalKind) << " " << value(p.reversal, "V");
      if (p.concentrationReversal && p.reversalKind == ReversalKind::Written)
        out << " (concentrations give " << shortestDecimal(*p.concentrationReversal) << " V)";
      out << "\n";
    }
    for (const CompartmentValues::Pool &pool : c.pools)
      out << "  dynamic [" << pool.ion->name << "]in area/volume " << shortestDecimal(pool.areaPerVolume) << " 1/m\n";
    out << "  ghk rest " << value(c.ghkRest, "V") << " from " << c.ghkChannels << " channel"
        << (c.ghkChannels == 1 ? "" : "s") << "\n";
  }
  std::vector<std::pair<std::string, PumpValues>> pumps; // by name: the map is keyed by pointer
  for (const auto &[pump, v] : m.pumps)
    pumps.emplace_back(pump->name, v);
  std::sort(pumps.begin(), pumps.end(), [](auto &a, auto &b) { return a.first < b.first; });
  for (const auto &[name, v] : pumps)
    out << "pump " << name << " net outward charge "
        << (v.chargeKnown ? std::to_string(v.netOutwardCharge) : std::string("unknown")) << " per cycle\n";
  return out.str();
}

} // namespace saltpan
