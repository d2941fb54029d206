// RunSettings.cpp - quantities with units, parameter settings and timing overrides.
#include "RunSettings.h"
#include "Nearest.h"

#include <cmath>
#include <cstdlib>

namespace saltpan {

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
  params[index] = q->first;
  return true;
}

bool applyTiming(ir::Protocol &protocol, const std::string &duration, const std::string &every, std::string &error) {
  auto override = [&](const std::string &text, double &into, const char *what) {
    if (text.empty())
      return true;
    auto q = parseQuantity(text);
    if (!q || q->second != dims::time() || q->first <= 0) {
      error = std::string(what) + " needs a positive time, e.g. 50ms";
      return false;
    }
    into = q->first;
    return true;
  };
  if (!override(duration, protocol.duration, "--duration") || !override(every, protocol.every, "--every"))
    return false;
  if (protocol.method != ir::Method::DormandPrince && protocol.method != ir::Method::Rosenbrock) {
    double ratio = protocol.every / protocol.step;
    if (std::fabs(ratio - std::round(ratio)) > 1e-9 * ratio || ratio < 0.5) {
      error = "the recording interval must be a whole number of steps";
      return false;
    }
  }
  return true;
}

} // namespace saltpan
