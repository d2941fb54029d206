// TraceOutput.cpp - CSV and JSON of recorded traces.
#include "TraceOutput.h"

#include "Decimal.h"

#include <cstdio>
#include <nlohmann/json.hpp>

namespace saltpan {

std::string traceCsv(const Trace &trace) {
  std::string out = "time (ms)";
  for (size_t c = 0; c < trace.columns(); ++c)
    out += "," + trace.names[c] + " (" + trace.units[c] + ")";
  out += "\n";
  char buf[40];
  for (size_t r = 0; r < trace.time.size(); ++r) {
    std::snprintf(buf, sizeof buf, "%.10g", withoutNegativeZero(trace.time[r] * 1e3));
    out += buf;
    for (size_t c = 0; c < trace.columns(); ++c) {
      std::snprintf(buf, sizeof buf, ",%.12g", withoutNegativeZero(trace.at(r, c)));
      out += buf;
    }
    out += "\n";
  }
  return out;
}

std::string traceJson(const Trace &trace, const ir::Model &model, const std::string &modelHash,
                      const std::string &version) {
  nlohmann::ordered_json doc;
  doc["tool"] = "saltpan";
  doc["version"] = version;
  doc["model_hash"] = modelHash;
  doc["caution"] = "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions";
  doc["model"] = model.name.empty() ? nlohmann::ordered_json(nullptr) : nlohmann::ordered_json(model.name);
  doc["protocol"] = model.protocol.name;
  doc["method"] = ir::methodName(model.protocol.method);
  doc["step_ms"] = tidyDecimal(model.protocol.step * 1e3);
  doc["conventions"] = {{"membrane_potential", "inside minus outside"},
                        {"membrane_current", "positive outward"},
                        {"injected_current", "positive into the cell"}};
  std::vector<double> ms;
  for (double t : trace.time)
    ms.push_back(tidyDecimal(t * 1e3));
  doc["time_ms"] = ms;
  nlohmann::ordered_json columns = nlohmann::ordered_json::array();
  for (size_t c = 0; c < trace.columns(); ++c) {
    std::vector<double> values;
    for (size_t r = 0; r < trace.time.size(); ++r)
      values.push_back(withoutNegativeZero(trace.at(r, c)));
    columns.push_back({{"name", trace.names[c]}, {"unit", trace.units[c]}, {"values", values}});
  }
  doc["columns"] = columns;
  return doc.dump(2) + "\n";
}

bool isJsonPath(const std::string &path) { return path.size() > 5 && path.substr(path.size() - 5) == ".json"; }

} // namespace saltpan
