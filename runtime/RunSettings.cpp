// RunSettings.cpp - quantities with units, parameter settings and timing overrides.
#include "RunSettings.h"
#include "Nearest.h"
#include "Options.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace saltpan {

void addRunOptions(OptionParser &parser, RunArguments &into) {
  parser.value("--protocol", into.protocol);
  parser.repeated("--set", into.sets);
  parser.value("--duration", into.duration);
  parser.value("--every", into.every);
  parser.value("-o", into.output);
}

std::optional<std::pair<double, Dimension>> parseQuantity(const std::string &text) {
  const char *begin = text.c_str();
  char *end = nullptr;
  double number = std::strtod(begin, &end);
  if (end == begin || !std::isfinite(number))
    return std::nullopt;
  std::string unit(end);
  unit.erase(0, unit.find_first_not_of(' '));
  while (!unit.empty() && unit.back() == ' ')
    unit.pop_back();
  Unit total;
  bool divide = false;
  size_t i = 0;
  if (!unit.empty() && unit[0] == '/') {
    divide = true;
    i = 1;
  }
  while (i < unit.size()) {
    size_t j = unit.find_first_of("*/", i);
    std::string factor = unit.substr(i, j == std::string::npos ? std::string::npos : j - i);
    int power = 1;
    if (size_t caret = factor.find('^'); caret != std::string::npos) {
      power = std::atoi(factor.c_str() + caret + 1);
      factor = factor.substr(0, caret);
    }
    auto found = lookupUnitSymbol(factor);
    if (!found || found->celsius || power == 0)
      return std::nullopt;
    Unit u = found->unit.pow(power);
    total = divide ? total / u : total * u;
    if (j == std::string::npos)
      break;
    divide = unit[j] == '/';
    i = j + 1;
  }
  return std::make_pair(number * total.scale, total.dim);
}

std::optional<std::string> implausibleParameter(const ir::Model &model, size_t index, double value) {
  const std::string &name = model.paramNames[index];
  auto endsWith = [&](const std::string &suffix) {
    return name.size() >= suffix.size() && name.compare(name.size() - suffix.size(), suffix.size(), suffix) == 0;
  };
  if (!std::isfinite(value))
    return "the value of '" + name + "' is not a finite number in base units";
  if (model.paramDims[index] == dims::specificCapacitance() && !(value > 0))
    return "the capacitance '" + name + "' must be positive";
  if (endsWith(".density") && value < 0)
    return "the density '" + name + "' cannot be negative";
  return std::nullopt;
}

bool applyParameterSetting(const ir::Model &model, const std::string &assignment, std::vector<double> &params,
                           const std::string &listHint, std::string &error) {
  size_t eq = assignment.find('=');
  if (eq == std::string::npos) {
    error = "--set needs NAME=VALUE, not '" + assignment + "'";
    return false;
  }
  std::string name = assignment.substr(0, eq);
  int index = model.findParam(name);
  if (index < 0) {
    std::vector<std::string> names(model.paramNames.begin(), model.paramNames.end());
    std::vector<std::string> near = nearestNames(name, names);
    std::string hint;
    for (const std::string &n : near)
      hint += (hint.empty() ? "did you mean " : " or ") + ("'" + n + "'");
    error = "there is no parameter '" + name + "'; " + (hint.empty() ? "" : hint + "? ") + listHint;
    return false;
  }
  auto q = parseQuantity(assignment.substr(eq + 1));
  if (!q) {
    error = "cannot read the value in '" + assignment + "'; write a number and a unit, e.g. 100 mS/cm2";
    return false;
  }
  if (q->second != model.paramDims[index]) {
    error =
        "'" + name + "' must be " + describeDimension(model.paramDims[index]) + ", got " + describeDimension(q->second);
    return false;
  }
  if (auto why = implausibleParameter(model, static_cast<size_t>(index), q->first)) {
    error = *why + " (--set " + assignment + ")";
    return false;
  }
  params[index] = q->first;
  return true;
}

namespace {

std::string formatTime(double seconds) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.6g ms", seconds * 1e3);
  return buf;
}

std::string formatCount(double count) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.6g", count);
  return buf;
}

// Whether `ratio` is a whole number to within the rounding of the values it came from.
bool whole(double ratio) { return std::fabs(ratio - std::round(ratio)) <= 1e-9 * std::max(ratio, 1.0); }

} // namespace

std::optional<TimingProblem> checkTiming(const ir::Protocol &p) {
  using Field = TimingProblem::Field;
  if (!std::isfinite(p.duration) || p.duration <= 0)
    return TimingProblem{Field::Duration, "the duration must be a positive, finite time", ""};
  if (!std::isfinite(p.step) || p.step <= 0)
    return TimingProblem{Field::Step, "the step must be a positive, finite time", ""};
  if (!std::isfinite(p.every) || p.every <= 0)
    return TimingProblem{Field::Every, "the recording interval must be a positive, finite time", ""};
  bool adaptive = p.method == ir::Method::DormandPrince || p.method == ir::Method::Rosenbrock;
  if (!adaptive) {
    double steps = p.duration / p.step;
    if (steps < 1 - 1e-9)
      return TimingProblem{Field::Step, "the step is longer than the duration",
                           "a step of " + formatTime(p.step) + ", a duration of " + formatTime(p.duration)};
    if (!(steps <= maxTimingCount))
      return TimingProblem{Field::Duration, "the run needs too many steps",
                           formatTime(p.duration) + " in steps of " + formatTime(p.step) + " is " + formatCount(steps) +
                               " steps; at most " + formatCount(maxTimingCount) + " are allowed"};
    if (!whole(steps))
      return TimingProblem{Field::Duration, "the duration must be a whole number of steps",
                           formatTime(p.duration) + " is " + formatCount(steps) + " steps of " + formatTime(p.step)};
  }
  double samples = p.duration / p.every;
  if (samples < 1 - 1e-9)
    return TimingProblem{Field::Every, "the recording interval is longer than the duration",
                         "an interval of " + formatTime(p.every) + ", a duration of " + formatTime(p.duration)};
  if (!(samples <= maxTimingCount))
    return TimingProblem{Field::Every, "the run records too many samples",
                         formatTime(p.duration) + " every " + formatTime(p.every) + " is " + formatCount(samples) +
                             " samples; at most " + formatCount(maxTimingCount) + " are allowed"};
  if (!adaptive && !whole(p.every / p.step))
    return TimingProblem{Field::Every, "the recording interval must be a whole number of steps",
                         formatTime(p.every) + " is " + formatCount(p.every / p.step) + " steps of " +
                             formatTime(p.step)};
  return std::nullopt;
}

bool applyTiming(ir::Protocol &protocol, const std::string &duration, const std::string &every, std::string &error) {
  auto override = [&](const std::string &text, double &into, const char *what) {
    if (text.empty())
      return true;
    auto q = parseQuantity(text);
    if (!q || q->second != dims::time() || !(q->first > 0) || !std::isfinite(q->first)) {
      error = std::string(what) + " needs a positive time, e.g. 50ms";
      return false;
    }
    into = q->first;
    return true;
  };
  if (!override(duration, protocol.duration, "--duration") || !override(every, protocol.every, "--every"))
    return false;
  if (auto problem = checkTiming(protocol)) {
    const char *option = problem->field == TimingProblem::Field::Duration ? "--duration"
                         : problem->field == TimingProblem::Field::Every  ? "--every"
                                                                          : "the protocol's step";
    error = problem->message + " (" + option + ")";
    if (!problem->note.empty())
      error += ": " + problem->note;
    return false;
  }
  return true;
}

} // namespace saltpan
