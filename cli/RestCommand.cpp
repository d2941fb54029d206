// RestCommand.cpp - `saltpan rest`: every steady state of each compartment, or of each tree of
// joined compartments, its stability, gates and currents (the analysis is in Rest.cpp, RestTree.cpp).
#include "Commands.h"
#include "Version.h"

#include "Decimal.h"
#include "Pipeline.h"
#include "Rest.h"
#include "RunSettings.h"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <nlohmann/json.hpp>
#include <optional>

namespace saltpan::cli {

namespace {

const char *restHelp = R"(usage: saltpan rest [options] FILE

Finds every steady state of each compartment with no injected current: the potentials V
where, with every gate at its steady value at V, the total membrane current is zero. V is
scanned on a 0.1 mV grid, each sign change of the current is refined to 1e-12 V, and each
steady state is classified by the eigenvalues of the Jacobian of the model's equations
(V and gates) there: stable when every eigenvalue has a negative real part. For each one
it prints the gates' values and each membrane entry's current density. For a compartment whose
channels are all ungated permeabilities, it also prints the GHK resting potential.

Compartments joined by cables are solved together, each tree as one system: the tree's total
membrane current at one uniform V is scanned as above (the steady states of the tree made
isopotential) and each root is followed by Newton's method to the real axial resistances.
For each steady state of a tree it prints every lumped compartment's V, gates, currents and
input resistance, each cable's V at its ends, lowest and highest, and the tree's stability
from the eigenvalues of the Jacobian of all its states (up to 1000 states; above that,
stability is not assessed). --format json gives the V of every piece.
Conventions: V is inside minus outside; membrane current is positive outward.

options:
  --format text|json  readable summary (default) or one JSON document
  --from V            low end of the scanned potentials (default -150 mV), e.g. -100mV
  --to V              high end (default 100 mV); a bare number is in mV
  --version           print the version
  --help              show this help

exit status: 0 success, 64 bad usage, 65 the spec has errors, 70 internal fault

saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.
)";

int usage(const std::string &message) { return usageError("saltpan", message, restHelp); }

// "-100mV", "-100 mV", "-0.1 V", "-100" (a bare number is in mV) -> volts.
std::optional<double> parseVoltage(const std::string &text) {
  char *end = nullptr;
  double number = std::strtod(text.c_str(), &end);
  if (end != text.c_str() && std::isfinite(number) &&
      text.find_first_not_of(' ', end - text.c_str()) == std::string::npos)
    return number * 1e-3;
  auto q = parseQuantity(text);
  if (!q || q->second != dims::voltage())
    return std::nullopt;
  return q->first;
}

std::string format(const char *fmt, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, fmt, v);
  return buf;
}

std::string eigenvalueText(std::complex<double> e) {
  // per ms
  double re = e.real() * 1e-3, im = e.imag() * 1e-3;
  if (im == 0)
    return format("%.6g", re);
  return format("%.6g", re) + (im < 0 ? " - " : " + ") + format("%.6g", std::fabs(im)) + "i";
}

std::string text(const std::string &modelName, const std::vector<rest::CompartmentRest> &result,
                 const rest::Options &o) {
  std::string out = "model " + (modelName.empty() ? "(unnamed)" : modelName) + ": steady states from " +
                    format("%g", o.from * 1e3) + " to " + format("%g", o.to * 1e3) +
                    " mV (gates at their steady values, no injected current)\n";
  for (const rest::CompartmentRest &c : result) {
    size_t n = c.steadyStates.size();
    out += "\ncompartment " + c.name + ": " + std::to_string(n) + " steady state" + (n == 1 ? "" : "s") + "\n";
    for (const rest::SteadyState &s : c.steadyStates) {
      out += "  V = " + format("%.6f", s.v * 1e3) + " mV  " + (s.stable ? "stable" : "unstable") +
             " (largest real part of an eigenvalue " + format("%.6g", s.maxRealEigenvalue * 1e-3) + " /ms)\n";
      out += "    eigenvalues (/ms):";
      for (size_t i = 0; i < s.eigenvalues.size(); ++i)
        out += (i ? ", " : " ") + eigenvalueText(s.eigenvalues[i]);
      out += "\n";
      if (!s.gates.empty()) {
        out += "    gates:";
        for (size_t i = 0; i < s.gates.size(); ++i)
          out += (i ? ", " : " ") + s.gates[i].name + " " + format("%.6f", s.gates[i].value);
        out += "\n";
      }
      out += "    currents (uA/cm2, outward positive):";
      for (const rest::Named &i : s.currents)
        out += " " + i.name + " " + format("%.6g", i.value) + ",";
      out += " total " + format("%.3g", s.totalCurrent) + "\n";
      out += "    slope conductance " + format("%.6g", s.slopeConductance * 0.1) + " mS/cm2";
      if (s.inputResistance)
        out += ", input resistance " + format("%.6g", *s.inputResistance * 1e-6) + " Mohm";
      out += "\n";
    }
    if (c.ghkRest) {
      out += "  GHK resting potential " + format("%.6f", *c.ghkRest * 1e3) + " mV";
      for (const rest::SteadyState &s : c.steadyStates)
        out += "; steady state minus GHK rest " + format("%.3g", (s.v - *c.ghkRest) * 1e3) + " mV";
      out += "\n";
    }
  }
  return out;
}

