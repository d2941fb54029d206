// HH1952Rates.h - the opening and closing rates of the Hodgkin-Huxley 1952 gates (modern
// convention, 6.3 degC, V in mV, rates per ms), shared by the hand-written benchmark baselines.
#pragma once
#include <cmath>

namespace hh1952 {

inline double exprel(double x) { return x == 0 ? 1.0 : std::expm1(x) / x; }
inline double alphaM(double v) { return 1.0 / exprel(-(v + 40) / 10); }
inline double betaM(double v) { return 4 * std::exp(-(v + 65) / 18); }
inline double alphaH(double v) { return 0.07 * std::exp(-(v + 65) / 20); }
inline double betaH(double v) { return 1 / (1 + std::exp(-(v + 35) / 10)); }
inline double alphaN(double v) { return 0.1 / exprel(-(v + 55) / 10); }
inline double betaN(double v) { return 0.125 * std::exp(-(v + 65) / 80); }

} // namespace hh1952
