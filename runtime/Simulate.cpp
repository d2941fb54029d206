// Simulate.cpp - fixed-step and adaptive integration of a lowered model.
#include "Simulate.h"

#include "FixedStep.h"
#include "Interpret.h"
#include "PieceSplit.h"
#include "Tree.h"

#include <algorithm>
#include <cmath>

namespace saltpan {

void KernelRef::operator()(const double *y, const double *p, double t, double *out, KernelPart part) const {
  if (native)
    native(y, p, t, out);
  else if (pieces)
    pieces->run(y, p, t, out, part);
  else
    interpreter->run(y, p, t, out);
}

double exponentialEulerVoltage(double v, double g, double ge, double other, double cap, double dt) {
  if (g > 0) {
    double vInf = (ge - other) / g;
    return vInf + (v - vInf) * std::exp(-dt * g / cap);
  }
  // No positive conductance to relax towards (a zero or negative density): an explicit step
  // of the whole current, G V - GE included.
  return v - dt * (g * v - ge + other) / cap;
}

namespace {

class Stepper {
public:
  Stepper(const ir::Model &m, const std::vector<double> &params, KernelRef kernel, SimulationFailure &failure,
          SimulationStats &stats, FusedStep fused)
      : m_(m), p_(params), kernel_(kernel), fused_(fused), failure_(failure), stats_(stats), y_(m.initialState),
        out_(m.kernel.outputs.size()) {
    const ir::Protocol &proto = m.protocol;
    for (int r : proto.record) {
      trace_.names.push_back(m.probes[r].name);
      trace_.units.push_back(m.probes[r].unit);
    }
  }

  // Charge per membrane area held by the capacitor and by each compartment's dynamic ions.
  struct Charge {
    std::vector<double> membrane, ions;
  };
  Charge charges(const std::vector<double> &y) const {
    Charge q{std::vector<double>(m_.compartments.size()), std::vector<double>(m_.compartments.size())};
    for (size_t i = 0; i < m_.compartments.size(); ++i) {
      const ir::Compartment &c = m_.compartments[i];
      q.membrane[i] = p_[c.capacitanceParam] * y[c.voltageState];
    }
    for (const ir::Pool &pool : m_.pools) // z F c per (area / volume)
      q.ions[pool.compartment] += pool.valence * 96485.33212331001 * y[pool.state] / pool.areaPerVolume;
    return q;
  }
  std::vector<double> injected_; // integral of injected current density per compartment
  void accumulateTrapezoid(const double *a, const double *b, double dt) {
    for (size_t i = 0; i < m_.compartments.size(); ++i) {
      int k = m_.compartments[i].injectedOutput;
      injected_[i] += 0.5 * (a[k] + b[k]) * dt;
    }
  }
  // Axial currents move charge between joined compartments, so only a whole tree balances: the
  // sum over it of area * (change of membrane charge - change of ion charge - injected charge),
  // relative to the charge that moved. A tree is balanced only when all its members' currents are
  // carried by dynamic ions; a compartment that joins no other is weighed alone, per area.
  void chargeBalance(const Charge &start) {
    const std::vector<ir::Compartment> &cs = m_.compartments;
    if (std::none_of(cs.begin(), cs.end(), [](const ir::Compartment &c) { return c.allCurrentCarried; }))
      return;
    Charge end = charges(y_);
    std::vector<int> root = Tree(m_).roots();
    std::vector<size_t> members(cs.size(), 0);
    std::vector<bool> carried(cs.size(), true);
    for (size_t i = 0; i < cs.size(); ++i) {
      size_t r = static_cast<size_t>(root[i]);
      ++members[r];
      carried[r] = carried[r] && cs[i].allCurrentCarried;
    }
    std::vector<double> residual(cs.size(), 0), moved(cs.size(), 0);
    for (size_t i = 0; i < cs.size(); ++i) {
      size_t r = static_cast<size_t>(root[i]);
      double weight = members[r] > 1 ? cs[i].area : 1;
      double dMembrane = end.membrane[i] - start.membrane[i], dIons = end.ions[i] - start.ions[i];
      residual[r] += weight * (dMembrane - dIons - injected_[i]);
      moved[r] += weight * (std::fabs(dMembrane) + std::fabs(dIons) + std::fabs(injected_[i]));
    }
    double worst = NAN;
    for (size_t r = 0; r < cs.size(); ++r) {
      if (root[r] != static_cast<int>(r) || !carried[r])
        continue;
      double error = std::fabs(residual[r]) / (moved[r] + 1e-300);
      worst = std::isnan(worst) ? error : std::max(worst, error);
    }
    stats_.chargeBalanceError = worst;
  }

