// Tree.h - compartments joined into trees (a cable's pieces and what it grows from), and the
// O(N) solution of an implicit step's linear system by elimination from the leaves to the roots
// and substitution back (the ordering Hines 1984 describes; no fill-in on a tree).
#pragma once
#include "IR.h"

#include <vector>

namespace saltpan {

class Tree {
public:
  /// The trees of `model`'s junctions. Throws std::invalid_argument when a compartment has two
  /// parents, the junctions close a loop, or a joined compartment has no area.
  explicit Tree(const ir::Model &model);

  /// The compartment a compartment grows from, or -1 for a root (also every isolated one).
  int parent(size_t compartment) const { return parent_[compartment]; }
  /// The axial conductance (S) to the parent; 0 for a root.
  double conductance(size_t compartment) const { return conductance_[compartment]; }
  /// The root of each compartment's tree, in O(N): an isolated compartment is its own root.
  std::vector<int> roots() const;

  /// Solves A x = rhs in place (rhs becomes x; diag is spent). Row i of A holds diag[i] on the
  /// diagonal, up[i] at column parent(i), and low[c] at column c for each child c of i.
  void solve(double *diag, const double *up, const double *low, double *rhs) const;

private:
  std::vector<int> parent_;
  std::vector<double> conductance_;
  std::vector<int> order_; // every parent before its children
};

} // namespace saltpan
