// Rest.cpp - steady states and their stability; see Rest.h.
#include "Rest.h"
#include "Rest_Internal.h"

#include "Analyze.h"
#include "Derivative.h"
#include "FixedStep.h"
#include "Interpret.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace saltpan::rest {

namespace {

// --- eigenvalues (after the EISPACK routines balanc, elmhes and hqr) ---

struct Matrix {
  int n;
  std::vector<double> &d;
  double &operator()(int i, int j) { return d[static_cast<size_t>(i) * n + j]; }
};

// Parlett-Reinsch balancing by powers of 2: a similarity transform, so exact.
void balance(Matrix a) {
  const double radix = 2, sqrdx = radix * radix;
  bool done = false;
  while (!done) {
    done = true;
    for (int i = 0; i < a.n; ++i) {
      double r = 0, c = 0;
      for (int j = 0; j < a.n; ++j)
        if (j != i) {
          c += std::fabs(a(j, i));
          r += std::fabs(a(i, j));
        }
      if (c == 0 || r == 0)
        continue;
      double g = r / radix, f = 1, s = c + r;
      while (c < g) {
        f *= radix;
        c *= sqrdx;
      }
      g = r * radix;
      while (c > g) {
        f /= radix;
        c /= sqrdx;
      }
      if ((c + r) / f < 0.95 * s) {
        done = false;
        g = 1 / f;
        for (int j = 0; j < a.n; ++j)
          a(i, j) *= g;
        for (int j = 0; j < a.n; ++j)
          a(j, i) *= f;
      }
    }
  }
}

// Reduction to upper Hessenberg form by stabilised elementary similarity transforms.
void hessenberg(Matrix a) {
  for (int m = 1; m < a.n - 1; ++m) {
    double x = 0;
    int i = m;
    for (int j = m; j < a.n; ++j)
      if (std::fabs(a(j, m - 1)) > std::fabs(x)) {
        x = a(j, m - 1);
        i = j;
      }
    if (i != m) {
      for (int j = m - 1; j < a.n; ++j)
        std::swap(a(i, j), a(m, j));
      for (int j = 0; j < a.n; ++j)
        std::swap(a(j, i), a(j, m));
    }
    if (x != 0)
      for (i = m + 1; i < a.n; ++i) {
        double y = a(i, m - 1);
        if (y == 0)
          continue;
        y /= x;
        a(i, m - 1) = y;
        for (int j = m; j < a.n; ++j)
          a(i, j) -= y * a(m, j);
        for (int j = 0; j < a.n; ++j)
          a(j, m) += y * a(j, i);
      }
  }
  for (int i = 2; i < a.n; ++i)
    for (int j = 0; j < i - 1; ++j)
      a(i, j) = 0; // the multipliers left below the subdiagonal
}

// Eigenvalues of an upper Hessenberg matrix by the Francis double-shift QR iteration.
std::vector<std::complex<double>> hqr(Matrix a) {
  const double eps = std::numeric_limits<double>::epsilon();
  std::vector<std::complex<double>> w(a.n);
  double anorm = 0;
  for (int i = 0; i < a.n; ++i)
    for (int j = std::max(i - 1, 0); j < a.n; ++j)
      anorm += std::fabs(a(i, j));
  int nn = a.n - 1;
  double t = 0;
  while (nn >= 0) {
    int its = 0, l;
    do {
      for (l = nn; l > 0; --l) {
        double s = std::fabs(a(l - 1, l - 1)) + std::fabs(a(l, l));
        if (s == 0)
          s = anorm;
        if (std::fabs(a(l, l - 1)) <= eps * s) {
          a(l, l - 1) = 0;
          break;
        }
      }
      double x = a(nn, nn);
      if (l == nn) { // one root found
        w[nn--] = x + t;
      } else {
        double y = a(nn - 1, nn - 1), ww = a(nn, nn - 1) * a(nn - 1, nn);
        if (l == nn - 1) { // two roots found
          double p = 0.5 * (y - x), q = p * p + ww, z = std::sqrt(std::fabs(q));
          x += t;
          if (q >= 0) {
            z = p + withSign(z, p);
            w[nn - 1] = w[nn] = x + z;
            if (z != 0)
              w[nn] = x - ww / z;
          } else {
            w[nn] = {x + p, -z};
            w[nn - 1] = std::conj(w[nn]);
          }
          nn -= 2;
        } else {
          if (its == 60)
            throw std::runtime_error("the QR iteration for the eigenvalues did not converge");
          if (its == 10 || its == 20 || its == 40) { // exceptional shift
            t += x;
            for (int i = 0; i <= nn; ++i)
              a(i, i) -= x;
            double s = std::fabs(a(nn, nn - 1)) + std::fabs(a(nn - 1, nn - 2));
            y = x = 0.75 * s;
            ww = -0.4375 * s * s;
          }
          ++its;
          int m;
          double p = 0, q = 0, r = 0, z;
          for (m = nn - 2; m >= l; --m) {
            z = a(m, m);
            r = x - z;
            double s = y - z;
            p = (r * s - ww) / a(m + 1, m) + a(m, m + 1);
            q = a(m + 1, m + 1) - z - r - s;
            r = a(m + 2, m + 1);
            s = std::fabs(p) + std::fabs(q) + std::fabs(r);
            p /= s;
            q /= s;
            r /= s;
            if (m == l)
              break;
            double u = std::fabs(a(m, m - 1)) * (std::fabs(q) + std::fabs(r));
            double v = std::fabs(p) * (std::fabs(a(m - 1, m - 1)) + std::fabs(z) + std::fabs(a(m + 1, m + 1)));
            if (u <= eps * v)
              break;
          }
          for (int i = m; i < nn - 1; ++i) {
            a(i + 2, i) = 0;
            if (i != m)
              a(i + 2, i - 1) = 0;
          }
          for (int k = m; k < nn; ++k) {
            if (k != m) {
              p = a(k, k - 1);
              q = a(k + 1, k - 1);
              r = 0;
              if (k + 1 != nn)
                r = a(k + 2, k - 1);
              if ((x = std::fabs(p) + std::fabs(q) + std::fabs(r)) != 0) {
                p /= x;
                q /= x;
                r /= x;
              }
            }
            double s = withSign(std::sqrt(p * p + q * q + r * r), p);
            if (s == 0)
              continue;
            if (k == m) {
              if (l != m)
                a(k, k - 1) = -a(k, k - 1);
            } else {
              a(k, k - 1) = -s * x;
            }
            p += s;
            x = p / s;
            y = q / s;
            z = r / s;
            q /= p;
            r /= p;
            for (int j = k; j <= nn; ++j) {
              p = a(k, j) + q * a(k + 1, j);
              if (k + 1 != nn) {
                p += r * a(k + 2, j);
                a(k + 2, j) -= p * z;
              }
              a(k + 1, j) -= p * y;
              a(k, j) -= p * x;
            }
            int mmin = nn < k + 3 ? nn : k + 3;
            for (int i = l; i <= mmin; ++i) {
              p = x * a(i, k) + y * a(i, k + 1);
              if (k + 1 != nn) {
                p += z * a(i, k + 2);
                a(i, k + 2) -= p * r;
              }
              a(i, k + 1) -= p * q;
              a(i, k) -= p;
            }
          }
        }
      }
    } while (l + 1 < nn);
  }
  return w;
}

// --- one compartment as an ODE system ---

class CompartmentSystem {
public:
  CompartmentSystem(const ir::Model &model, const ir::Compartment &comp)
      : model_(model), comp_(comp), interpreter_(model.kernel), y_(model.initialState),
        out_(model.kernel.outputs.size()) {
    std::string prefix = comp.name + ".";
    for (const ir::Gate &g : model.gates)
      if (g.name.rfind(prefix, 0) == 0)
        gates_.push_back(&g);
    states_.push_back(comp.voltageState);
    for (const ir::Gate *g : gates_)
      states_.push_back(g->state);
  }