  Trace run() {
    injected_.assign(m_.compartments.size(), 0);
    Charge start = charges(y_);
    runMethod();
    if (!failure_.failed)
      chargeBalance(start);
    return std::move(trace_);
  }

  void runMethod() {
    switch (m_.protocol.method) {
    case ir::Method::ExponentialEuler:
    case ir::Method::RungeKutta4:
    case ir::Method::BackwardEuler:
    case ir::Method::CrankNicolson: fixedSteps(); break;
    case ir::Method::DormandPrince: dormandPrince(); break;
    case ir::Method::Rosenbrock: rosenbrock(); break;
    }
  }

private:
  const ir::Model &m_;
  const std::vector<double> &p_;
  KernelRef kernel_;
  FusedStep fused_;
  SimulationFailure &failure_;
  SimulationStats &stats_;
  std::vector<double> y_, out_;
  Trace trace_;
  StepGrid grid_{m_};

  void evaluate(const double *y, double t, double *out) {
    kernel_(y, p_.data(), t, out);
    ++stats_.kernelCalls;
  }

  // Holds clamped potentials at their command; re-evaluates when a potential moved.
  void applyClamps(double t) {
    if (holdClamps(m_, y_.data(), out_.data()))
      evaluate(y_.data(), t, out_.data());
  }

  // Records the current state; out_ must hold the kernel outputs at (y_, t).
  void record(double t) {
    trace_.time.push_back(t);
    for (int r : m_.protocol.record) {
      const ir::Probe &q = m_.probes[r];
      double si = q.state >= 0 ? y_[q.state] : out_[q.output];
      trace_.values.push_back(si * q.scale);
    }
  }

  bool healthy(const std::vector<double> &y, double t) { return healthyState(m_, y.data(), 1, t, failure_); }

  bool fail(double t, size_t state, const std::string &reason) {
    failure_.failed = true;
    failure_.time = t;
    failure_.variable = m_.stateNames[state];
    failure_.reason = reason;
    return false;
  }

  void derivative(const double *y, const double *out, double *dydt) { stateDerivative(m_, p_.data(), y, out, dydt); }

  // Every fixed-step method: one FixedRun step per grid step (fused where it can be).
  void fixedSteps() {
    FixedRun run(m_, p_.data(), kernel_, fused_, &stats_);
    const StepGrid &grid = run.grid();
    long steps = grid.steps(), every = grid.every();
    for (long i = 0; i <= steps; ++i) {
      bool recording = i % every == 0 || i == steps;
      if (i < steps)
        run.begin(i, y_.data(), recording);
      else
        run.end(y_.data());
      if (recording) {
        std::copy(run.outputs(), run.outputs() + out_.size(), out_.begin());
        record(grid.time(i));
      }
      if (i == steps)
        break;
      run.finish(y_.data(), injected_.data());
      ++stats_.steps;
      if (!healthy(y_, grid.time(i + 1)))
        return;
    }
  }

