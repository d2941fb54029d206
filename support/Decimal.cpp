// Decimal.cpp - printing-friendly rounding of decimal quantities.
#include "Decimal.h"

#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace saltpan {

std::string shortestDecimal(double v) {
  char buf[32];
  auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v); // shortest form that reads back exactly
  return ec == std::errc() ? std::string(buf, end) : std::to_string(v);
}

double tidyDecimal(double v) {
  if (!std::isfinite(v))
    return v;
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.15g", v);
  return withoutNegativeZero(std::strtod(buf, nullptr));
}

} // namespace saltpan
