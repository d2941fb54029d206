// Measures.h - measures of recorded traces: spikes, rates, extremes, means.
#pragma once
#include "IR.h"
#include "Simulate.h"

#include <optional>
#include <string>
#include <vector>

namespace saltpan::measures {

/// Times where `values` crosses `threshold` upwards, linearly interpolated between samples.
std::vector<double> spikeTimes(const std::vector<double> &time, const std::vector<double> &values, double threshold);
/// Spikes per second over [from, to], from the interval between the first and last spike
/// (nullopt with fewer than two spikes).
std::optional<double> firingRate(const std::vector<double> &spikes);
double peak(const std::vector<double> &values);
double minimum(const std::vector<double> &values);
/// Time-weighted mean (trapezoidal) over the whole trace.
double mean(const std::vector<double> &time, const std::vector<double> &values);

/// Conduction velocity (m/s) over `distance` (m) from a spike at `first` to one at `second` (s):
/// positive when the spike reaches the second place later. nullopt with `why` when both
/// arrive at once or the distance is unknown.
std::optional<double> conductionVelocity(double distance, double first, double second, std::string &why);

/// The run measure `measure` (spike_count, firing_rate, first_spike, last_interval, peak,
/// minimum, mean, final or value) of the quantity `recorded` in trace `t` of `model`, in SI;
/// `argument` is the threshold or the time (SI; NaN when not given). nullopt with `why` when
/// the trace has no such value. Pure: safe to call from several threads.
std::optional<double> ofTrace(const std::string &measure, const std::string &recorded, double argument,
                              const ir::Model &model, const Trace &t, std::string &why);

} // namespace saltpan::measures