  // Whether an adaptive step's error estimate can drive the step control; otherwise records
  // why the run stops (a state gone bad, an infinite estimate, or too many steps).
  static constexpr long maxSteps = 100000000;
  // Recorded samples after t = 0: rounded up, so a duration that is not a whole number of
  // intervals still ends at the duration (the last target is clipped to it).
  static long adaptiveRecordCount(const ir::Protocol &proto) {
    double ratio = proto.duration / proto.every;
    return std::lround(std::ceil(ratio - 1e-9 * ratio));
  }
  bool stepUsable(double err, const std::vector<double> &ynew, double t, double step) {
    if (!std::isfinite(err)) {
      healthy(ynew, t + step);
      if (!failure_.failed)
        fail(t, 0, "the error estimate is not finite");
      return false;
    }
    if (++stats_.steps > maxSteps) {
      fail(t, 0, "needed more than 1e8 steps; the tolerance may be too tight for this model");
      return false;
    }
    return true;
  }

  enum class Verdict { Accepted, Rejected, Stop };

  // The start of an adaptive run: the outputs at t = 0, clamps held, the first sample
  // recorded. Returns how many samples follow it (the last lands on the duration).
  long startAdaptive() {
    evaluate(y_.data(), 0, out_.data());
    applyClamps(0);
    record(0);
    return adaptiveRecordCount(m_.protocol);
  }

  // Where an adaptive step from t may go: up to the next recording time or event, whichever
  // comes first. A step never crosses an event, and its stages at an event see what held
  // before it (`end`); the step after it starts from what follows.
  struct Target {
    double time = 0;          // the recording time or event ahead
    bool hits = false;        // this step lands on it
    bool records = false;     // it is a recording time
    bool event = false;       // it is an event
    double step = 0, end = 0; // the step, and the time of its stages at its end
  };
  Target target(double t, double h, long recordIndex) const {
    const ir::Protocol &proto = m_.protocol;
    Target to;
    double recordTime = std::min(static_cast<double>(recordIndex) * proto.every, proto.duration);
    to.time = grid_.nextBreak(t, recordTime);
    to.records = to.time == recordTime;
    to.event = grid_.isEvent(to.time);
    to.hits = t + h >= to.time;
    to.step = to.hits ? to.time - t : h;
    to.end = to.hits && to.event ? std::nextafter(to.time, t) : t + to.step;
    return to;
  }

  // The step control shared by the adaptive methods. `ynew` is the solution at the step's end
  // and `scratch` its kernel outputs there. Accepts it (recording when it lands on a recording
  // time) or rejects it, and picks the next step from the error norm `err` of a method of `order`.
  Verdict acceptOrReject(double err, int order, const Target &to, double &t, double &h, long &recordIndex,
                         std::vector<double> &ynew, std::vector<double> &scratch) {
    double step = to.step;
    bool hitsTarget = to.hits;
    double factor = err == 0 ? 5 : std::clamp(0.9 * std::pow(err, -1.0 / order), 0.2, 5.0);
    Verdict verdict = err <= 1 ? Verdict::Accepted : Verdict::Rejected;
    if (verdict == Verdict::Accepted) {
      accumulateTrapezoid(out_.data(), scratch.data(), step);
      t = hitsTarget ? to.time : t + step;
      y_.swap(ynew);
      out_.swap(scratch);
      if (hitsTarget && to.event)
        evaluate(y_.data(), t, out_.data()); // what follows the edge
      applyClamps(t);
      if (!healthy(y_, t))
        return Verdict::Stop;
      if (hitsTarget && to.records) {
        record(t);
        ++recordIndex;
      }
      // A step cut short to land on a recording time or event says little about the next one.
      h = hitsTarget ? std::max(h, step * factor) : step * factor;
    } else {
      ++stats_.rejected;
      h = step * std::max(factor, 0.2);
    }
    if (h < 1e-15) {
      fail(t, 0, "the step size fell below 1e-15 s");
      return Verdict::Stop;
    }
    return verdict;
  }

