// Measures.cpp - spike detection and simple statistics of traces.
#include "Measures.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace saltpan::measures {

std::vector<double> spikeTimes(const std::vector<double> &time, const std::vector<double> &values, double threshold) {
  std::vector<double> out;
  for (size_t i = 1; i < values.size() && i < time.size(); ++i) {
    double a = values[i - 1], b = values[i];
    if (a < threshold && b >= threshold) {
      double f = (threshold - a) / (b - a);
      out.push_back(time[i - 1] + f * (time[i] - time[i - 1]));
    }
  }
  return out;
}

std::optional<double> firingRate(const std::vector<double> &spikes) {
  if (spikes.size() < 2)
    return std::nullopt;
  return static_cast<double>(spikes.size() - 1) / (spikes.back() - spikes.front());
}

double peak(const std::vector<double> &values) {
  return values.empty() ? 0 : *std::max_element(values.begin(), values.end());
}

double minimum(const std::vector<double> &values) {
  return values.empty() ? 0 : *std::min_element(values.begin(), values.end());
}

double mean(const std::vector<double> &time, const std::vector<double> &values) {
  if (values.size() < 2 || time.size() != values.size())
    return values.empty() ? 0 : values[0];
  double area = 0;
  for (size_t i = 1; i < values.size(); ++i)
    area += 0.5 * (values[i] + values[i - 1]) * (time[i] - time[i - 1]);
  return area / (time.back() - time.front());
}

std::optional<double> conductionVelocity(double distance, double first, double second, std::string &why) {
  if (!std::isfinite(distance)) {
    why = "no path distance between the two places";
    return std::nullopt;
  }
  if (second == first) {
    why = "the spike reaches both places at the same time";
    return std::nullopt;
  }
  return distance / (second - first);
}

std::optional<double> ofTrace(const std::string &name, const std::string &recorded, double argument,
                              const ir::Model &model, const Trace &t, std::string &why) {
  size_t column = 0;
  while (column < t.columns() && t.names[column] != recorded)
    ++column;
  if (column == t.columns()) {
    why = "'" + recorded + "' was not recorded";
    return std::nullopt;
  }
  if (t.time.empty()) {
    why = "nothing was recorded";
    return std::nullopt;
  }
  double scale = model.probes[model.findProbe(recorded)].scale;
  std::vector<double> values(t.time.size());
  for (size_t i = 0; i < t.time.size(); ++i) {
    values[i] = t.at(i, column) / scale; // back to SI
    // NaN compares false with everything, so peaks, crossings and means would skip it silently.
    if (!std::isfinite(values[i])) {
      char buf[96];
      std::snprintf(buf, sizeof buf, "is not a finite number (%g) at %.6g ms", t.at(i, column), t.time[i] * 1e3);
      why = "'" + recorded + "' " + buf;
      return std::nullopt;
    }
  }
  double threshold = std::isnan(argument) ? 0.0 : argument;
  if (name == "spike_count" || name == "firing_rate" || name == "first_spike" || name == "last_interval") {
    auto spikes = spikeTimes(t.time, values, threshold);
    if (name == "spike_count")
      return static_cast<double>(spikes.size());
    if (name == "first_spike") {
      if (spikes.empty())
        why = "no spike";
      return spikes.empty() ? std::nullopt : std::optional<double>(spikes.front());
    }
    if (spikes.size() < 2) {
      why = std::to_string(spikes.size()) + " spike" + (spikes.size() == 1 ? "" : "s") + ", fewer than two";
      return std::nullopt;
    }
    if (name == "last_interval")
      return spikes.back() - spikes[spikes.size() - 2];
    return firingRate(spikes);
  }
  if (name == "peak")
    return peak(values);
  if (name == "minimum")
    return minimum(values);
  if (name == "mean")
    return mean(t.time, values);
  if (name == "final")
    return values.back();
  if (name == "value") {
    double at = argument;
    for (size_t i = 1; i < t.time.size(); ++i)
      if (t.time[i] >= at) {
        double f = (at - t.time[i - 1]) / (t.time[i] - t.time[i - 1]);
        return values[i - 1] + f * (values[i] - values[i - 1]);
      }
    if (at == t.time.back())
      return values.back();
    why = "the run ends before that time";
    return std::nullopt;
  }
  why = "unknown measure";
  return std::nullopt;
}

} // namespace saltpan::measures