  const std::vector<const ir::Gate *> &gates() const { return gates_; }
  int dimension() const { return static_cast<int>(states_.size()); }
  const std::vector<double> &outputs() const { return out_; }
  const std::vector<double> &state() const { return y_; }

  // Puts every gate at its steady value at `v`; returns I (A/m2) with those gates.
  double steadyCurrent(double v) {
    y_[comp_.voltageState] = v;
    run();
    for (const ir::Gate *g : gates_)
      y_[g->state] = out_[g->infOutput];
    run();
    return current();
  }

  // x holds V then the gates, in states_ order; dx receives their time derivatives (1/s, V/s).
  void derivative(const std::vector<double> &x, std::vector<double> &dx) {
    for (size_t i = 0; i < states_.size(); ++i)
      y_[states_[i]] = x[i];
    run();
    dydt_.resize(y_.size());
    stateDerivative(model_, model_.params.data(), y_.data(), out_.data(), dydt_.data());
    dx.resize(states_.size());
    for (size_t i = 0; i < states_.size(); ++i)
      dx[i] = dydt_[states_[i]];
  }

  std::vector<double> steadyVector(double v) {
    steadyCurrent(v);
    std::vector<double> x;
    for (int s : states_)
      x.push_back(y_[s]);
    return x;
  }

private:
  void run() { interpreter_.run(y_.data(), model_.params.data(), 0.0, out_.data()); }
  double current() const {
    DoubleMath math;
    return membraneCurrent(
        math, comp_, [this](int s) { return y_[s]; }, [this](int slot) { return out_[slot]; });
  }