  // Solves a x = b in place by Gaussian elimination with partial pivoting (n is small).
  static bool solve(std::vector<double> &a, std::vector<double> &b, size_t n) {
    for (size_t col = 0; col < n; ++col) {
      size_t pivot = col;
      for (size_t r = col + 1; r < n; ++r)
        if (std::fabs(a[r * n + col]) > std::fabs(a[pivot * n + col]))
          pivot = r;
      if (a[pivot * n + col] == 0)
        return false;
      if (pivot != col) {
        for (size_t c = 0; c < n; ++c)
          std::swap(a[col * n + c], a[pivot * n + c]);
        std::swap(b[col], b[pivot]);
      }
      for (size_t r = col + 1; r < n; ++r) {
        double f = a[r * n + col] / a[col * n + col];
        if (f == 0)
          continue;
        for (size_t c = col; c < n; ++c)
          a[r * n + c] -= f * a[col * n + c];
        b[r] -= f * b[col];
      }
    }
    for (size_t i = n; i-- > 0;) {
      double s = b[i];
      for (size_t c = i + 1; c < n; ++c)
        s -= a[i * n + c] * b[c];
      b[i] = s / a[i * n + i];
    }
    return true;
  }

  // The second-order, L-stable Rosenbrock method ROS2 (Verwer, Spee, Blom & Hundsdorfer
  // 1999, gamma = 1 + 1/sqrt(2)) with its embedded first-order solution for step control.
  // For stiff models; its Jacobian is taken by forward differences at every step.
  void rosenbrock() {
    const ir::Protocol &proto = m_.protocol;
    const double gamma = 1 + 1 / std::sqrt(2.0);
    size_t n = y_.size();
    std::vector<double> f0(n), f1(n), k1(n), k2(n), tmp(n), ynew(n), jac(n * n), a(n * n), scratch(out_.size());
    double t = 0, h = proto.step;
    long recordIndex = 1, recordCount = startAdaptive();
    while (recordIndex <= recordCount) {
      Target to = target(t, h, recordIndex);
      double step = to.step;
      derivative(y_.data(), out_.data(), f0.data());
      for (size_t j = 0; j < n; ++j) { // J[i][j] = d f_i / d y_j
        double delta = 1e-7 * std::max(std::fabs(y_[j]), 1e-3);
        tmp = y_;
        tmp[j] += delta;
        evaluate(tmp.data(), t, scratch.data());
        derivative(tmp.data(), scratch.data(), f1.data());
        for (size_t i = 0; i < n; ++i)
          jac[i * n + j] = (f1[i] - f0[i]) / delta;
      }
      auto matrix = [&] {
        for (size_t i = 0; i < n * n; ++i)
          a[i] = -gamma * step * jac[i];
        for (size_t i = 0; i < n; ++i)
          a[i * n + i] += 1;
      };
      matrix();
      k1 = f0;
      bool ok = solve(a, k1, n);
      for (size_t i = 0; i < n; ++i)
        tmp[i] = y_[i] + step * k1[i];
      evaluate(tmp.data(), to.end, scratch.data());
      derivative(tmp.data(), scratch.data(), k2.data());
      for (size_t i = 0; i < n; ++i)
        k2[i] -= 2 * k1[i];
      matrix();
      ok = ok && solve(a, k2, n);
      if (!ok) {
        fail(t, 0, "the Jacobian system is singular");
        return;
      }
      double err = 0;
      for (size_t i = 0; i < n; ++i) {
        ynew[i] = y_[i] + step * (1.5 * k1[i] + 0.5 * k2[i]);
        double e = 0.5 * step * (k1[i] + k2[i]); // against the first-order y + h k1
        double scale = proto.atol + proto.rtol * std::max(std::fabs(y_[i]), std::fabs(ynew[i]));
        err += (e / scale) * (e / scale);
      }
      err = std::sqrt(err / static_cast<double>(n));
      if (!stepUsable(err, ynew, t, step))
        return;
      evaluate(ynew.data(), to.end, scratch.data());
      if (acceptOrReject(err, 2, to, t, h, recordIndex, ynew, scratch) == Verdict::Stop)
        return;
    }
  }

