// Rest_Internal.h - what the steady-state analyses of lone compartments (Rest.cpp) and of
// trees (RestTree.cpp) share: the scan for roots of a current and Brent's refinement.
#pragma once
#include "Analyze.h"
#include "Rest.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <string>
#include <vector>

namespace saltpan::rest {

inline double withSign(double a, double b) { return b >= 0 ? std::fabs(a) : -std::fabs(a); }

// Brent's method on [a, b] with f(a), f(b) of opposite signs.
template <typename F> double brent(F &&f, double a, double b, double fa, double fb, double tol) {
  double c = a, fc = fa, d = b - a, e = d;
  for (int iter = 0; iter < 200; ++iter) {
    if ((fb > 0) == (fc > 0)) {
      c = a;
      fc = fa;
      d = e = b - a;
    }
    if (std::fabs(fc) < std::fabs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    double tol1 = 2 * std::numeric_limits<double>::epsilon() * std::fabs(b) + 0.5 * tol;
    double xm = 0.5 * (c - b);
    if (std::fabs(xm) <= tol1 || fb == 0)
      return b;
    if (std::fabs(e) >= tol1 && std::fabs(fa) > std::fabs(fb)) {
      double s = fb / fa, p, q;
      if (a == c) {
        p = 2 * xm * s;
        q = 1 - s;
      } else {
        double qq = fa / fc, r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0)
        q = -q;
      p = std::fabs(p);
      if (2 * p < std::min(3 * xm * q - std::fabs(tol1 * q), std::fabs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = xm;
        e = d;
      }
    } else {
      d = xm;
      e = d;
    }
    a = b;
    fa = fb;
    b += std::fabs(d) > tol1 ? d : withSign(tol1, xm);
    fb = f(b);
  }
  return b;
}

// Every channel of the compartment is ungated with a permeability density, so its GHK resting
// potential is comparable with its steady state.
inline bool passivePermeability(const CompartmentValues &cv) {
  bool any = false;
  for (const Placement &p : cv.placements) {
    if (!p.channel)
      continue;
    if (!p.channel->gates.empty() || p.densityKind != DensityKind::Permeability)
      return false;
    any = true;
  }
  return any;
}

// The membrane entry whose current probe `r` is, when it is one of the compartment whose
// probes start with `prefix` ("soma."): "soma.Leak.current" gives "Leak".
inline std::optional<std::string> entryOf(const ir::Probe &r, const std::string &prefix) {
  const std::string suffix = ".current";
  if (!r.entryCurrent || r.output < 0 || r.name.rfind(prefix, 0) != 0 ||
      r.name.size() <= prefix.size() + suffix.size() ||
      r.name.compare(r.name.size() - suffix.size(), suffix.size(), suffix) != 0)
    return std::nullopt;
  return r.name.substr(prefix.size(), r.name.size() - prefix.size() - suffix.size());
}

// The roots of f in [o.from, o.to]: every sign change on a grid of o.step, refined by Brent's
// method to o.tolerance, by increasing V.
template <typename F> std::vector<double> scanRoots(F &&f, const Options &o) {
  std::vector<double> roots;
  long steps = std::max(1L, std::lround((o.to - o.from) / o.step));
  double h = (o.to - o.from) / static_cast<double>(steps);
  double va = o.from, fa = f(va);
  if (fa == 0)
    roots.push_back(va);
  for (long i = 1; i <= steps; ++i) {
    double vb = i == steps ? o.to : o.from + static_cast<double>(i) * h, fb = f(vb);
    if (fb == 0) {
      roots.push_back(vb);
    } else if (std::isfinite(fa) && std::isfinite(fb) && fa != 0 && (fa > 0) != (fb > 0)) {
      roots.push_back(brent(f, va, vb, fa, fb, o.tolerance));
    }
    va = vb;
    fa = fb;
  }
  return roots;
}

} // namespace saltpan::rest
