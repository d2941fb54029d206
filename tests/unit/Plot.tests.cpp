// Plot.tests.cpp - SVG figures of traces (`saltpan run --plot`).
#include "Plot.h"

#include <catch2/catch.hpp>

#include <cmath>
#include <string>
#include <vector>

using namespace saltpan;

namespace {

size_t count(const std::string &text, const std::string &what) {
  size_t n = 0;
  for (size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + what.size()))
    ++n;
  return n;
}

// A small well-formedness check: every element closes in order, attributes are quoted, and
// every '&' starts an entity. Returns an empty string or what is wrong.
std::string xmlProblem(const std::string &s) {
  std::vector<std::string> open;
  size_t i = 0;
  if (s.rfind("<?xml ", 0) == 0)
    i = s.find("?>") + 2;
  bool root = false;
  while (i < s.size()) {
    if (s[i] == '&') {
      size_t semi = s.find(';', i);
      if (semi == std::string::npos || semi - i > 6)
        return "a bare '&'";
      ++i;
      continue;
    }
    if (s[i] != '<') {
      ++i;
      continue;
    }
    size_t end = s.find('>', i);
    if (end == std::string::npos)
      return "an unterminated tag";
    std::string tag = s.substr(i + 1, end - i - 1);
    if (count(tag, "\"") % 2 != 0)
      return "an unbalanced quote in <" + tag + ">";
    if (!tag.empty() && tag[0] == '/') {
      if (open.empty() || open.back() != tag.substr(1))
        return "</" + tag.substr(1) + "> closes " + (open.empty() ? "nothing" : open.back());
      open.pop_back();
    } else {
      std::string name = tag.substr(0, tag.find_first_of(" /"));
      if (open.empty()) {
        if (root)
          return "a second root element <" + name + ">";
        root = true;
      }
      if (tag.back() != '/')
        open.push_back(name);
    }
    i = end + 1;
  }
  if (!open.empty())
    return "<" + open.back() + "> is never closed";
  return root ? "" : "no root element";
}

Trace sampleTrace(size_t rows) {
  Trace t;
  t.names = {"soma.V", "soma.KLeak.current", "soma.NaLeak.current"};
  t.units = {"mV", "uA/cm2", "uA/cm2"};
  for (size_t r = 0; r < rows; ++r) {
    double ms = 0.1 * static_cast<double>(r);
    t.time.push_back(ms * 1e-3);
    t.values.push_back(-65 + 100 * std::exp(-std::pow(ms - 5, 2))); // a spike-like bump
    t.values.push_back(2 * std::sin(ms));
    t.values.push_back(-1.5 * std::cos(ms));
  }
  return t;
}

} // namespace

TEST_CASE("plotSvg draws one panel per unit with axes, legend and title", "[plot]") {
  Trace t = sampleTrace(201); // 0 to 20 ms
  std::string svg = plotSvg(t, "TestCell: step <1> & more");
  INFO(svg.substr(0, 2000));
  CHECK(xmlProblem(svg).empty());
  CHECK(svg.rfind("<?xml version=\"1.0\"", 0) == 0);
  CHECK(svg.find("<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\"") != std::string::npos);
  CHECK(svg.find("</svg>\n") == svg.size() - 7);
  // The title, escaped.
  CHECK(svg.find("TestCell: step &lt;1&gt; &amp; more") != std::string::npos);
  CHECK(svg.find("<1>") == std::string::npos);
  // Two panels (mV, uA/cm2), each with a time axis title and a quantity title with its unit.
  CHECK(count(svg, "<g class=\"panel\">") == 2);
  CHECK(count(svg, ">time (ms)<") == 2);
  CHECK(count(svg, ">V (mV)<") == 1);
  CHECK(count(svg, ">current density (uA/cm2)<") == 1);
  // One polyline per column, and a legend entry naming each.
  CHECK(count(svg, "<polyline") == 3);
  for (const std::string &name : t.names)
    CHECK(svg.find(">" + name + "<") != std::string::npos);
  // Round tick labels: time 0..20 ms, V -65..35 mV on a 20 mV grid.
  CHECK(svg.find(">0<") != std::string::npos);
  CHECK(svg.find(">20<") != std::string::npos);
  CHECK(svg.find(">-80<") != std::string::npos);
  CHECK(svg.find(">40<") != std::string::npos);
  // No non-numbers anywhere.
  CHECK(svg.find("nan") == std::string::npos);
  CHECK(svg.find("NaN") == std::string::npos);
  CHECK(svg.find("inf") == std::string::npos);
  // No external references.
  CHECK(svg.find("xlink") == std::string::npos);
  CHECK(svg.find("<script") == std::string::npos);
}

TEST_CASE("plotSvg is deterministic", "[plot]") {
  Trace t = sampleTrace(101);
  CHECK(plotSvg(t, "x") == plotSvg(t, "x"));
}

TEST_CASE("plotSvg leaves gaps at non-finite samples and writes no NaN", "[plot]") {
  Trace t = sampleTrace(101);
  t.values[50 * 3 + 0] = NAN; // V at 5 ms
  t.values[60 * 3 + 1] = INFINITY;
  std::string svg = plotSvg(t, "gaps");
  CHECK(xmlProblem(svg).empty());
  CHECK(count(svg, "<polyline") == 5); // V and KLeak split in two
  CHECK(svg.find("nan") == std::string::npos);
  CHECK(svg.find("inf") == std::string::npos);
}

TEST_CASE("plotSvg keeps long traces small and their extremes", "[plot]") {
  Trace t = sampleTrace(200001); // 0 to 20 s at 0.1 ms
  std::string svg = plotSvg(t, "long");
  CHECK(xmlProblem(svg).empty());
  CHECK(count(svg, "<polyline") == 3);
  CHECK(svg.size() < 400000);
}

TEST_CASE("plotSvg of an empty or flat trace is still a valid document", "[plot]") {
  Trace empty;
  std::string svg = plotSvg(empty, "nothing");
  CHECK(xmlProblem(svg).empty());
  CHECK(svg.find("no recorded samples") != std::string::npos);

  Trace flat;
  flat.names = {"cell.V"};
  flat.units = {"mV"};
  flat.time = {0, 1e-3, 2e-3};
  flat.values = {-70, -70, -70};
  svg = plotSvg(flat, "flat");
  CHECK(xmlProblem(svg).empty());
  CHECK(count(svg, "<polyline") == 1);
  CHECK(svg.find("nan") == std::string::npos);
  CHECK(svg.find(">V (mV)<") != std::string::npos);
}
