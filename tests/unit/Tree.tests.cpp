// Tree.tests.cpp - joined compartments: the tree elimination against dense Gaussian
// elimination, refused shapes, and a passive cable cut into pieces against the closed forms of
// cable theory (steady state), stepped by backward Euler, Crank-Nicolson and RK4.
#include "Tree.h"
#include "KernelPlan.h"
#include "Places.h"
#include "Run.h"
#include "TestSupport.h"

#include <cmath>
#include <random>
#include <sstream>

using namespace saltpan;

namespace {

// A tree of n compartments with random parents (each before its child) as a model with junctions.
ir::Model randomTree(size_t n, std::mt19937_64 &random) {
  ir::Model m;
  for (size_t i = 0; i < n; ++i) {
    ir::Compartment c;
    c.name = "c" + std::to_string(i);
    c.area = 1e-9 * (1 + static_cast<double>(i % 3));
    m.compartments.push_back(c);
    if (i > 0)
      m.junctions.push_back({static_cast<int>(random() % i), static_cast<int>(i), 1e-9});
  }
  return m;
}

// Solves the dense form of the same system by Gaussian elimination with partial pivoting.
std::vector<double> denseSolve(std::vector<double> a, std::vector<double> b, size_t n) {
  for (size_t col = 0; col < n; ++col) {
    size_t pivot = col;
    for (size_t r = col + 1; r < n; ++r)
      if (std::fabs(a[r * n + col]) > std::fabs(a[pivot * n + col]))
        pivot = r;
    for (size_t c = 0; c < n; ++c)
      std::swap(a[col * n + c], a[pivot * n + c]);
    std::swap(b[col], b[pivot]);
    for (size_t r = col + 1; r < n; ++r) {
      double f = a[r * n + col] / a[col * n + col];
      for (size_t c = col; c < n; ++c)
        a[r * n + c] -= f * a[col * n + c];
      b[r] -= f * b[col];
    }
  }
  for (size_t i = n; i-- > 0;) {
    double s = b[i];
    for (size_t c = i + 1; c < n; ++c)
      s -= a[i * n + c] * b[c];
    b[i] = s / a[i * n + i];
  }
  return b;
}

// A passive cable as `pieces` isolated compartments from the language, then joined here: Rm
// 20 kOhm cm2 (0.05 mS/cm2 leak at the leak's reversal), Cm 1 uF/cm2, diameter 2 um, axial
// resistivity 100 Ohm cm, length 500 um; a steady current density into the first piece.
struct Cable {
  std::unique_ptr<Compilation> c;
  ir::Model model;
  double diameter = 2e-6, length = 500e-6, ri = 1.0, rm = 2.0; // m, m, Ohm m, Ohm m2
  double injected = 0;                                         // A into the first piece
};

Cable passiveCable(size_t pieces, ir::Method method, double step, double duration) {
  Cable cable;
  std::ostringstream spec;
  spec << "temperature 20 degC\nchannel Leak { reversal -65 mV }\n";
  for (size_t i = 0; i < pieces; ++i)
    spec << "compartment p" << i
         << " {\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n  membrane { Leak 0.05 mS/cm2 }\n}\n";
  spec << "protocol hold {\n  method rk4 step 10 us\n  duration 1 ms\n  inject p0 1 uA/cm2 from 0 ms to 10000 ms\n"
       << "  record p0.V, p" << pieces - 1 << ".V every 1 ms\n}\n";
  cable.c = testing::compile(spec.str());
  INFO(testing::allDiagnostics(*cable.c));
  REQUIRE(cable.c->checked);
  cable.model = cable.c->lowered.begin()->second;
  ir::Model &m = cable.model;
  double piece = cable.length / static_cast<double>(pieces);
  double area = M_PI * cable.diameter * piece;
  double axial = M_PI * cable.diameter * cable.diameter / (4 * cable.ri * piece); // S between piece centres
  for (ir::Compartment &c : m.compartments)
    c.area = area;
  for (size_t i = 1; i < pieces; ++i)
    m.junctions.push_back({static_cast<int>(i - 1), static_cast<int>(i), axial});
  m.protocol.method = method;
  m.protocol.step = step;
  m.protocol.duration = duration;
  m.protocol.every = duration;
  cable.injected = 1e-2 * area; // 1 uA/cm2 is 1e-2 A/m2
  return cable;
}

Trace simulateCable(const Cable &cable) {
  SimulationFailure failure;
  Trace t = runModel(cable.model, cable.model.params, KernelCompiler()).trace;
  REQUIRE_FALSE(failure.failed);
  return t;
}

} // namespace

