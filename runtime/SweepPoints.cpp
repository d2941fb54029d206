// SweepPoints.cpp - grids and seeded samples.
#include "SweepPoints.h"

#include <cmath>
#include <numeric>
#include <random>

namespace saltpan::sweep {

namespace {

// A double in [0, 1) from the top 53 bits of one draw.
double unit(std::mt19937_64 &rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }

// An integer in [0, n) without modulo bias (rejection of the short last block).
uint64_t below(std::mt19937_64 &rng, uint64_t n) {
  uint64_t limit = UINT64_MAX - UINT64_MAX % n;
  for (;;) {
    uint64_t r = rng();
    if (r < limit)
      return r % n;
  }
}

} // namespace

double along(const Axis &a, double u) {
  if (u <= 0)
    return a.from;
  if (u >= 1)
    return a.to;
  if (!a.logarithmic)
    return a.from + (a.to - a.from) * u;
  double sign = a.from < 0 ? -1 : 1;
  double lo = std::log(std::fabs(a.from)), hi = std::log(std::fabs(a.to));
  return sign * std::exp(lo + (hi - lo) * u);
}

uint64_t gridSize(const std::vector<Axis> &axes, uint64_t limit) {
  uint64_t total = 1;
  for (const Axis &a : axes) {
    uint64_t n = a.values.empty() ? static_cast<uint64_t>(a.points) : a.values.size();
    if (n == 0 || total > limit / n)
      return 0;
    total *= n;
  }
  return total;
}

std::vector<Point> grid(const std::vector<Axis> &axes) {
  std::vector<std::vector<double>> levels;
  for (const Axis &a : axes) {
    if (!a.values.empty()) {
      levels.push_back(a.values);
      continue;
    }
    std::vector<double> v(static_cast<size_t>(a.points));
    for (size_t i = 0; i < v.size(); ++i) // exact ends: u is 0 and 1 there
      v[i] = v.size() == 1 ? a.from : along(a, static_cast<double>(i) / static_cast<double>(v.size() - 1));
    levels.push_back(std::move(v));
  }
  std::vector<Point> out;
  uint64_t total = gridSize(axes, UINT64_MAX);
  out.reserve(static_cast<size_t>(total));
  std::vector<size_t> index(axes.size(), 0);
  for (uint64_t k = 0; k < total; ++k) {
    Point p(axes.size());
    for (size_t d = 0; d < axes.size(); ++d)
      p[d] = levels[d][index[d]];
    out.push_back(std::move(p));
    for (size_t d = axes.size(); d-- > 0;) { // odometer, last axis fastest
      if (++index[d] < levels[d].size())
        break;
      index[d] = 0;
    }
  }
  return out;
}

std::vector<Point> latinHypercube(const std::vector<Axis> &axes, uint64_t count, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::vector<Point> out(static_cast<size_t>(count), Point(axes.size()));
  std::vector<uint64_t> strata(static_cast<size_t>(count));
  for (size_t d = 0; d < axes.size(); ++d) {
    std::iota(strata.begin(), strata.end(), 0);
    for (size_t i = strata.size(); i > 1; --i) // Fisher-Yates
      std::swap(strata[i - 1], strata[static_cast<size_t>(below(rng, i))]);
    for (size_t i = 0; i < out.size(); ++i)
      out[i][d] = along(axes[d], (static_cast<double>(strata[i]) + unit(rng)) / static_cast<double>(count));
  }
  return out;
}

std::vector<Point> uniform(const std::vector<Axis> &axes, uint64_t count, uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::vector<Point> out(static_cast<size_t>(count), Point(axes.size()));
  for (Point &p : out)
    for (size_t d = 0; d < axes.size(); ++d)
      p[d] = along(axes[d], unit(rng));
  return out;
}

} // namespace saltpan::sweep