// What every document of `saltpan rest` starts with.
nlohmann::ordered_json documentHead(const std::string &modelName, const rest::Options &o) {
  nlohmann::ordered_json doc;
  doc["tool"] = "saltpan";
  doc["version"] = SALTPAN_VERSION;
  doc["caution"] = "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions";
  doc["model"] = modelName.empty() ? nlohmann::ordered_json(nullptr) : nlohmann::ordered_json(modelName);
  doc["range_mV"] = {o.from * 1e3, o.to * 1e3};
  doc["conventions"] = {{"membrane_potential", "inside minus outside"}, {"membrane_current", "positive outward"}};
  return doc;
}

nlohmann::ordered_json eigenvaluesJson(const std::vector<std::complex<double>> &eigenvalues) {
  nlohmann::ordered_json eig = nlohmann::ordered_json::array();
  for (auto e : eigenvalues)
    eig.push_back({{"re", e.real() * 1e-3}, {"im", e.imag() * 1e-3}});
  return eig;
}

// {"name": value, ...} in order, then "total" when given.
nlohmann::ordered_json namedJson(const std::vector<rest::Named> &named, std::optional<double> total = std::nullopt) {
  nlohmann::ordered_json out = nlohmann::ordered_json::object();
  for (const rest::Named &n : named)
    out[n.name] = n.value;
  if (total)
    out["total"] = *total;
  return out;
}

std::string json(const std::string &modelName, const std::vector<rest::CompartmentRest> &result,
                 const rest::Options &o) {
  nlohmann::ordered_json doc = documentHead(modelName, o);
  nlohmann::ordered_json comps = nlohmann::ordered_json::array();
  for (const rest::CompartmentRest &c : result) {
    nlohmann::ordered_json jc;
    jc["name"] = c.name;
    nlohmann::ordered_json states = nlohmann::ordered_json::array();
    for (const rest::SteadyState &s : c.steadyStates) {
      nlohmann::ordered_json js;
      js["V_mV"] = s.v * 1e3;
      js["stable"] = s.stable;
      js["max_real_eigenvalue_per_ms"] = s.maxRealEigenvalue * 1e-3;
      js["eigenvalues_per_ms"] = eigenvaluesJson(s.eigenvalues);
      js["gates"] = namedJson(s.gates);
      js["currents_uA_per_cm2"] = namedJson(s.currents, s.totalCurrent);
      js["slope_conductance_mS_per_cm2"] = s.slopeConductance * 0.1;
      js["input_resistance_MOhm"] =
          s.inputResistance ? nlohmann::ordered_json(*s.inputResistance * 1e-6) : nlohmann::ordered_json(nullptr);
      if (c.ghkRest)
        js["minus_ghk_rest_mV"] = (s.v - *c.ghkRest) * 1e3;
      states.push_back(js);
    }
    jc["steady_states"] = states;
    jc["ghk_rest_mV"] = c.ghkRest ? nlohmann::ordered_json(*c.ghkRest * 1e3) : nlohmann::ordered_json(nullptr);
    comps.push_back(jc);
  }
  doc["compartments"] = comps;
  return doc.dump(2) + "\n";
}

// --- trees of joined compartments ---

const char *treeSearch = "each steady state of the isopotential tree (its total membrane current at one uniform V, "
                         "scanned as for one compartment) continued by Newton's method to the real axial resistances";

// A cable's pieces at one steady state: the ends, the lowest and the highest V.
struct CableSummary {
  const rest::PieceRest *start = nullptr, *end = nullptr, *lowest = nullptr, *highest = nullptr;
};

