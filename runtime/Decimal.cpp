// Decimal.cpp - printing-friendly rounding of decimal quantities.
#include "Decimal.h"

#include <cmath>
#include <cstdio>
#include <cstdlib>

namespace saltpan {

double tidyDecimal(double v) {
  if (!std::isfinite(v))
    return v;
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.15g", v);
  return withoutNegativeZero(std::strtod(buf, nullptr));
}

} // namespace saltpan
