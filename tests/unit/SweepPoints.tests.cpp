// SweepPoints.tests.cpp - the points of a sweep (runtime/SweepPoints): grid order and ends,
// the size limit, Latin-hypercube strata, uniform samples, and their seeds.
#include "SweepPoints.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <cstdint>
#include <set>
#include <vector>

using namespace saltpan::sweep;

namespace {

Axis range(double from, double to, long points, bool logarithmic = false) {
  Axis a;
  a.from = from;
  a.to = to;
  a.points = points;
  a.logarithmic = logarithmic;
  return a;
}

Axis list(std::vector<double> values) {
  Axis a;
  a.values = std::move(values);
  return a;
}

// The stratum (0 to n-1) that the value v of an axis falls in, computed from the ends
// independently of along(): linear or logarithmic position times n.
long stratum(const Axis &a, double v, uint64_t n) {
  double u = a.logarithmic ? std::log(v / a.from) / std::log(a.to / a.from) : (v - a.from) / (a.to - a.from);
  return static_cast<long>(std::floor(u * static_cast<double>(n)));
}

} // namespace

TEST_CASE("a grid varies its last axis fastest", "[sweep]") {
  std::vector<Point> points = grid({list({1, 2}), list({10, 20, 30})});
  std::vector<Point> expected = {{1, 10}, {1, 20}, {1, 30}, {2, 10}, {2, 20}, {2, 30}};
  CHECK(points == expected);
}

TEST_CASE("a grid over a range hits both ends exactly", "[sweep]") {
  // 0.1 and 0.7 are not sums of steps of 0.05 in binary; the ends must still be exact.
  std::vector<Point> points = grid({range(0.1, 0.7, 13)});
  REQUIRE(points.size() == 13);
  CHECK(points.front()[0] == 0.1);
  CHECK(points.back()[0] == 0.7);
  for (size_t i = 0; i < points.size(); ++i)
    CHECK(points[i][0] == Approx(0.1 + 0.05 * static_cast<double>(i)).epsilon(1e-14));
  // Descending ranges run from `from` to `to`.
  std::vector<Point> down = grid({range(5, -5, 3)});
  CHECK(down == std::vector<Point>{{5}, {0}, {-5}});
}

TEST_CASE("a one-point grid axis holds its single value", "[sweep]") {
  std::vector<Point> points = grid({range(3, 3, 1), list({7, 8})});
  CHECK(points == std::vector<Point>{{3, 7}, {3, 8}});
  CHECK(grid({list({42})}) == std::vector<Point>{{42}});
}

TEST_CASE("a logarithmic grid is geometric and its ends are exact", "[sweep]") {
  for (double sign : {1.0, -1.0}) {
    Axis a = range(sign * 1e-3, sign * 1e3, 7, true);
    std::vector<Point> points = grid({a});
    REQUIRE(points.size() == 7);
    CHECK(points.front()[0] == sign * 1e-3);
    CHECK(points.back()[0] == sign * 1e3);
    for (size_t i = 0; i < points.size(); ++i)
      CHECK(points[i][0] == Approx(sign * std::pow(10.0, -3.0 + static_cast<double>(i))).epsilon(1e-12));
  }
  // An awkward ratio: the last point must not come out as 0.30000000000000004.
  std::vector<Point> odd = grid({range(0.007, 0.3, 11, true)});
  CHECK(odd.back()[0] == 0.3);
  CHECK(odd.front()[0] == 0.007);
}

TEST_CASE("the grid size is the product of the axis lengths, or 0 past the limit", "[sweep]") {
  std::vector<Axis> axes = {range(0, 1, 64), range(0, 1, 64), list({1, 2, 3})};
  CHECK(gridSize(axes, 100000000) == 64 * 64 * 3);
  CHECK(gridSize(axes, 64 * 64 * 3) == 64 * 64 * 3);
  CHECK(gridSize(axes, 64 * 64 * 3 - 1) == 0);
  CHECK(grid(axes).size() == 64 * 64 * 3);
  // A product that overflows 64 bits is reported as too large, never wrapped round.
  std::vector<Axis> huge(5, range(0, 1, 100000000));
  CHECK(gridSize(huge, UINT64_MAX) == 0);
  CHECK(gridSize(huge, 100000000) == 0);
  std::vector<Axis> two(2, range(0, 1, 4294967296L)); // 2^32 * 2^32 = 2^64 wraps to 0
  CHECK(gridSize(two, UINT64_MAX) == 0);
  CHECK(gridSize({range(0, 1, 0)}, 100) == 0);
}

