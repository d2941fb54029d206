// LaneSimulate.cpp - the lockstep fixed-step loop over interleaved lanes.
#include "LaneSimulate.h"

#include "FixedStep.h"

#include <algorithm>
#include <cassert>
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

  StepGrid grid(m);
  long steps = grid.steps(), every = grid.every();
  // A step with an event inside or at its end is taken lane by lane by the scalar stepper of
  // Simulate, exactly as a scalar run takes it, into the fused kernel's layout.
  std::vector<FixedStepper> steppers;
  std::vector<std::vector<double>> laneParams(lanes);
  for (size_t l = 0; l < lanes; ++l)
    laneParams[l] = params[l];
  if (kernels.plain)
    for (size_t l = 0; l < lanes; ++l)
      steppers.emplace_back(m, laneParams[l].data(), KernelRef{kernels.plain, nullptr});
  std::vector<double> laneY(n), laneOut(outputs);
  auto splitStep = [&](long i, double t) {
    assert(steppers.size() == lanes && "simulateLanes needs kernels.plain for a step that meets an event");
    for (size_t l = 0; l < lanes; ++l) {
      for (size_t s = 0; s < n; ++s)
        laneY[s] = y[s * lanes + l];
      steppers[l].settle(laneY.data(), laneOut.data(), t);
      for (size_t o = 0; o < outputs; ++o)
        buffer[(n + o) * lanes + l] = laneOut[o];
      steppers[l].step(grid, i, laneY.data(), laneOut.data(), nullptr);
      for (size_t s = 0; s < n; ++s)
        buffer[s * lanes + l] = laneY[s];
    }
  };
  std::vector<char> alive(lanes, 1);
  size_t living = lanes;
  for (long i = 0; i <= steps && living > 0; ++i) {
    double t = grid.time(i);
    bool recording = i % every == 0 || i == steps;
    if (i < steps && !grid.smooth(i))
      splitStep(i, t);
    else if (statesOnly || (!recording && kernels.stateOnly))
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
      if (!alive[l] || healthyState(m, y.data() + l, lanes, grid.time(i + 1), run.failures[l]))
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
