// Measures.h - measures of recorded traces: spikes, rates, extremes, means.
#pragma once
#include <optional>
#include <vector>

namespace brine::measures {

/// Times where `values` crosses `threshold` upwards, linearly interpolated between samples.
std::vector<double> spikeTimes(const std::vector<double> &time, const std::vector<double> &values, double threshold);
/// Spikes per second over [from, to], from the interval between the first and last spike
/// (nullopt with fewer than two spikes).
std::optional<double> firingRate(const std::vector<double> &spikes);
double peak(const std::vector<double> &values);
double minimum(const std::vector<double> &values);
/// Time-weighted mean (trapezoidal) over the whole trace.
double mean(const std::vector<double> &time, const std::vector<double> &values);

} // namespace brine::measures
