// Show.cpp - renders the analysed model: concentrations, reversal potentials, GHK rest.
#include "Show.h"

#include "Decimal.h"
#include "Version.h"

#include "DisplayUnits.h"
#include "Physics.h"
#include "Pipeline.h"

#include <algorithm>
#include <cstdio>
#include <nlohmann/json.hpp>

namespace saltpan {

using namespace ast;
using json = nlohmann::ordered_json;

namespace {

const CableValues *cableOf(const AnalyzedModel &m, const CompartmentValues &cv) {
  for (const CableValues &c : m.cables)
    if (c.decl == cv.decl)
      return &c;
  return nullptr;
}

const char *caution = "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions";

// 15 significant digits: unit scaling (0.009 F/m2 -> 0.9 uF/cm2) leaves no 0.8999999999999999.
double tidy(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.15g", v);
  return std::strtod(buf, nullptr);
}

json optional(std::optional<double> v, double scale = 1) { return v ? json(tidy(*v * scale)) : json(nullptr); }

bool isDynamic(const CompartmentValues &c, const IonDecl *ion) {
  return std::any_of(c.pools.begin(), c.pools.end(), [ion](auto &p) { return p.ion == ion; });
}

// The steady states found for compartment `name`, or null when it was not analysed.
const rest::CompartmentRest *steadyOf(const std::vector<rest::CompartmentRest> &steady, const std::string &name) {
  for (const rest::CompartmentRest &r : steady)
    if (r.name == name)
      return &r;
  return nullptr;
}

// Where a compartment, or a cable's pieces, sit in a tree's steady states: pieces first..last.
struct TreeSpan {
  const rest::TreeRest *tree = nullptr;
  size_t first = 0, last = 0;
};

TreeSpan spanOf(const ShownRest &rest, const CompartmentValues &cv) {
  TreeSpan span;
  if (!rest.model)
    return span;
  for (const rest::TreeRest &tree : rest.trees)
    for (size_t k = 0; k < tree.compartments.size(); ++k) {
      const std::string &name = rest.model->compartments[tree.compartments[k]].name;
      bool mine = cv.piece < 0 ? name == cv.decl->name : name.rfind(cv.decl->name + "[", 0) == 0;
      if (!mine)
        continue;
      if (!span.tree)
        span = {&tree, k, k};
      span.last = k;
    }
  return span;
}

json stability(const rest::TreeSteadyState &s) { return s.stabilityAssessed ? json(s.stable) : json(nullptr); }

// A tree's steady states as seen from one compartment (its V) or one cable (its first and last
// piece's V).
json treeStatesJson(const TreeSpan &span, bool cable) {
  json states = json::array();
  for (const rest::TreeSteadyState &s : span.tree->steadyStates) {
    if (cable)
      states.push_back({{"start_V_mV", tidy(s.pieces[span.first].v * 1e3)},
                        {"end_V_mV", tidy(s.pieces[span.last].v * 1e3)},
                        {"stable", stability(s)}});
    else
      states.push_back({{"V_mV", tidy(s.pieces[span.first].v * 1e3)}, {"stable", stability(s)}});
  }
  return states;
}

// Whether the GHK potential of the ungated permeabilities is the compartment's rest: only when
// nothing else (gated or ohmic channels, pumps) carries current.
bool ghkIsRest(const CompartmentValues &c) { return c.ghkRest && c.ghkChannels == c.placements.size(); }

json compartmentJson(const CompartmentValues &c, const AnalyzedModel &m, const rest::CompartmentRest *steady) {
  json ions = json::array();
  for (const IonDecl *ion : c.ions) {
    auto z = integerValence(*ion);
    ions.push_back({{"ion", ion->name},
                    {"charge", z ? json(*z) : json(nullptr)},
                    {"inside_mM", optional(c.inside.get(ion))},
                    {"inside_dynamic", isDynamic(c, ion)},
                    {"outside_mM", optional(c.outside ? c.outside->get(ion) : std::nullopt)},
                    {"reversal_mV", optional(m.temperature ? c.nernst(ion, *m.temperature) : std::nullopt, 1e3)}});
  }
  json membrane = json::array();
  for (const Placement &p : c.placements) {
    json entry{{"entry", p.entry->name},
               {"kind", p.channel ? "channel"
                        : p.pump  ? (p.pump->exchanger ? "exchanger" : "pump")
                                  : "unknown"},
               {"density", optional(p.density, densityUnit(p.densityKind).scale)},
               {"density_unit", densityUnit(p.densityKind).name}};
    if (p.channel) {
      entry["reversal_mV"] = optional(p.reversal, 1e3);
      entry["reversal_from"] = reversalSpelling(p.reversalKind);
    }
    membrane.push_back(entry);
  }
  json states = nullptr;
  if (steady) {
    states = json::array();
    for (const rest::SteadyState &st : steady->steadyStates)
      states.push_back({{"V_mV", tidy(st.v * 1e3)}, {"stable", st.stable}});
  }
  json shape = nullptr;
  if (c.decl->geometry.shape == Shape::Sphere)
    shape = "sphere";
  else if (c.decl->geometry.shape == Shape::Cylinder)
    shape = "cylinder";
  else if (c.decl->geometry.shape == Shape::Area)
    shape = "area";
  return {{"name", c.decl->name},
          {"outside", c.bath ? json(c.bath->name) : json(nullptr)},
          {"geometry", shape},
          {"area_um2", optional(c.area, 1e12)},
          {"capacitance_uF_per_cm2", optional(c.capacitance, 100)},
          {"initial_mV", optional(c.initialV, 1e3)},
          {"ions", ions},
          {"ghk_rest_mV", optional(c.ghkRest, 1e3)},
          {"ghk_channels", c.ghkChannels},
          {"ghk_rest_is_rest", ghkIsRest(c)},
          {"steady_states", states},
          {"membrane", membrane}};
}

} // namespace

std::string showJson(const Compilation &c, const ShownRest &rest) {
  const AnalyzedModel &m = c.model;
  json doc;
  doc["tool"] = "saltpan";
  doc["version"] = SALTPAN_VERSION;
  doc["model_hash"] = c.modelHash();
  doc["caution"] = caution;
  doc["model"] = m.header ? json(m.header->name) : json(nullptr);
  doc["title"] = m.header && !m.header->title.empty() ? json(m.header->title) : json(nullptr);
  doc["conventions"] = {{"membrane_potential", "inside minus outside"},
                        {"membrane_current", "positive outward"},
                        {"reversal", "Nernst (RT/zF) ln(out/in) with concentrations, not activities"}};
  doc["constants"] = {{"R_J_per_mol_K", physics::gasConstant}, {"F_C_per_mol", physics::faraday}};
  doc["temperature_K"] = optional(m.temperature);
  doc["temperature_degC"] = m.temperature ? json(*m.temperature - physics::zeroCelsius) : json(nullptr);
  json compartments = json::array(), cables = json::array();
  for (const CompartmentValues &cv : m.compartments) {
    const CableValues *cable = cableOf(m, cv);
    TreeSpan span = spanOf(rest, cv);
    if (!cable) {
      json j = compartmentJson(cv, m, steadyOf(rest.each, cv.decl->name));
      if (span.tree)
        j["steady_states"] = treeStatesJson(span, false);
      compartments.push_back(j);
      continue;
    }
    if (cv.piece > 0)
      continue;
    const CableShape &shape = *cv.decl->cable;
    json j = compartmentJson(cv, m, nullptr); // the first piece: membrane, solutions, capacitance
    if (span.tree)
      j["steady_states"] = treeStatesJson(span, true);
    j["grows_from"] = shape.parentDecl ? json(shape.parent) : json(nullptr);
    j["length_um"] = tidyDecimal(cable->length * 1e6);
    j["diameter_um"] = tidyDecimal(cable->diameter * 1e6);
    j["diameter_end_um"] = tidyDecimal(cable->diameterEnd * 1e6);
    j["axial_resistivity_ohm_cm"] = tidyDecimal(cable->axialResistivity * 100);
    j["pieces"] = cable->pieces;
    j["piece_length_um"] = tidyDecimal(cable->pieceLength() * 1e6);
    j["cut_by_length_constant"] = cable->cutLengthConstant
                                      ? json{{"pieces_per_length_constant", shape.pieces},
                                             {"frequency_Hz", *cable->cutFrequency},
                                             {"length_constant_um", *cable->cutLengthConstant * 1e6}}
                                      : json(nullptr);
    j["length_constant_um"] = cable->lengthConstant ? json(*cable->lengthConstant * 1e6) : json(nullptr);
    j["electrotonic_length"] = cable->lengthConstant ? json(cable->length / *cable->lengthConstant) : json(nullptr);
    cables.push_back(j);
  }
  doc["compartments"] = compartments;
  json pumps = json::array();
  std::vector<std::pair<const PumpDecl *, PumpValues>> sorted(m.pumps.begin(), m.pumps.end());
  std::sort(sorted.begin(), sorted.end(), [](auto &a, auto &b) { return a.first->name < b.first->name; });
  for (auto &[pump, values] : sorted) {
    json cycle = json::array();
    for (const StoichTerm &t : pump->cycle)
      cycle.push_back(
          {{"ion", t.ion}, {"count", t.count.value}, {"direction", t.direction == Direction::In ? "in" : "out"}});
    pumps.push_back({{"name", pump->name},
                     {"kind", pump->exchanger ? "exchanger" : "pump"},
                     {"cycle", cycle},
                     {"net_charge_out_per_cycle", values.chargeKnown ? json(values.netOutwardCharge) : json(nullptr)}});
  }
  doc["pumps"] = pumps;
  if (!cables.empty()) // absent without cables: every other document reads as before
    doc["cables"] = cables;
  return doc.dump(2) + "\n";
}

namespace {
std::string num(const char *format, std::optional<double> v, double scale = 1) {
  if (!v)
    return "-";
  char buf[48];
  std::snprintf(buf, sizeof buf, format, *v * scale);
  return buf;
}

} // namespace

std::string showText(const Compilation &c, const ShownRest &rest) {
  const AnalyzedModel &m = c.model;
  std::string out;
  auto line = [&](const std::string &s) { out += s + "\n"; };
  line("model " + std::string(m.header ? m.header->name : "(unnamed)") +
       (m.header && !m.header->title.empty() ? " - " + m.header->title : ""));
  line("temperature " + num("%.2f K", m.temperature) + " (" +
       num("%.2f degC", m.temperature ? std::optional<double>(*m.temperature - physics::zeroCelsius) : std::nullopt) +
       ")");
  line("conventions: V is inside minus outside; membrane current is positive outward");
  for (const CompartmentValues &cv : m.compartments) {
    if (cv.piece > 0)
      continue; // a cable is shown once, as its first piece and its shape
    line("");
    const CableValues *cable = cableOf(m, cv);
    if (!cable)
      line("compartment " + cv.decl->name + " (outside: " + (cv.bath ? cv.bath->name : "-") + ")");
    else {
      const CableShape &shape = *cv.decl->cable;
      line("cable " + cv.decl->name + " (" + (shape.parentDecl ? "grows from " + shape.parent + "; " : "") +
           "outside: " + (cv.bath ? cv.bath->name : "-") + ")");
      line("  length " + num("%.6g um", cable->length, 1e6) + ", diameter " + num("%.4g um", cable->diameter, 1e6) +
           (cable->diameterEnd != cable->diameter ? " to " + num("%.4g um", cable->diameterEnd, 1e6) : "") +
           ", axial resistivity " + num("%.4g ohm*cm", cable->axialResistivity, 100) + ", " +
           std::to_string(cable->pieces) + (cable->pieces == 1 ? " piece of " : " pieces of ") +
           num("%.4g um", cable->pieceLength(), 1e6) +
           (cable->cutLengthConstant ? " (at most 1/" + std::to_string(shape.pieces) + " of its length constant at " +
                                           num("%.4g Hz", cable->cutFrequency, 1) + ", " +
                                           num("%.4g um", cable->cutLengthConstant, 1e6) + ")"
                                     : std::string()));
      line("  length constant at rest " + num("%.4g um", cable->lengthConstant, 1e6) + ", electrotonic length " +
           num("%.4g",
               cable->lengthConstant ? std::optional<double>(cable->length / *cable->lengthConstant) : std::nullopt));
    }
    line("  " + std::string(cable ? "first piece's area " : "area ") + num("%.6g um2", cv.area, 1e12) +
         ", capacitance " + num("%.4g uF/cm2", cv.capacitance, 100) + ", initial V " +
         num("%.4g mV", cv.initialV, 1e3));
    if (cv.ions.empty())
      line("  (no concentrations given)");
    char header[128];
    std::snprintf(header, sizeof header, "  %-8s %6s %12s %12s %14s", "ion", "charge", "inside mM", "outside mM",
                  "reversal mV");
    if (!cv.ions.empty())
      line(header);
    for (const IonDecl *ion : cv.ions) {
      auto z = integerValence(*ion);
      char row[160];
      std::string inside = num("%.6g", cv.inside.get(ion)) + (isDynamic(cv, ion) ? "*" : "");
      std::snprintf(row, sizeof row, "  %-8s %6s %12s %12s %14s", ion->name.c_str(), z ? num("%+.0f", double(*z)).c_str() : "?",
                    inside.c_str(),
                    num("%.6g", cv.outside ? cv.outside->get(ion) : std::nullopt).c_str(),
                    num("%.3f", m.temperature ? cv.nernst(ion, *m.temperature) : std::nullopt, 1e3).c_str());
      line(row);
    }
    if (!cv.pools.empty())
      line("  * dynamic: changed by the ion's currents during a run (the initial value is shown)");
    std::string channels = std::to_string(cv.ghkChannels) + " ungated permeability channel" +
                           (cv.ghkChannels == 1 ? "" : "s");
    if (ghkIsRest(cv))
      line("  GHK resting potential " + num("%.3f mV", cv.ghkRest, 1e3) + " (from " + channels + ")");
    else if (cv.ghkRest)
      line("  GHK potential of the " + channels + " " + num("%.3f mV", cv.ghkRest, 1e3) +
           " (not the rest: other channels or pumps carry current too)");
    if (TreeSpan span = spanOf(rest, cv); span.tree) {
      std::string states;
      for (const rest::TreeSteadyState &s : span.tree->steadyStates) {
        std::string v = num("%.3f mV", s.pieces[span.first].v, 1e3);
        if (cable)
          v = num("%.3f", s.pieces[span.first].v, 1e3) + " to " + num("%.3f mV", s.pieces[span.last].v, 1e3);
        states += (states.empty() ? "" : ", ") + v +
                  (!s.stabilityAssessed ? " (stability not assessed)"
                   : s.stable           ? " (stable)"
                                        : " (unstable)");
      }
      bool alone = span.tree->compartments.size() == 1; // joined to nothing
      line(std::string(alone ? "  rest with every channel and pump" : "  rest of its tree") +
           (cable ? ", first piece to last: " : ": ") +
           (states.empty() ? std::string("none between -150 and +100 mV") : states));
    } else if (const rest::CompartmentRest *r = steadyOf(rest.each, cv.decl->name); r && !ghkIsRest(cv)) {
      std::string states;
      for (const rest::SteadyState &st : r->steadyStates)
        states += (states.empty() ? "" : ", ") + num("%.3f mV", st.v, 1e3) + (st.stable ? " (stable)" : " (unstable)");
      line("  rest with every channel and pump: " +
           (states.empty() ? std::string("none between -150 and +100 mV") : states));
    }
    for (const Placement &p : cv.placements) {
      std::string s = "  " + p.entry->name + ": " + num("%.6g", p.density, densityUnit(p.densityKind).scale) + " " +
                      densityUnit(p.densityKind).name;
      if (p.channel)
        s += ", reversal " + num("%.3f mV", p.reversal, 1e3) + " (" + reversalSpelling(p.reversalKind) + ")";
      line(s);
    }
  }
  if (!m.pumps.empty()) {
    line("");
    std::vector<std::pair<const PumpDecl *, PumpValues>> sorted(m.pumps.begin(), m.pumps.end());
    std::sort(sorted.begin(), sorted.end(), [](auto &a, auto &b) { return a.first->name < b.first->name; });
    for (auto &[pump, values] : sorted)
      line(std::string(pump->exchanger ? "exchanger " : "pump ") + pump->name + ": net charge out per cycle " +
           (values.chargeKnown ? num("%+.0f", double(values.netOutwardCharge)) : "?"));
  }
  line("");
  line("saltpan " + std::string(SALTPAN_VERSION) + ", model " + c.modelHash());
  line(std::string("note: ") + caution);
  return out;
}

} // namespace saltpan
