// Decimal.h - numbers as a reader wants them printed: no binary noise, no negative zero.
#pragma once
#include <string>

namespace saltpan {

/// `v` rounded to 15 significant digits, so 0.01 ms * 1e3 prints 10, not 10.000000000000002.
/// Only for values that were decimals to begin with (steps, times, unit conversions).
double tidyDecimal(double v);

/// The fewest significant digits (up to 17) that read back as exactly `v`: 279.45, not
/// 279.44999999999999. Exact, so dumps stay faithful.
std::string shortestDecimal(double v);

/// +0 for -0 (a CSV cell or JSON number of "-0" reads as a sign error); other values unchanged.
inline double withoutNegativeZero(double v) { return v == 0 ? 0.0 : v; }

} // namespace saltpan