  // Dormand & Prince (1980) RK5(4)7M with FSAL and a standard step-size controller.
  void dormandPrince() {
    static const double c2 = 1.0 / 5, c3 = 3.0 / 10, c4 = 4.0 / 5, c5 = 8.0 / 9;
    static const double a21 = 1.0 / 5;
    static const double a31 = 3.0 / 40, a32 = 9.0 / 40;
    static const double a41 = 44.0 / 45, a42 = -56.0 / 15, a43 = 32.0 / 9;
    static const double a51 = 19372.0 / 6561, a52 = -25360.0 / 2187, a53 = 64448.0 / 6561, a54 = -212.0 / 729;
    static const double a61 = 9017.0 / 3168, a62 = -355.0 / 33, a63 = 46732.0 / 5247, a64 = 49.0 / 176,
                        a65 = -5103.0 / 18656;
    static const double b1 = 35.0 / 384, b3 = 500.0 / 1113, b4 = 125.0 / 192, b5 = -2187.0 / 6784, b6 = 11.0 / 84;
    static const double e1 = 71.0 / 57600, e3 = -71.0 / 16695, e4 = 71.0 / 1920, e5 = -17253.0 / 339200,
                        e6 = 22.0 / 525, e7 = -1.0 / 40;
    const ir::Protocol &proto = m_.protocol;
    size_t n = y_.size();
    std::vector<double> k1(n), k2(n), k3(n), k4(n), k5(n), k6(n), k7(n), tmp(n), ynew(n), scratch(out_.size());
    double t = 0, h = proto.step;
    long recordIndex = 1, recordCount = startAdaptive();
    derivative(y_.data(), out_.data(), k1.data());
    while (recordIndex <= recordCount) {
      Target to = target(t, h, recordIndex);
      double step = to.step;
      auto stage = [&](std::vector<double> &k, double ct,
                       std::initializer_list<std::pair<double, const double *>> terms) {
        for (size_t i = 0; i < n; ++i) {
          double s = y_[i];
          for (auto &[a, kj] : terms)
            s += step * a * kj[i];
          tmp[i] = s;
        }
        evaluate(tmp.data(), ct == 1 ? to.end : t + ct * step, scratch.data());
        derivative(tmp.data(), scratch.data(), k.data());
      };
      stage(k2, c2, {{a21, k1.data()}});
      stage(k3, c3, {{a31, k1.data()}, {a32, k2.data()}});
      stage(k4, c4, {{a41, k1.data()}, {a42, k2.data()}, {a43, k3.data()}});
      stage(k5, c5, {{a51, k1.data()}, {a52, k2.data()}, {a53, k3.data()}, {a54, k4.data()}});
      stage(k6, 1, {{a61, k1.data()}, {a62, k2.data()}, {a63, k3.data()}, {a64, k4.data()}, {a65, k5.data()}});
      for (size_t i = 0; i < n; ++i)
        ynew[i] = y_[i] + step * (b1 * k1[i] + b3 * k3[i] + b4 * k4[i] + b5 * k5[i] + b6 * k6[i]);
      evaluate(ynew.data(), to.end, scratch.data());
      derivative(ynew.data(), scratch.data(), k7.data());
      double err = 0;
      for (size_t i = 0; i < n; ++i) {
        double e = step * (e1 * k1[i] + e3 * k3[i] + e4 * k4[i] + e5 * k5[i] + e6 * k6[i] + e7 * k7[i]);
        double scale = proto.atol + proto.rtol * std::max(std::fabs(y_[i]), std::fabs(ynew[i]));
        err += (e / scale) * (e / scale);
      }
      err = std::sqrt(err / static_cast<double>(n));
      if (!stepUsable(err, ynew, t, step))
        return;
      Verdict verdict = acceptOrReject(err, 5, to, t, h, recordIndex, ynew, scratch);
      if (verdict == Verdict::Stop)
        return;
      if (verdict == Verdict::Accepted) // first same as last, unless an edge or a clamp changed the outputs
        derivative(y_.data(), out_.data(), k1.data());
    }
  }
};

} // namespace

Trace simulate(const ir::Model &model, const std::vector<double> &params, KernelRef kernel, SimulationFailure &failure,
               SimulationStats *stats, FusedStep fused) {
  SimulationStats local;
  return Stepper(model, params, kernel, failure, stats ? *stats : local, fused).run();
}

} // namespace saltpan
