// Places.h - places along cables, shared by Lower (records, stimuli) and the expectations: the
// distance a place names, the piece it falls in, what is measured there, and path distances.
#pragma once
#include "AST.h"
#include "Analyze.h"

#include <optional>
#include <string>

namespace saltpan {

/// The cable `decl` is, or nullptr for a compartment.
const CableValues *cableOf(const AnalyzedModel &model, const ast::CompartmentDecl *decl);
/// The cable a dotted path ("dend.V") starts with, or nullptr.
const CableValues *cableOfPath(const AnalyzedModel &model, const std::string &path);
/// Metres from the cable's start that a place names (a length, or a percentage of the length).
double placeDistance(const ast::Position &at, const CableValues &cable);
/// The piece (0 to pieces - 1) a distance along the cable falls in; nullopt outside it.
std::optional<size_t> pieceAtDistance(const CableValues &cable, double along);
/// What a path at a place names: "dend.V" at 450 um is "dend[44].V"; the path itself off a
/// cable or without a place; empty for a place outside its cable.
std::string probeAtPlace(const AnalyzedModel &model, const std::string &path, const ast::Position &at);
/// The compartment or piece a probe belongs to ("dend[44]" of "dend[44].V"), an index into
/// model.compartments; nullopt when none.
std::optional<size_t> compartmentIndex(const AnalyzedModel &model, const std::string &probe);
/// "cable 'dend' is 500 um long; this place is outside it".
std::string placeOutsideMessage(const CableValues &cable);
/// How to give a place to `path`: "write e.g. 'dend.V at 100 um' or 'dend.V at 50 %'".
std::string placeExample(const std::string &path);
/// The path distance (m) along the tree between the centres of two compartments or pieces
/// (indices into model.compartments), as the model joins them: half a piece on either side of
/// every junction between pieces, nothing across a compartment. nullopt when not joined.
std::optional<double> pathDistance(const AnalyzedModel &model, size_t a, size_t b);

} // namespace saltpan