CableSummary summarise(const rest::TreeRest &tree, const rest::TreeSteadyState &s, const rest::CableSpan &cable) {
  CableSummary out;
  for (size_t k = 0; k < tree.compartments.size(); ++k) {
    size_t c = tree.compartments[k];
    if (c < cable.first || c >= cable.first + cable.pieces)
      continue;
    const rest::PieceRest *p = &s.pieces[k];
    if (!out.start)
      out.start = out.lowest = out.highest = p;
    out.end = p;
    if (p->v < out.lowest->v)
      out.lowest = p;
    if (p->v > out.highest->v)
      out.highest = p;
  }
  return out;
}

bool inCable(const rest::TreeRest &tree, size_t c) {
  for (const rest::CableSpan &cable : tree.cables)
    if (c >= cable.first && c < cable.first + cable.pieces)
      return true;
  return false;
}

std::string count(size_t n, const std::string &what) { return std::to_string(n) + " " + what + (n == 1 ? "" : "s"); }

std::string mV(double v) { return format("%.6f", v * 1e3) + " mV"; }

std::string resistanceText(const std::optional<double> &r) { return r ? format("%.6g", *r * 1e-6) + " Mohm" : "-"; }

std::string stabilityText(const rest::TreeRest &tree, const rest::TreeSteadyState &s) {
  if (!s.stabilityAssessed)
    return "stability not assessed (" + std::to_string(tree.states) + " states, more than the " +
           std::to_string(rest::maxStatesForEigenvalues) + " of the dense eigenvalue analysis)";
  std::string out = std::string(s.stable ? "stable" : "unstable") + " (largest real part of an eigenvalue " +
                    format("%.6g", s.maxRealEigenvalue * 1e-3) + " /ms";
  if (s.stable)
    out += ", slowest time constant " + format("%.6g", -1e3 / s.maxRealEigenvalue) + " ms";
  return out + ")";
}

std::string pieceText(const rest::PieceRest &p, const std::string &indent) {
  std::string out;
  if (!p.gates.empty()) {
    out += indent + "gates:";
    for (size_t i = 0; i < p.gates.size(); ++i)
      out += (i ? ", " : " ") + p.gates[i].name + " " + format("%.6f", p.gates[i].value);
    out += "\n";
  }
  out += indent + "membrane currents (uA/cm2, outward positive):";
  for (const rest::Named &i : p.currents)
    out += " " + i.name + " " + format("%.6g", i.value) + ",";
  out += " total " + format("%.6g", p.membraneCurrent) + "\n";
  out += indent + "slope conductance of its membrane " + format("%.6g", p.slopeConductance * 0.1) + " mS/cm2\n";
  return out;
}

std::string treeText(const rest::TreeRest &tree, const std::vector<std::string> &names) {
  size_t n = tree.steadyStates.size(), lone = 0;
  for (size_t c : tree.compartments)
    lone += inCable(tree, c) ? 0 : 1;
  std::string out = "\ntree of " + names[tree.compartments[0]] + ": " + count(tree.compartments.size(), "compartment") +
                    " (" + std::to_string(lone) + " lumped";
  for (const rest::CableSpan &cable : tree.cables)
    out += ", " + cable.name + " " + count(cable.pieces, "piece");
  out += "), " + count(tree.states, "state") + ": " + count(n, "steady state") + "\n";
  for (size_t i = 0; i < n; ++i) {
    const rest::TreeSteadyState &s = tree.steadyStates[i];
    out += "  steady state " + std::to_string(i + 1) + ": " + stabilityText(tree, s) + "\n";
    if (s.stabilityAssessed) {
      size_t shown = std::min<size_t>(s.eigenvalues.size(), 6);
      out += "    slowest eigenvalues (/ms):";
      for (size_t k = 0; k < shown; ++k)
        out += (k ? ", " : " ") + eigenvalueText(s.eigenvalues[k]);
      out += shown < s.eigenvalues.size()
                 ? " (" + std::to_string(shown) + " of " + std::to_string(s.eigenvalues.size()) + ")\n"
                 : "\n";
    }
    for (size_t k = 0; k < tree.compartments.size(); ++k) {
      if (inCable(tree, tree.compartments[k]))
        continue;
      const rest::PieceRest &p = s.pieces[k];
      out += "    compartment " + p.name + ": V = " + mV(p.v) + ", input resistance " +
             resistanceText(p.inputResistance) + "\n" + pieceText(p, "      ");
    }
    for (const rest::CableSpan &cable : tree.cables) {
      CableSummary c = summarise(tree, s, cable);
      out += "    cable " + cable.name + " (" + count(cable.pieces, "piece") +
             (cable.growsFrom.empty() ? "" : ", grows from " + cable.growsFrom) + "): V = " + mV(c.start->v) + " at " +
             c.start->name + " to " + mV(c.end->v) + " at " + c.end->name + "\n";
      out += "      lowest " + mV(c.lowest->v) + " at " + c.lowest->name + ", highest " + mV(c.highest->v) + " at " +
             c.highest->name + "; input resistance at " + c.end->name + " " + resistanceText(c.end->inputResistance) +
             "\n";
    }
    out += "    largest unbalanced current density " + format("%.3g", s.maxResidual * 100) + " uA/cm2";
    if (tree.compartments.size() > 1)
      out += "; continued from the isopotential tree's steady state at " + mV(s.isopotentialV);
    out += "\n";
  }
  for (const rest::LostState &l : tree.lost)
    out += "  not followed: the isopotential steady state at " + mV(l.isopotentialV) + ": " + l.why + "\n";
  return out;
}