TEST_CASE("the tree elimination solves what dense elimination solves", "[tree]") {
  std::mt19937_64 random(20261203);
  std::uniform_real_distribution<double> value(-1, 1);
  for (size_t n : {1u, 2u, 7u, 40u}) {
    ir::Model m = randomTree(n, random);
    Tree tree(m);
    std::vector<double> diag(n), up(n, 0), low(n, 0), rhs(n), dense(n * n, 0);
    for (size_t i = 0; i < n; ++i) {
      diag[i] = 4 + value(random); // diagonally dominant, as every implicit step's system is
      rhs[i] = value(random);
      dense[i * n + i] = diag[i];
      int p = tree.parent(i);
      if (p >= 0) {
        up[i] = value(random);
        low[i] = value(random);
        dense[i * n + static_cast<size_t>(p)] = up[i];
        dense[static_cast<size_t>(p) * n + i] = low[i];
      }
    }
    std::vector<double> expected = denseSolve(dense, rhs, n);
    tree.solve(diag.data(), up.data(), low.data(), rhs.data());
    for (size_t i = 0; i < n; ++i)
      CHECK_THAT(rhs[i], Catch::Matchers::WithinAbs(expected[i], 1e-12));
  }
}

TEST_CASE("a loop, two parents and a joined compartment without area are refused", "[tree]") {
  std::mt19937_64 random(1);
  ir::Model m = randomTree(4, random);
  ir::Model loop = m;
  loop.junctions = {{1, 2, 1e-9}, {2, 3, 1e-9}, {3, 1, 1e-9}};
  CHECK_THROWS_WITH(Tree(loop), Catch::Contains("close a loop"));
  ir::Model twoParents = m;
  twoParents.junctions.push_back({0, 3, 1e-9});
  CHECK_THROWS_WITH(Tree(twoParents), Catch::Contains("'c3' grows from two others"));
  ir::Model flat = m;
  flat.compartments[2].area = 0;
  CHECK_THROWS_WITH(Tree(flat), Catch::Contains("'c2' has no area"));
  ir::Model isolated = m;
  isolated.junctions.clear();
  Tree alone(isolated);
  CHECK(alone.parent(3) == -1);
  CHECK(alone.roots() == std::vector<int>{0, 1, 2, 3});
}

TEST_CASE("each compartment's root is the root its parents lead to", "[tree]") {
  std::mt19937_64 random(2);
  ir::Model m = randomTree(5, random);
  // Two trees: 0 <- 1 <- 3 and 2 <- 4, with the child 3 listed before its parent 1's junction.
  m.junctions = {{1, 3, 1e-9}, {0, 1, 1e-9}, {2, 4, 1e-9}};
  CHECK(Tree(m).roots() == std::vector<int>{0, 0, 2, 0, 2});
}

TEST_CASE("a passive sealed cable settles to the closed forms of cable theory", "[tree][cable]") {
  // Length constant lambda = sqrt(Rm d / (4 Ri)); a current I0 into the sealed end x = 0 of a
  // cable of length L holds V(x) = I0 r_a lambda cosh((L - x) / lambda) / sinh(L / lambda) above
  // rest, r_a = 4 Ri / (pi d^2), so the input resistance is r_a lambda coth(L / lambda) (Rall 1969;
  // Jack, Noble & Tsien 1975, ch. 3). Here lambda = 1 mm and L = 0.5 mm. The pieces are centred
  // half a piece inside the ends, so the first piece's V is compared with V(piece / 2).
  const ir::Method methods[] = {ir::Method::BackwardEuler, ir::Method::CrankNicolson, ir::Method::RungeKutta4};
  std::vector<double> errors;
  for (size_t pieces : {25u, 50u, 100u}) {
    for (ir::Method method : methods) {
      if (method == ir::Method::RungeKutta4 && pieces != 25)
        continue; // explicit: the step must stay below the shortest piece's charging time
      // 400 ms is 20 membrane time constants: the transient has decayed below 1e-8 of it.
      Cable cable = passiveCable(pieces, method, method == ir::Method::RungeKutta4 ? 1e-6 : 100e-6, 0.4);
      Trace t = simulateCable(cable);
      INFO(ir::methodName(method) << ", " << pieces << " pieces");
      double lambda = std::sqrt(cable.rm * cable.diameter / (4 * cable.ri));
      double ra = 4 * cable.ri / (M_PI * cable.diameter * cable.diameter);
      auto closedForm = [&](double x) { // V above rest per injected current, Ohm
        return ra * lambda * std::cosh((cable.length - x) / lambda) / std::sinh(cable.length / lambda);
      };
      double piece = cable.length / static_cast<double>(pieces);
      double v0 = (t.values[t.values.size() - 2] + 65) * 1e-3; // V above rest at the first piece
      double vEnd = (t.values.back() + 65) * 1e-3;             // and at the last
      double error = std::fabs(v0 / cable.injected / closedForm(0.5 * piece) - 1);
      CHECK(error < 0.05 / static_cast<double>(pieces * pieces)); // second order in the piece length
      if (method == ir::Method::BackwardEuler)
        errors.push_back(error);
      CHECK_THAT(vEnd / v0, Catch::Matchers::WithinRel(closedForm(cable.length - 0.5 * piece) / closedForm(0.5 * piece),
                                                       0.01 / static_cast<double>(pieces * pieces)));
    }
  }
  // Halving the pieces quarters the error.
  REQUIRE(errors.size() == 3);
  for (size_t i = 1; i < errors.size(); ++i)
    CHECK_THAT(errors[i - 1] / errors[i], Catch::Matchers::WithinAbs(4, 0.1));
}

