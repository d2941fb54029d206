// Tree.cpp - the tree order of joined compartments and its elimination.
#include "Tree.h"

#include <stdexcept>

namespace saltpan {

Tree::Tree(const ir::Model &model)
    : parent_(model.compartments.size(), -1), conductance_(model.compartments.size(), 0) {
  const size_t n = model.compartments.size();
  std::vector<std::vector<int>> children(n);
  for (const ir::Junction &j : model.junctions) {
    size_t child = static_cast<size_t>(j.child);
    if (parent_[child] >= 0)
      throw std::invalid_argument("compartment '" + model.compartments[child].name + "' grows from two others");
    parent_[child] = j.parent;
    conductance_[child] = j.conductance;
    children[static_cast<size_t>(j.parent)].push_back(j.child);
    for (int end : {j.parent, j.child})
      if (!(model.compartments[static_cast<size_t>(end)].area > 0))
        throw std::invalid_argument("joined compartment '" + model.compartments[static_cast<size_t>(end)].name +
                                    "' has no area");
  }
  // Roots first, then breadth first: a loop has no root, so its compartments are never reached.
  order_.reserve(n);
  for (size_t i = 0; i < n; ++i)
    if (parent_[i] < 0)
      order_.push_back(static_cast<int>(i));
  for (size_t k = 0; k < order_.size(); ++k)
    for (int c : children[static_cast<size_t>(order_[k])])
      order_.push_back(c);
  if (order_.size() != n)
    throw std::invalid_argument("the junctions of the model close a loop");
}

std::vector<int> Tree::roots() const {
  std::vector<int> root(parent_.size());
  for (int c : order_) { // a parent comes before its children, so its root is known
    size_t i = static_cast<size_t>(c);
    root[i] = parent_[i] < 0 ? c : root[static_cast<size_t>(parent_[i])];
  }
  return root;
}

void Tree::solve(double *diag, const double *up, const double *low, double *rhs) const {
  // Leaves to roots: row i (one parent p) is subtracted from row p, clearing A[p][i].
  for (size_t k = order_.size(); k-- > 0;) {
    size_t i = static_cast<size_t>(order_[k]);
    int p = parent_[i];
    if (p < 0)
      continue;
    double f = low[i] / diag[i];
    diag[p] -= f * up[i];
    rhs[p] -= f * rhs[i];
  }
  // Roots to leaves: each row now holds only its diagonal and its parent.
  for (int c : order_) {
    size_t i = static_cast<size_t>(c);
    int p = parent_[i];
    rhs[i] = (rhs[i] - (p >= 0 ? up[i] * rhs[p] : 0)) / diag[i];
  }
}

} // namespace saltpan
