// Places.cpp - places along cables: distances, pieces, probe names and path distances along a
// tree of compartments and cable pieces.
#include "Places.h"

#include "Decimal.h"

#include <algorithm>
#include <cassert>
#include <map>

namespace saltpan {

using namespace ast;

const CableValues *cableOf(const AnalyzedModel &model, const CompartmentDecl *decl) {
  for (const CableValues &cv : model.cables)
    if (decl && cv.decl == decl)
      return &cv;
  return nullptr;
}

const CableValues *cableOfPath(const AnalyzedModel &model, const std::string &path) {
  std::string head = path.substr(0, path.find('.'));
  for (const CableValues &cv : model.cables)
    if (cv.decl->name == head)
      return &cv;
  return nullptr;
}

double placeDistance(const Position &at, const CableValues &cable) {
  // A place is a literal number (the grammar allows nothing else); '%' made it a fraction.
  auto *n = dyn_cast<NumberExpr>(at.at.get());
  assert(n && "a place is a number and its unit");
  return n->type.dim == Dimension::none() || n->unitText == "%" ? n->value * cable.length : n->value;
}

std::optional<size_t> pieceAtDistance(const CableValues &cable, double along) {
  if (!(along >= 0 && along <= cable.length * (1 + 1e-12)))
    return std::nullopt;
  return std::min(cable.pieces - 1, static_cast<size_t>(along / cable.pieceLength()));
}

std::string probeAtPlace(const AnalyzedModel &model, const std::string &path, const Position &at) {
  const CableValues *cable = cableOfPath(model, path);
  if (!cable || !at)
    return path;
  auto piece = pieceAtDistance(*cable, placeDistance(at, *cable));
  if (!piece)
    return "";
  std::string head = cable->decl->name;
  return head + "[" + std::to_string(*piece) + "]" + path.substr(head.size());
}

std::optional<size_t> compartmentIndex(const AnalyzedModel &model, const std::string &probe) {
  std::string name = probe.substr(0, probe.find('.'));
  for (size_t i = 0; i < model.compartments.size(); ++i)
    if (model.compartments[i].name == name)
      return i;
  return std::nullopt;
}

std::string placeOutsideMessage(const CableValues &cable) {
  return "cable '" + cable.decl->name + "' is " + shortestDecimal(tidyDecimal(cable.length * 1e6)) +
         " um long; this place is outside it";
}

std::string placeExample(const std::string &path) {
  return "write e.g. '" + path + " at 100 um' or '" + path + " at 50 %'";
}

std::optional<double> pathDistance(const AnalyzedModel &model, size_t a, size_t b) {
  auto half = [&](size_t i) {
    const CompartmentValues &c = model.compartments[i];
    return c.piece < 0 ? 0.0 : 0.5 * (c.to - c.from);
  };
  std::map<size_t, size_t> parent; // each piece or compartment's one parent in the tree
  for (const JunctionValues &j : model.junctions)
    parent[j.child] = j.parent;
  // Distances from `a` to each of its ancestors, then up from `b` to the first one they share.
  std::map<size_t, double> fromA;
  double d = 0;
  for (size_t i = a;;) {
    fromA[i] = d;
    auto up = parent.find(i);
    if (up == parent.end())
      break;
    d += half(i) + half(up->second);
    i = up->second;
  }
  d = 0;
  for (size_t i = b;;) {
    if (auto shared = fromA.find(i); shared != fromA.end())
      return d + shared->second;
    auto up = parent.find(i);
    if (up == parent.end())
      return std::nullopt;
    d += half(i) + half(up->second);
    i = up->second;
  }
}

} // namespace saltpan
