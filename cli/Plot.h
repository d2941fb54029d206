// Plot.h - a recorded trace as an SVG 1.1 figure (`saltpan run --plot FILE`).
//
// One panel per distinct display unit, stacked and sharing the time axis; each panel has
// axes, tick labels at round numbers, axis titles with units and a legend of its columns.
// Plain SVG with no scripts, fonts or other files; the same trace always gives the same text.
#pragma once
#include "Simulate.h"

#include <string>

namespace saltpan {

/// The SVG document (time in the trace is in seconds; it is drawn in ms).
std::string plotSvg(const Trace &trace, const std::string &title);

} // namespace saltpan
