// SweepPoints.h - the points of a parameter sweep: Cartesian grids of ranges and lists, and
// seeded Latin-hypercube or uniform random samples over ranges.
//
// Every design is deterministic: the same axes (and seed) give the same points, in the same
// order, on every machine (the generator is the standard's mt19937_64, and the conversions
// to doubles and to bounded integers are written here, not left to the library).
#pragma once
#include <cstdint>
#include <vector>

namespace saltpan::sweep {

struct Axis {
  double from = 0, to = 0;     // a range (SI)
  long points = 0;             // grid points along the range
  bool logarithmic = false;    // spaced (or sampled) evenly in log |value|; both ends share a sign
  std::vector<double> values;  // a list, used instead of the range when not empty
};

using Point = std::vector<double>; // one value per axis

/// The Cartesian product of the axes, the last axis varying fastest.
std::vector<Point> grid(const std::vector<Axis> &axes);
/// The number of grid points, or 0 when it would exceed `limit`.
uint64_t gridSize(const std::vector<Axis> &axes, uint64_t limit);

/// `count` points, each axis cut into `count` equal strata (in log space when logarithmic)
/// with exactly one point in each, strata paired at random, a uniform position inside each.
std::vector<Point> latinHypercube(const std::vector<Axis> &axes, uint64_t count, uint64_t seed);
/// `count` independent uniform points over the ranges.
std::vector<Point> uniform(const std::vector<Axis> &axes, uint64_t count, uint64_t seed);

/// The value a fraction `u` in [0, 1] of the way along the axis's range.
double along(const Axis &axis, double u);

} // namespace saltpan::sweep