std::string treesText(const std::string &modelName, const std::vector<rest::TreeRest> &trees,
                      const std::vector<std::string> &names, const rest::Options &o) {
  std::string out = "model " + (modelName.empty() ? "(unnamed)" : modelName) + ": steady states from " +
                    format("%g", o.from * 1e3) + " to " + format("%g", o.to * 1e3) +
                    " mV (gates at their steady values, no injected current)\n";
  out += "joined compartments are solved together: " + std::string(treeSearch) + "\n";
  for (const rest::TreeRest &t : trees)
    out += treeText(t, names);
  return out;
}

nlohmann::ordered_json optionalJson(const std::optional<double> &x, double scale) {
  return x ? nlohmann::ordered_json(*x * scale) : nlohmann::ordered_json(nullptr);
}

nlohmann::ordered_json treeStateJson(const rest::TreeRest &tree, const rest::TreeSteadyState &s) {
  nlohmann::ordered_json js;
  js["stability_assessed"] = s.stabilityAssessed;
  js["stable"] = s.stabilityAssessed ? nlohmann::ordered_json(s.stable) : nlohmann::ordered_json(nullptr);
  js["max_real_eigenvalue_per_ms"] =
      optionalJson(s.stabilityAssessed ? std::optional<double>(s.maxRealEigenvalue) : std::nullopt, 1e-3);
  js["slowest_time_constant_ms"] = optionalJson(
      s.stabilityAssessed && s.stable ? std::optional<double>(-1 / s.maxRealEigenvalue) : std::nullopt, 1e3);
  js["eigenvalues_per_ms"] = s.stabilityAssessed ? eigenvaluesJson(s.eigenvalues) : nlohmann::ordered_json(nullptr);
  js["isopotential_V_mV"] = s.isopotentialV * 1e3;
  js["max_unbalanced_current_uA_per_cm2"] = s.maxResidual * 100;
  nlohmann::ordered_json v = nlohmann::ordered_json::array();
  for (const rest::PieceRest &p : s.pieces)
    v.push_back(p.v * 1e3);
  js["V_mV"] = v;
  nlohmann::ordered_json cables = nlohmann::ordered_json::array();
  for (const rest::CableSpan &cable : tree.cables) {
    CableSummary c = summarise(tree, s, cable);
    cables.push_back({{"name", cable.name},
                      {"start_V_mV", c.start->v * 1e3},
                      {"end_V_mV", c.end->v * 1e3},
                      {"lowest_V_mV", c.lowest->v * 1e3},
                      {"lowest_at", c.lowest->name},
                      {"highest_V_mV", c.highest->v * 1e3},
                      {"highest_at", c.highest->name},
                      {"end_input_resistance_MOhm", optionalJson(c.end->inputResistance, 1e-6)}});
  }
  js["cables"] = cables;
  return js;
}

