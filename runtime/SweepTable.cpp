// SweepTable.cpp - CSV and JSON of sweep results.
#include "SweepTable.h"
#include "TraceOutput.h"

#include <nlohmann/json.hpp>

#include <charconv>
#include <cmath>

namespace saltpan::sweep {

void shardRange(uint64_t total, int index, int count, uint64_t &first, uint64_t &size) {
  // total * i / count without overflow: total is at most 1e8 points, count at most 1e6.
  auto at = [&](int i) {
    return total / static_cast<uint64_t>(count) * static_cast<uint64_t>(i) +
           total % static_cast<uint64_t>(count) * static_cast<uint64_t>(i) / static_cast<uint64_t>(count);
  };
  first = at(index);
  size = at(index + 1) - first;
}

std::string tableOutputProblem(const std::string &path) {
  if (isJsonPath(path) || (path.size() >= 4 && path.substr(path.size() - 4) == ".csv"))
    return "";
  return "-o takes a .csv or .json file, not '" + path + "'";
}

std::string exactNumber(double v) {
  char buf[40];
  auto r = std::to_chars(buf, buf + sizeof buf, v);
  return std::string(buf, r.ptr);
}

namespace {

// RFC 4180 quoting when a cell holds a comma, a quote or a line break.
std::string cell(const std::string &s) {
  if (s.find_first_of(",\"\r\n") == std::string::npos)
    return s;
  std::string q = "\"";
  for (char c : s)
    q += c == '"' ? std::string("\"\"") : std::string(1, c);
  return q + "\"";
}

std::string heading(const Column &c) { return c.unit.empty() ? c.name : c.name + " (" + c.unit + ")"; }

nlohmann::ordered_json columns(const std::vector<Column> &cs) {
  nlohmann::ordered_json a = nlohmann::ordered_json::array();
  for (const Column &c : cs)
    a.push_back({{"name", c.name}, {"unit", c.unit}, {"scale", c.scale}});
  return a;
}

nlohmann::ordered_json number(double v) { return std::isnan(v) ? nlohmann::ordered_json() : nlohmann::ordered_json(v); }

} // namespace

std::string toCsv(const Table &t) {
  std::string out = "point";
  for (const Column &c : t.parameters)
    out += "," + cell(heading(c));
  for (const Column &c : t.measures)
    out += "," + cell(heading(c));
  out += ",failure\n";
  for (size_t i = 0; i < t.results.size(); ++i) {
    out += std::to_string(t.first + i);
    for (double v : t.parameterValues[i])
      out += "," + exactNumber(v);
    for (double v : t.results[i].measures)
      out += "," + (std::isnan(v) ? std::string() : exactNumber(v));
    out += "," + cell(t.results[i].failure) + "\n";
  }
  return out;
}

std::string toJson(const Table &t) {
  nlohmann::ordered_json doc;
  doc["saltpan_version"] = t.version;
  doc["model_hash"] = t.modelHash;
  doc["sweep"] = t.sweep;
  doc["sweep_hash"] = t.sweepHash;
  doc["design"] = t.design;
  doc["engine"] = t.engine;
  doc["points_total"] = t.totalPoints;
  if (t.shardCount > 1)
    doc["shard"] = {{"index", t.shardIndex}, {"count", t.shardCount}, {"first", t.first}};
  doc["caution"] = "saltpan is a research modelling tool; it is not for clinical or diagnostic decisions.";
  doc["parameters"] = columns(t.parameters);
  doc["measures"] = columns(t.measures);
  nlohmann::ordered_json points = nlohmann::ordered_json::array();
  for (size_t i = 0; i < t.results.size(); ++i) {
    nlohmann::ordered_json p, params = nlohmann::ordered_json::array(), measures = nlohmann::ordered_json::array();
    for (double v : t.parameterValues[i])
      params.push_back(v);
    for (double v : t.results[i].measures)
      measures.push_back(number(v));
    p["point"] = t.first + i;
    p["parameters"] = std::move(params);
    p["measures"] = std::move(measures);
    p["failure"] = t.results[i].failure.empty() ? nlohmann::ordered_json() : nlohmann::ordered_json(t.results[i].failure);
    points.push_back(std::move(p));
  }
  doc["points"] = std::move(points);
  return doc.dump(2) + "\n";
}

bool fromJson(const std::string &text, Table &t, std::string &error) {
  try {
    auto doc = nlohmann::json::parse(text);
    t.version = doc.at("saltpan_version").get<std::string>();
    t.modelHash = doc.at("model_hash").get<std::string>();
    t.sweep = doc.at("sweep").get<std::string>();
    t.sweepHash = doc.at("sweep_hash").get<std::string>();
    t.design = doc.at("design").get<std::string>();
    t.engine = doc.at("engine").get<std::string>();
    t.totalPoints = doc.at("points_total").get<uint64_t>();
    t.shardIndex = 0;
    t.shardCount = 1;
    t.first = 0;
    if (doc.contains("shard")) {
      t.shardIndex = doc["shard"].at("index").get<int>();
      t.shardCount = doc["shard"].at("count").get<int>();
      t.first = doc["shard"].at("first").get<uint64_t>();
      // saltpan merge indexes its shard slots with these; an edited file must not reach past them.
      if (t.shardCount < 1 || t.shardIndex < 0 || t.shardIndex >= t.shardCount) {
        error = "shard " + std::to_string(t.shardIndex) + " of " + std::to_string(t.shardCount) + " does not exist";
        return false;
      }
    }
    auto readColumns = [](const nlohmann::json &a, std::vector<Column> &into) {
      into.clear();
      for (auto &c : a)
        into.push_back({c.at("name").get<std::string>(), c.at("unit").get<std::string>(), c.at("scale").get<double>()});
    };
    readColumns(doc.at("parameters"), t.parameters);
    readColumns(doc.at("measures"), t.measures);
    t.parameterValues.clear();
    t.results.clear();
    uint64_t expected = t.first;
    // Point by point, so a shard edited by hand or cut from another sweep is refused with the
    // point and the value that do not fit, never joined into a ragged table.
    for (auto &p : doc.at("points")) {
      std::string where = "point " + std::to_string(expected);
      if (!p.is_object() || !p.contains("point") || !p["point"].is_number_unsigned() ||
          p["point"].get<uint64_t>() != expected++) {
        error = "the points are not consecutive (" + where + " is missing or out of place)";
        return false;
      }
      const nlohmann::json &params = p.at("parameters"), &measures = p.at("measures");
      if (!params.is_array() || params.size() != t.parameters.size() || !measures.is_array() ||
          measures.size() != t.measures.size()) {
        error = where + " has " + std::to_string(params.is_array() ? params.size() : 0) + " parameters and " +
                std::to_string(measures.is_array() ? measures.size() : 0) + " measures; the columns name " +
                std::to_string(t.parameters.size()) + " and " + std::to_string(t.measures.size()) +
                " (a point has the wrong number of values)";
        return false;
      }
      std::vector<double> values;
      for (size_t k = 0; k < params.size(); ++k) {
        if (!params[k].is_number()) {
          error = where + ": the value of '" + t.parameters[k].name + "' is not a number";
          return false;
        }
        values.push_back(params[k].get<double>());
      }
      PointResult r;
      r.done = true;
      for (size_t k = 0; k < measures.size(); ++k) {
        if (!measures[k].is_number() && !measures[k].is_null()) {
          error = where + ": the value of '" + t.measures[k].name + "' is neither a number nor null";
          return false;
        }
        r.measures.push_back(measures[k].is_null() ? NAN : measures[k].get<double>());
      }
      const nlohmann::json &failure = p.at("failure");
      if (!failure.is_null() && !failure.is_string()) {
        error = where + ": its failure is neither text nor null";
        return false;
      }
      if (failure.is_string())
        r.failure = failure.get<std::string>();
      t.parameterValues.push_back(std::move(values));
      t.results.push_back(std::move(r));
    }
    return true;
  } catch (const std::exception &e) {
    error = std::string("not a saltpan sweep result: ") + e.what();
    return false;
  }
}

std::string differingColumns(const Table &a, const Table &b) {
  auto describe = [](const std::vector<Column> &cs) {
    std::string text;
    for (const Column &c : cs)
      text += (text.empty() ? "" : ", ") + heading(c) + " x" + exactNumber(c.scale);
    return "(" + text + ")";
  };
  auto same = [](const std::vector<Column> &x, const std::vector<Column> &y) {
    if (x.size() != y.size())
      return false;
    for (size_t i = 0; i < x.size(); ++i)
      if (x[i].name != y[i].name || x[i].unit != y[i].unit || x[i].scale != y[i].scale)
        return false;
    return true;
  };
  if (!same(a.parameters, b.parameters))
    return "parameters " + describe(b.parameters) + " against " + describe(a.parameters);
  if (!same(a.measures, b.measures))
    return "measures " + describe(b.measures) + " against " + describe(a.measures);
  if (a.sweep != b.sweep || a.version != b.version || a.modelHash != b.modelHash || a.engine != b.engine ||
      a.design != b.design || a.totalPoints != b.totalPoints)
    return "their sweep, saltpan version, model hash, engine, design or point count differ";
  return "";
}

} // namespace saltpan::sweep