  const ir::Model &model_;
  const ir::Compartment &comp_;
  Interpreter interpreter_;
  std::vector<double> y_, out_, dydt_;
  std::vector<const ir::Gate *> gates_;
  std::vector<int> states_;
};

} // namespace

std::vector<std::complex<double>> eigenvalues(std::vector<double> a, int n) {
  if (n <= 0)
    return {};
  if (a.size() != static_cast<size_t>(n) * n)
    throw std::invalid_argument("eigenvalues: the matrix is not n x n");
  for (double x : a)
    if (!std::isfinite(x))
      throw std::runtime_error("the Jacobian has a value that is not finite");
  Matrix m{n, a};
  balance(m);
  hessenberg(m);
  auto w = hqr(m);
  std::sort(w.begin(), w.end(), [](auto x, auto y) {
    return x.real() != y.real() ? x.real() > y.real() : x.imag() > y.imag();
  });
  return w;
}

std::vector<CompartmentRest> findSteadyStates(const ir::Model &model, const AnalyzedModel *analysis, const Options &o) {
  // Each compartment is analysed alone: joined ones would give a wrong number, not an answer.
  if (!model.junctions.empty())
    throw std::invalid_argument(notForJoinedCompartments);
  std::vector<CompartmentRest> result;
  for (const ir::Compartment &comp : model.compartments) {
    CompartmentRest cr;
    cr.name = comp.name;
    if (analysis)
      for (const CompartmentValues &cv : analysis->compartments)
        if (cv.decl && cv.decl->name == comp.name && passivePermeability(cv)) {
          cr.passivePermeability = true;
          cr.ghkRest = cv.ghkRest;
        }
    CompartmentSystem sys(model, comp);
    auto f = [&](double v) { return sys.steadyCurrent(v); };

    std::vector<double> roots = scanRoots(f, o);

    for (double v : roots) {
      SteadyState s;
      s.v = v;
      // Jacobian by central differences about the steady state.
      std::vector<double> x0 = sys.steadyVector(v);
      int n = sys.dimension();
      std::vector<double> jac(static_cast<size_t>(n) * n), plus, minus;
      for (int j = 0; j < n; ++j) {
        const double step = 1e-7; // 0.1 uV for V, 1e-7 of a gate's range
        std::vector<double> x = x0;
        x[j] = x0[j] + step;
        sys.derivative(x, plus);
        x[j] = x0[j] - step;
        sys.derivative(x, minus);
        for (int i = 0; i < n; ++i)
          jac[static_cast<size_t>(i) * n + j] = (plus[i] - minus[i]) / (2 * step);
      }
      s.eigenvalues = eigenvalues(jac, n);
      s.maxRealEigenvalue = -std::numeric_limits<double>::infinity();
      for (auto e : s.eigenvalues)
        s.maxRealEigenvalue = std::max(s.maxRealEigenvalue, e.real());
      s.stable = s.maxRealEigenvalue < 0;

      // Gates, currents and the total with the gates at steady state.
      double total = sys.steadyCurrent(v);
      std::string prefix = comp.name + ".";
      for (const ir::Gate *g : sys.gates())
        s.gates.push_back({g->name.substr(prefix.size()), sys.state()[g->state]});
      for (const ir::Probe &r : model.probes)
        if (auto entry = entryOf(r, prefix))
          s.currents.push_back({*entry, sys.outputs()[r.output] * r.scale});
      s.totalCurrent = total * 100; // A/m2 -> uA/cm2
      // The slope of the steady-state I-V curve gives the input resistance for small
      // steady injected currents (common practice: R_in = dV/dI at rest).
      const double dv = 1e-6;
      s.slopeConductance = (sys.steadyCurrent(v + dv) - sys.steadyCurrent(v - dv)) / (2 * dv);
      if (comp.area > 0 && s.slopeConductance != 0)
        s.inputResistance = 1 / (s.slopeConductance * comp.area);
      cr.steadyStates.push_back(std::move(s));
    }
    result.push_back(std::move(cr));
  }
  return result;
}

} // namespace saltpan::rest
