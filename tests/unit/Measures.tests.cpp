// Measures.tests.cpp - trace measures refuse traces with values that are not numbers.
#include "Measures.h"
#include "IR.h"
#include "Simulate.h"

#include <catch2/catch.hpp>
#include <cmath>

using namespace saltpan;

namespace {

// One recorded potential, in mV, at 0, 1, 2 and 3 ms.
ir::Model oneProbe() {
  ir::Model m;
  m.probes.push_back({"c.V", "mV", 1e3, 0, -1});
  return m;
}

Trace trace(std::vector<double> millivolts) {
  Trace t;
  t.names = {"c.V"};
  t.units = {"mV"};
  for (size_t i = 0; i < millivolts.size(); ++i)
    t.time.push_back(static_cast<double>(i) * 1e-3);
  t.values = std::move(millivolts);
  return t;
}

} // namespace

TEST_CASE("a NaN anywhere in the trace fails every measure", "[measures]") {
  // NaN compares false with everything: a peak or a crossing would skip it and still pass.
  ir::Model m = oneProbe();
  Trace withNan = trace({-60, 20, NAN, -60});
  for (const char *name : {"peak", "minimum", "mean", "final", "spike_count", "value"}) {
    std::string why;
    INFO(name);
    CHECK_FALSE(measures::ofTrace(name, "c.V", 0.5e-3, m, withNan, why).has_value());
    CHECK(why.find("is not a finite number") != std::string::npos);
    CHECK(why.find("at 2 ms") != std::string::npos);
  }
  std::string why;
  auto peak = measures::ofTrace("peak", "c.V", NAN, m, trace({-60, 20, 10, -60}), why);
  REQUIRE(peak.has_value());
  CHECK(*peak == Approx(0.020));
}