TEST_CASE("backward Euler is first order in time on a cable, Crank-Nicolson second", "[tree][cable]") {
  // Charging of the same cable over 2 ms (a transient), against RK4 at a step 100 times smaller.
  Cable reference = passiveCable(20, ir::Method::RungeKutta4, 0.5e-6, 2e-3);
  double exact = simulateCable(reference).values.back();
  for (ir::Method method : {ir::Method::BackwardEuler, ir::Method::CrankNicolson}) {
    std::vector<double> errors;
    for (double step : {100e-6, 50e-6, 25e-6})
      errors.push_back(std::fabs(simulateCable(passiveCable(20, method, step, 2e-3)).values.back() - exact));
    double order = method == ir::Method::BackwardEuler ? 1 : 2;
    INFO(ir::methodName(method) << ": errors " << errors[0] << ", " << errors[1] << ", " << errors[2] << " mV");
    for (size_t i = 1; i < errors.size(); ++i)
      CHECK_THAT(std::log2(errors[i - 1] / errors[i]), Catch::Matchers::WithinAbs(order, 0.15));
  }
}

TEST_CASE("a cable written in the language settles to the closed form of cable theory", "[tree][cable]") {
  // The same sealed cable as above, now cut and joined by saltpan from its `cable` block: a free
  // cable (it grows from nothing), a current into its first piece, V recorded at both ends.
  // V(x) = I0 r_a lambda cosh((L - x) / lambda) / sinh(L / lambda) (Rall 1969; Jack, Noble &
  // Tsien 1975, ch. 3), lambda = 1 mm, L = 0.5 mm.
  auto c = testing::compile(
      "temperature 20 degC\nchannel Leak { reversal -65 mV }\n"
      "cable c {\n  length 500 um\n  diameter 2 um\n  axial resistivity 100 ohm*cm\n"
      "  pieces 100\n  capacitance 1 uF/cm2\n  initial V = -65 mV\n"
      "  membrane { Leak 0.05 mS/cm2 }\n}\n"
      "protocol hold {\n  method backward_euler step 0.1 ms\n  duration 400 ms\n"
      "  inject c at 0 % 1 uA/cm2 from 0 ms to 1000 ms\n  record c.V at 0 %, c.V at 100 % every 400 ms\n}\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  const ir::Model &m = c->lowered.begin()->second;
  REQUIRE(m.compartments.size() == 100);
  REQUIRE(m.junctions.size() == 99);
  Trace t = runModel(m, m.params, KernelCompiler()).trace;
  REQUIRE(t.names == std::vector<std::string>{"c[0].V", "c[99].V"});
  double d = 2e-6, length = 500e-6, ri = 1.0, rm = 2.0, piece = length / 100;
  double lambda = std::sqrt(rm * d / (4 * ri)), ra = 4 * ri / (M_PI * d * d);
  auto closedForm = [&](double x) {
    return ra * lambda * std::cosh((length - x) / lambda) / std::sinh(length / lambda);
  };
  double injected = 1e-2 * M_PI * d * piece; // A
  double v0 = (t.values[t.values.size() - 2] + 65) * 1e-3, vEnd = (t.values.back() + 65) * 1e-3;
  CHECK_THAT(v0 / injected, Catch::Matchers::WithinRel(closedForm(0.5 * piece), 5e-6));
  CHECK_THAT(vEnd / injected, Catch::Matchers::WithinRel(closedForm(length - 0.5 * piece), 5e-6));
}

TEST_CASE("path distance along a tree: piece centre to centre, through the piece a branch grows from", "[tree]") {
  auto c = testing::compile("temperature 20 degC\nchannel Leak { reversal -65 mV }\n"
                            "compartment soma {\n  sphere diameter 20 um\n  capacitance 1 uF/cm2\n"
                            "  initial V = -65 mV\n  membrane { Leak 0.05 mS/cm2 }\n}\n"
                            "cable dend { grows from soma length 500 um diameter 2 um axial resistivity 100 ohm*cm "
                            "pieces 50 }\n"
                            "cable branch { grows from dend at 250 um length 100 um diameter 1 um axial resistivity "
                            "100 ohm*cm pieces 10 }\n");
  INFO(testing::allDiagnostics(*c));
  REQUIRE(c->checked);
  auto index = [&](const char *probe) { return compartmentIndex(c->model, probe).value(); };
  auto um = [&](const char *a, const char *b) { return pathDistance(c->model, index(a), index(b)).value() * 1e6; };
  // dend[44] down to dend[25] (19 junctions of 10 um), across to branch[0] (5 + 5 um), out to branch[9].
  CHECK_THAT(um("dend[44].V", "branch[9].V"), Catch::Matchers::WithinAbs(190 + 10 + 90, 1e-9));
  CHECK_THAT(um("branch[9].V", "dend[44].V"), Catch::Matchers::WithinAbs(290, 1e-9));
  CHECK_THAT(um("soma.V", "dend[0].V"), Catch::Matchers::WithinAbs(5, 1e-9)); // a compartment counts nothing
  CHECK(um("dend[3].V", "dend[3].V") == 0);
}
