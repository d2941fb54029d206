// LaneSimulate.cpp - the lockstep exponential Euler loop over interleaved lanes.
#include "LaneSimulate.h"

#include <algorithm>
#include <cmath>

namespace saltpan {

LaneRun simulateLanes(const ir::Model &m, const std::vector<std::vector<double>> &params, const LaneKernels &kernels) {
  const size_t lanes = static_cast<size_t>(kernels.lanes);
  const size_t n = m.stateNames.size(), outputs = m.kernel.outputs.size();
  const ir::Protocol &proto = m.protocol;
  LaneRun run;
  run.failures.resize(lanes);
  run.traces.resize(lanes);
  for (Trace &t : run.traces)
    for (int r : proto.record) {
      t.names.push_back(m.probes[r].name);
      t.units.push_back(m.probes[r].unit);
    }
  // Interleave: slot-major, lane-minor.
  std::vector<double> y(n * lanes), p(m.params.size() * lanes), buffer((n + outputs) * lanes);
  for (size_t l = 0; l < lanes; ++l) {
    for (size_t s = 0; s < n; ++s)
      y[s * lanes + l] = m.initialState[s];
    for (size_t k = 0; k < m.params.size(); ++k)
      p[k * lanes + l] = params[l][k];
  }
  // Recording from the state alone lets every step use the smaller state-only kernel.
  bool statesOnly = kernels.stateOnly != nullptr;
  for (int r : proto.record)
    statesOnly = statesOnly && m.probes[r].state >= 0;

  double dt = proto.step;
  long steps = std::lround(proto.duration / dt);
  long every = std::max(1L, std::lround(proto.every / dt));
  std::vector<char> alive(lanes, 1);
  size_t living = lanes;
  for (long i = 0; i <= steps && living > 0; ++i) {
    double t = static_cast<double>(i) * dt;
    bool recording = i % every == 0 || i == steps;
    if (statesOnly || (!recording && kernels.stateOnly))
      kernels.stateOnly(y.data(), p.data(), t, buffer.data());
    else
      kernels.full(y.data(), p.data(), t, buffer.data());
    if (recording)
      for (size_t l = 0; l < lanes; ++l) {
        if (!alive[l])
          continue;
        Trace &trace = run.traces[l];
        trace.time.push_back(t);
        for (int r : proto.record) {
          const ir::Probe &q = m.probes[r];
          double si = q.state >= 0 ? y[static_cast<size_t>(q.state) * lanes + l]
                                   : buffer[(n + static_cast<size_t>(q.output)) * lanes + l];
          trace.values.push_back(si * q.scale);
        }
      }
    if (i == steps)
      break;
    std::copy(buffer.begin(), buffer.begin() + static_cast<long>(n * lanes), y.begin());
    for (size_t l = 0; l < lanes; ++l) {
      if (!alive[l] || healthyState(m, y.data() + l, lanes, t + dt, run.failures[l]))
        continue;
      // Park the failed lane at its initial state so it computes harmless numbers.
      alive[l] = 0;
      --living;
      for (size_t s = 0; s < n; ++s)
        y[s * lanes + l] = m.initialState[s];
    }
  }
  return run;
}

} // namespace saltpan