std::string treesJson(const std::string &modelName, const std::vector<rest::TreeRest> &trees,
                      const std::vector<std::string> &names, const rest::Options &o) {
  nlohmann::ordered_json doc = documentHead(modelName, o);
  doc["search"] = treeSearch;
  std::vector<nlohmann::ordered_json> comps(names.size());
  nlohmann::ordered_json jt = nlohmann::ordered_json::array();
  for (size_t t = 0; t < trees.size(); ++t) {
    const rest::TreeRest &tree = trees[t];
    for (size_t k = 0; k < tree.compartments.size(); ++k) {
      nlohmann::ordered_json states = nlohmann::ordered_json::array();
      for (size_t i = 0; i < tree.steadyStates.size(); ++i) {
        const rest::TreeSteadyState &s = tree.steadyStates[i];
        const rest::PieceRest &p = s.pieces[k];
        nlohmann::ordered_json js;
        js["V_mV"] = p.v * 1e3;
        js["stable"] = s.stabilityAssessed ? nlohmann::ordered_json(s.stable) : nlohmann::ordered_json(nullptr);
        js["tree_steady_state"] = i;
        js["gates"] = namedJson(p.gates);
        js["currents_uA_per_cm2"] = namedJson(p.currents, p.membraneCurrent);
        js["slope_conductance_mS_per_cm2"] = p.slopeConductance * 0.1;
        js["input_resistance_MOhm"] = optionalJson(p.inputResistance, 1e-6);
        states.push_back(js);
      }
      nlohmann::ordered_json &jc = comps[tree.compartments[k]];
      jc["name"] = names[tree.compartments[k]];
      jc["tree"] = t;
      jc["steady_states"] = states;
    }
    nlohmann::ordered_json j;
    j["first"] = names[tree.compartments[0]];
    j["compartments"] = tree.compartments.size();
    j["states"] = tree.states;
    j["max_states_for_eigenvalues"] = rest::maxStatesForEigenvalues;
    nlohmann::ordered_json cables = nlohmann::ordered_json::array();
    for (const rest::CableSpan &cable : tree.cables)
      cables.push_back({{"name", cable.name},
                        {"grows_from", cable.growsFrom.empty() ? nlohmann::ordered_json(nullptr)
                                                               : nlohmann::ordered_json(cable.growsFrom)},
                        {"pieces", cable.pieces},
                        {"first_piece", names[cable.first]},
                        {"length_um", tidyDecimal(cable.length * 1e6)}});
    j["cables"] = cables;
    nlohmann::ordered_json states = nlohmann::ordered_json::array();
    for (const rest::TreeSteadyState &s : tree.steadyStates)
      states.push_back(treeStateJson(tree, s));
    j["steady_states"] = states;
    nlohmann::ordered_json lost = nlohmann::ordered_json::array();
    for (const rest::LostState &l : tree.lost)
      lost.push_back({{"isopotential_V_mV", l.isopotentialV * 1e3}, {"why", l.why}});
    j["not_followed"] = lost;
    jt.push_back(j);
  }
  doc["compartments"] = comps;
  doc["trees"] = jt;
  return doc.dump(2) + "\n";
}

} // namespace

int restCommand(const std::vector<std::string> &args) {
  std::string file, fmt = "text";
  rest::Options options;
  OptionParser parser;
  addHelpAndVersion(parser, restHelp);
  parser.value("--format", oneOf(fmt, {"text", "json"}, "--format must be 'text' or 'json'"));
  for (const std::string name : {"--from", "--to"})
    parser.value(name, [&options, name](const std::string &v) -> std::string {
      auto q = parseVoltage(v);
      if (!q)
        return name + " needs a voltage, e.g. -100mV, not '" + v + "'";
      (name == "--from" ? options.from : options.to) = *q;
      return "";
    });
  parser.positional(file, "rest takes one spec file");
  if (auto code = parser.parse(args, usage))
    return *code;
  if (file.empty())
    return usage("no spec file given");
  if (!(options.from < options.to))
    return usage("--from must be below --to");
  if (options.to - options.from > 10.0)
    return usage("the scanned range is wider than 10 V");

  Compilation c;
  if (!compileAndReport(file, c, false))
    return BadInput;
  const ir::Model *unstimulated = c.unstimulated();
  if (!unstimulated) {
    for (const Diagnostic &d : c.unstimulatedDiagnostics().all())
      std::fputs(renderText(d).c_str(), stderr);
    return BadInput;
  }
  const ir::Model &model = *unstimulated;
  std::string out;
  try {
    if (model.junctions.empty()) {
      std::vector<rest::CompartmentRest> result = rest::findSteadyStates(model, &c.model, options);
      out = fmt == "json" ? json(model.name, result, options) : text(model.name, result, options);
    } else {
      std::vector<rest::TreeRest> trees = rest::findTreeSteadyStates(model, &c.model, options);
      std::vector<std::string> names;
      for (const ir::Compartment &comp : model.compartments)
        names.push_back(comp.name);
      out = fmt == "json" ? treesJson(model.name, trees, names, options) : treesText(model.name, trees, names, options);
    }
  } catch (const std::exception &e) {
    std::fprintf(stderr, "saltpan: internal error: %s\n", e.what());
    return InternalFault;
  }
  std::fputs(out.c_str(), stdout);
  if (!model.pools.empty()) {
    bool one = model.pools.size() == 1;
    std::fprintf(stderr,
                 "note: %zu dynamic concentration%s held at %s initial value%s; they are not part of the "
                 "steady states or their stability\n",
                 model.pools.size(), one ? " is" : "s are", one ? "its" : "their", one ? "" : "s");
  }
  return Ok;
}

} // namespace saltpan::cli
