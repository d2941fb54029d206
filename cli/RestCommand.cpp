// RestCommand.cpp - `saltpan rest`: every steady state of each compartment, its stability,
// gates and currents (the analysis is in Rest.cpp).
#include "Commands.h"
#include "Version.h"

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

std::string json(const std::string &modelName, const std::vector<rest::CompartmentRest> &result,
                 const rest::Options &o) {
  nlohmann::ordered_json doc;
  doc["tool"] = "saltpan";
  doc["version"] = SALTPAN_VERSION;
  doc["caution"] = "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions";
  doc["model"] = modelName.empty() ? nlohmann::ordered_json(nullptr) : nlohmann::ordered_json(modelName);
  doc["range_mV"] = {o.from * 1e3, o.to * 1e3};
  doc["conventions"] = {{"membrane_potential", "inside minus outside"}, {"membrane_current", "positive outward"}};
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
      nlohmann::ordered_json eig = nlohmann::ordered_json::array();
      for (auto e : s.eigenvalues)
        eig.push_back({{"re", e.real() * 1e-3}, {"im", e.imag() * 1e-3}});
      js["eigenvalues_per_ms"] = eig;
      nlohmann::ordered_json gates = nlohmann::ordered_json::object();
      for (const rest::Named &g : s.gates)
        gates[g.name] = g.value;
      js["gates"] = gates;
      nlohmann::ordered_json currents = nlohmann::ordered_json::object();
      for (const rest::Named &i : s.currents)
        currents[i.name] = i.value;
      currents["total"] = s.totalCurrent;
      js["currents_uA_per_cm2"] = currents;
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
  if (!model.junctions.empty()) {
    std::fprintf(stderr, "saltpan: error: %s\n", rest::notForJoinedCompartments);
    return BadInput;
  }
  std::vector<rest::CompartmentRest> result;
  try {
    result = rest::findSteadyStates(model, &c.model, options);
  } catch (const std::exception &e) {
    std::fprintf(stderr, "saltpan: internal error: %s\n", e.what());
    return InternalFault;
  }
  std::string out = fmt == "json" ? json(model.name, result, options) : text(model.name, result, options);
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
