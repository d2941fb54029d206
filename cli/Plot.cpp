// Plot.cpp - SVG figures of traces; see Plot.h.
#include "Plot.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <vector>

namespace saltpan {

namespace {

// Layout, in SVG user units (px).
constexpr double left = 90, plotWidth = 570, top = 56, panelHeight = 230, gap = 56, bottom = 60;
const char *const palette[] = {"#1f5fa8", "#c8412b", "#2c8a3a", "#8a3fa0", "#b8860b", "#127a80", "#a33d6b", "#555555"};

std::string fmt(const char *format, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}

std::string num(double v) { return fmt("%.2f", v); }

std::string escape(const std::string &s) {
  std::string out;
  for (char c : s) {
    switch (c) {
    case '&': out += "&amp;"; break;
    case '<': out += "&lt;"; break;
    case '>': out += "&gt;"; break;
    case '"': out += "&quot;"; break;
    case '\'': out += "&apos;"; break;
    default:
      // XML 1.0 forbids most control characters, even escaped.
      if (static_cast<unsigned char>(c) < 0x20 && c != '\t' && c != '\n' && c != '\r')
        out += '?';
      else
        out += c;
    }
  }
  return out;
}

struct Axis {
  double lo = 0, hi = 1, step = 0.2;
  std::vector<double> ticks;
};

// Round tick spacing (1, 2 or 5 times a power of ten) giving about `target` intervals;
// the axis is widened to whole ticks.
Axis niceAxis(double lo, double hi, int target = 5) {
  if (!std::isfinite(lo) || !std::isfinite(hi)) {
    lo = 0;
    hi = 1;
  }
  if (hi < lo)
    std::swap(lo, hi);
  if (hi - lo <= 1e-12 * std::max(std::fabs(lo), std::fabs(hi)) || hi == lo) {
    double pad = lo == 0 ? 1 : 0.1 * std::fabs(lo);
    lo -= pad;
    hi += pad;
  }
  double raw = (hi - lo) / target;
  double mag = std::pow(10, std::floor(std::log10(raw)));
  double f = raw / mag;
  double step = (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * mag;
  Axis a;
  a.step = step;
  a.lo = std::floor(lo / step + 1e-9) * step;
  a.hi = std::ceil(hi / step - 1e-9) * step;
  long n = std::lround((a.hi - a.lo) / step);
  for (long i = 0; i <= n; ++i)
    a.ticks.push_back(a.lo + static_cast<double>(i) * step);
  return a;
}

std::string tickLabel(double v, double step) {
  if (std::fabs(v) < step * 1e-6)
    v = 0;
  int decimals = std::max(0, static_cast<int>(-std::floor(std::log10(step) + 1e-9)));
  if (std::fabs(v) >= 1e6 || (v != 0 && std::fabs(v) < 1e-4 && decimals > 6))
    return fmt("%g", v);
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}

std::string quantityTitle(const std::string &unit, const std::vector<std::string> &names) {
  bool allV = !names.empty();
  for (const std::string &n : names)
    allV = allV && (n == "V" || (n.size() > 2 && n.compare(n.size() - 2, 2, ".V") == 0));
  std::string what;
  if (unit == "mV" || unit == "V")
    what = allV ? "V" : "voltage";
  else if (unit == "uA/cm2" || unit == "nA/cm2" || unit == "mA/cm2" || unit == "A/m2")
    what = "current density";
  else if (unit == "nA" || unit == "pA" || unit == "uA")
    what = "current";
  else if (unit == "mM" || unit == "uM" || unit == "nM")
    what = "concentration";
  else if (unit == "1")
    what = "fraction";
  else if (unit == "mS/cm2" || unit == "S/m2")
    what = "conductance density";
  else if (unit == "nS" || unit == "uS")
    what = "conductance";
  else
    what = "value";
  return what + " (" + unit + ")";
}

} // namespace

std::string plotSvg(const Trace &trace, const std::string &title) {
  // Panels: distinct units in order of first appearance.
  std::vector<std::string> units;
  std::vector<std::vector<size_t>> panelColumns;
  for (size_t c = 0; c < trace.columns(); ++c) {
    std::string u = c < trace.units.size() ? trace.units[c] : "";
    auto it = std::find(units.begin(), units.end(), u);
    if (it == units.end()) {
      units.push_back(u);
      panelColumns.push_back({c});
    } else {
      panelColumns[static_cast<size_t>(it - units.begin())].push_back(c);
    }
  }
  // The legend sits right of the panels; widen the figure for long names (~7 px a character).
  size_t longest = 0;
  for (const std::string &n : trace.names)
    longest = std::max(longest, n.size());
  const double right = std::max(200.0, 60 + 7.0 * static_cast<double>(longest));
  const double width = left + plotWidth + right;
  size_t panels = std::max<size_t>(units.size(), 1);
  double height = top + static_cast<double>(panels) * panelHeight + static_cast<double>(panels - 1) * gap + bottom;

  size_t rows = trace.time.size();
  double tMin = std::numeric_limits<double>::infinity(), tMax = -tMin;
  for (double t : trace.time)
    if (std::isfinite(t)) {
      tMin = std::min(tMin, t * 1e3);
      tMax = std::max(tMax, t * 1e3);
    }
  if (!(tMin <= tMax)) {
    tMin = 0;
    tMax = 1;
  }
  Axis xAxis = niceAxis(tMin, tMax, 8);
  auto xPixel = [&](double ms) { return left + (ms - xAxis.lo) / (xAxis.hi - xAxis.lo) * plotWidth; };

  std::string s;
  s += "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"no\"?>\n";
  s += "<svg xmlns=\"http://www.w3.org/2000/svg\" version=\"1.1\" width=\"" + num(width) + "\" height=\"" +
       num(height) + "\" viewBox=\"0 0 " + num(width) + " " + num(height) + "\">\n";
  s += "<title>" + escape(title) + "</title>\n";
  s += "<rect x=\"0\" y=\"0\" width=\"" + num(width) + "\" height=\"" + num(height) + "\" fill=\"#ffffff\"/>\n";
  s += "<text x=\"" + num(width / 2) +
       "\" y=\"30\" text-anchor=\"middle\" font-family=\"sans-serif\" "
       "font-size=\"17\" font-weight=\"bold\">" +
       escape(title) + "</text>\n";

  if (trace.columns() == 0 || rows == 0)
    s += "<text x=\"" + num(width / 2) + "\" y=\"" + num(top + panelHeight / 2) +
         "\" text-anchor=\"middle\" font-family=\"sans-serif\" font-size=\"14\">no recorded samples</text>\n";

  size_t colour = 0;
  for (size_t p = 0; p < units.size(); ++p) {
    const std::vector<size_t> &cols = panelColumns[p];
    double y0 = top + static_cast<double>(p) * (panelHeight + gap), y1 = y0 + panelHeight;
    double vMin = std::numeric_limits<double>::infinity(), vMax = -vMin;
    for (size_t c : cols)
      for (size_t r = 0; r < rows; ++r) {
        double v = trace.at(r, c);
        if (std::isfinite(v)) {
          vMin = std::min(vMin, v);
          vMax = std::max(vMax, v);
        }
      }
    Axis yAxis = niceAxis(vMin, vMax, 6);
    auto yPixel = [&](double v) { return y1 - (v - yAxis.lo) / (yAxis.hi - yAxis.lo) * panelHeight; };

    s += "<g class=\"panel\">\n";
    // Grid and ticks.
    for (double t : xAxis.ticks) {
      double x = xPixel(t);
      s += "<line x1=\"" + num(x) + "\" y1=\"" + num(y0) + "\" x2=\"" + num(x) + "\" y2=\"" + num(y1) +
           "\" stroke=\"#e4e4e4\" stroke-width=\"1\"/>\n";
      s += "<line x1=\"" + num(x) + "\" y1=\"" + num(y1) + "\" x2=\"" + num(x) + "\" y2=\"" + num(y1 + 5) +
           "\" stroke=\"#000000\" stroke-width=\"1\"/>\n";
      s += "<text x=\"" + num(x) + "\" y=\"" + num(y1 + 19) +
           "\" text-anchor=\"middle\" font-family=\"sans-serif\" font-size=\"12\">" + escape(tickLabel(t, xAxis.step)) +
           "</text>\n";
    }
    for (double v : yAxis.ticks) {
      double y = yPixel(v);
      s += "<line x1=\"" + num(left) + "\" y1=\"" + num(y) + "\" x2=\"" + num(left + plotWidth) + "\" y2=\"" + num(y) +
           "\" stroke=\"#e4e4e4\" stroke-width=\"1\"/>\n";
      s += "<line x1=\"" + num(left - 5) + "\" y1=\"" + num(y) + "\" x2=\"" + num(left) + "\" y2=\"" + num(y) +
           "\" stroke=\"#000000\" stroke-width=\"1\"/>\n";
      s += "<text x=\"" + num(left - 8) + "\" y=\"" + num(y + 4) +
           "\" text-anchor=\"end\" font-family=\"sans-serif\" font-size=\"12\">" + escape(tickLabel(v, yAxis.step)) +
           "</text>\n";
    }
    // Frame (the axes).
    s += "<rect x=\"" + num(left) + "\" y=\"" + num(y0) + "\" width=\"" + num(plotWidth) + "\" height=\"" +
         num(panelHeight) + "\" fill=\"none\" stroke=\"#000000\" stroke-width=\"1\"/>\n";
    // Axis titles.
    std::vector<std::string> names;
    for (size_t c : cols)
      names.push_back(trace.names[c]);
    double yMid = (y0 + y1) / 2;
    s += "<text x=\"" + num(24) + "\" y=\"" + num(yMid) + "\" transform=\"rotate(-90 " + num(24) + " " + num(yMid) +
         ")\" text-anchor=\"middle\" font-family=\"sans-serif\" font-size=\"13\">" +
         escape(quantityTitle(units[p], names)) + "</text>\n";
    s += "<text x=\"" + num(left + plotWidth / 2) + "\" y=\"" + num(y1 + 40) +
         "\" text-anchor=\"middle\" font-family=\"sans-serif\" font-size=\"13\">time (ms)</text>\n";

    // Curves, clipped to the frame; with more samples than pixels, each pixel column keeps
    // its first, lowest, highest and last sample, so spikes survive.
    std::string clip = "clip" + std::to_string(p);
    s += "<clipPath id=\"" + clip + "\"><rect x=\"" + num(left) + "\" y=\"" + num(y0) + "\" width=\"" + num(plotWidth) +
         "\" height=\"" + num(panelHeight) + "\"/></clipPath>\n";
    for (size_t k = 0; k < cols.size(); ++k) {
      size_t c = cols[k];
      const char *stroke = palette[(colour + k) % (sizeof palette / sizeof *palette)];
      std::vector<std::string> segments;
      std::string points;
      long bucket = std::numeric_limits<long>::min();
      std::vector<size_t> members;
      auto flushBucket = [&]() {
        if (members.empty())
          return;
        size_t lo = members.front(), hi = members.front();
        for (size_t r : members) {
          if (trace.at(r, c) < trace.at(lo, c))
            lo = r;
          if (trace.at(r, c) > trace.at(hi, c))
            hi = r;
        }
        std::vector<size_t> keep = {members.front(), std::min(lo, hi), std::max(lo, hi), members.back()};
        keep.erase(std::unique(keep.begin(), keep.end()), keep.end());
        for (size_t r : keep)
          points += (points.empty() ? "" : " ") + num(xPixel(trace.time[r] * 1e3)) + "," + num(yPixel(trace.at(r, c)));
        members.clear();
      };
      auto endSegment = [&]() {
        flushBucket();
        if (!points.empty())
          segments.push_back(points);
        points.clear();
      };
      for (size_t r = 0; r < rows; ++r) {
        double v = trace.at(r, c), t = trace.time[r];
        if (!std::isfinite(v) || !std::isfinite(t)) {
          endSegment();
          bucket = std::numeric_limits<long>::min();
          continue;
        }
        long b = std::lround(std::floor(xPixel(t * 1e3) * 2)); // half-pixel columns
        if (b != bucket)
          flushBucket();
        bucket = b;
        members.push_back(r);
      }
      endSegment();
      for (const std::string &seg : segments)
        s += "<polyline class=\"trace\" clip-path=\"url(#" + clip + ")\" fill=\"none\" stroke=\"" + stroke +
             "\" stroke-width=\"1.5\" stroke-linejoin=\"round\" points=\"" + seg + "\"/>\n";
      // Legend entry.
      double ly = y0 + 14 + static_cast<double>(k) * 20, lx = left + plotWidth + 16;
      s += "<line x1=\"" + num(lx) + "\" y1=\"" + num(ly) + "\" x2=\"" + num(lx + 24) + "\" y2=\"" + num(ly) +
           "\" stroke=\"" + stroke + "\" stroke-width=\"2\"/>\n";
      s += "<text x=\"" + num(lx + 30) + "\" y=\"" + num(ly + 4) + "\" font-family=\"sans-serif\" font-size=\"12\">" +
           escape(trace.names[c]) + "</text>\n";
    }
    colour += cols.size();
    s += "</g>\n";
  }
  s += "</svg>\n";
  return s;
}

} // namespace saltpan