TEST_CASE("a Latin hypercube puts exactly one point in every stratum of every axis", "[sweep]") {
  std::vector<Axis> axes = {range(60, 180, 0), range(-80, -40, 0), range(0.01, 100, 0, true)};
  for (uint64_t n : {1u, 2u, 7u, 64u, 257u, 1000u})
    for (uint64_t seed : {0ull, 1ull, 2026ull, 9007199254740992ull}) {
      INFO("n = " << n << ", seed = " << seed);
      std::vector<Point> points = latinHypercube(axes, n, seed);
      REQUIRE(points.size() == n);
      for (size_t d = 0; d < axes.size(); ++d) {
        std::set<long> strata;
        for (const Point &p : points) {
          REQUIRE(p.size() == axes.size());
          double lo = std::min(axes[d].from, axes[d].to), hi = std::max(axes[d].from, axes[d].to);
          CHECK(p[d] >= lo);
          CHECK(p[d] <= hi);
          long s = stratum(axes[d], p[d], n);
          CHECK(s >= 0);
          CHECK(s < static_cast<long>(n));
          strata.insert(s);
        }
        CHECK(strata.size() == n);
      }
    }
}

TEST_CASE("a sample's seed decides its points", "[sweep]") {
  std::vector<Axis> axes = {range(0, 1, 0), range(10, 20, 0)};
  CHECK(latinHypercube(axes, 50, 7) == latinHypercube(axes, 50, 7));
  CHECK(latinHypercube(axes, 50, 7) != latinHypercube(axes, 50, 8));
  CHECK(uniform(axes, 50, 7) == uniform(axes, 50, 7));
  CHECK(uniform(axes, 50, 7) != uniform(axes, 50, 8));
  // The two designs differ for the same seed, and neither repeats a point.
  CHECK(uniform(axes, 50, 7) != latinHypercube(axes, 50, 7));
  std::vector<Point> points = latinHypercube(axes, 50, 7);
  CHECK(std::set<Point>(points.begin(), points.end()).size() == 50);
}

TEST_CASE("uniform samples lie within their ranges and fill them", "[sweep]") {
  std::vector<Axis> axes = {range(-3, 5, 0), range(1e-2, 1e2, 0, true), range(9, 2, 0)};
  std::vector<Point> points = uniform(axes, 4000, 123);
  REQUIRE(points.size() == 4000);
  std::vector<double> sum(3, 0.0);
  for (const Point &p : points) {
    CHECK(p[0] >= -3);
    CHECK(p[0] <= 5);
    CHECK(p[1] >= 1e-2);
    CHECK(p[1] <= 1e2);
    CHECK(p[2] >= 2);
    CHECK(p[2] <= 9);
    sum[0] += p[0];
    sum[1] += std::log10(p[1]);
    sum[2] += p[2];
  }
  // Means of 4000 uniform draws are within ~5 standard errors of the middle.
  CHECK(sum[0] / 4000 == Approx(1).margin(5 * 8 / std::sqrt(12.0 * 4000)));
  CHECK(sum[1] / 4000 == Approx(0).margin(5 * 4 / std::sqrt(12.0 * 4000)));
  CHECK(sum[2] / 4000 == Approx(5.5).margin(5 * 7 / std::sqrt(12.0 * 4000)));
}

TEST_CASE("along gives the ends at 0 and 1", "[sweep]") {
  Axis a = range(2, 8, 0);
  CHECK(along(a, 0) == 2);
  CHECK(along(a, 1) == 8);
  CHECK(along(a, 0.5) == 5);
  Axis l = range(1, 100, 0, true);
  CHECK(along(l, 0.5) == Approx(10).epsilon(1e-14));
  CHECK(along(l, 1) == 100);
}
