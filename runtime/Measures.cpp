// Measures.cpp - spike detection and simple statistics of traces.
#include "Measures.h"

#include <algorithm>

namespace brine::measures {

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

} // namespace brine::measures
