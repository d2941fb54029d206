// IR.h - the mid-level IR of a checked model, produced by Lower and consumed by the
// interpreter, the steppers and CodeGen.
//
// A model is a state vector, a parameter vector and one straight-line kernel that, from
// (y, p, t), computes every quantity a stepper needs: each gate's steady value and time
// constant, and each compartment's linearised membrane current. Everything is coherent SI
// (V, s, S/m^2, A/m^2, F/m^2). Nothing here knows about syntax; nodes keep a SourceLoc.
#pragma once
#include "Source.h"
#include "Units.h"

#include <cstdint>
#include <string>
#include <unordered_map>
#include <vector>

namespace saltpan::ir {

enum class Op : uint8_t {
#define IR_OP(Name, Arity) Name,
#include "IR.def"
};
const char *opName(Op op);
int arity(Op op);

using NodeId = int32_t;

struct Node {
  Op op = Op::Const;
  double constant = 0; // Const
  int32_t index = -1;  // State / Param
  NodeId a = -1, b = -1, c = -1;
  SourceLoc loc;
};

/// A straight-line program in dependency order (every operand precedes its user).
/// Identical nodes are shared (hash-consing), so common subexpressions are computed once.
class Kernel {
public:
  NodeId constant(double v);
  NodeId state(int index);
  NodeId param(int index);
  NodeId time();
  NodeId unary(Op op, NodeId a, SourceLoc loc = {});
  NodeId binary(Op op, NodeId a, NodeId b, SourceLoc loc = {});
  NodeId select(NodeId cond, NodeId then, NodeId otherwise, SourceLoc loc = {});

  const std::vector<Node> &nodes() const { return nodes_; }
  /// Output slot -> node; the kernel writes out[i] = value of outputs[i].
  std::vector<NodeId> outputs;
  int addOutput(NodeId n) {
    outputs.push_back(n);
    return static_cast<int>(outputs.size()) - 1;
  }

private:
  NodeId add(Node n);
  void grow(); // doubles the table of shared nodes
  std::vector<Node> nodes_;
  // Open addressing over nodes_ (IR.cpp says what a slot holds). Two nodes are the same when
  // everything but their location is equal (equal keys compute equal values). A flat table
  // rather than a map of keys: a 10,000-piece tree lowers millions of nodes, and copies
  // of a kernel stay one memcpy.
  std::vector<uint64_t> table_;
};

/// A gate's state variable: x' = (inf - x) / tau.
struct Gate {
  std::string name; // "soma.NaSpike.m"
  int state = -1;
  int infOutput = -1; // dimensionless
  int tauOutput = -1; // seconds
};

struct Compartment {
  std::string name;
  int voltageState = -1;
  int capacitanceParam = -1; // F/m^2
  double area = 0;           // m^2; 0 when the model is per unit area
  // The membrane current density (A/m^2, outward positive) is linear in V with the gates
  // frozen: I = G V - GE + Iother, where Iother holds pumps, GHK currents and stimuli.
  int gOutput = -1;      // S/m^2
  int geOutput = -1;     // A/m^2
  int iOtherOutput = -1; // A/m^2
  // Voltage clamp: while clampedOutput is non-zero, V is held at commandOutput (volts).
  int clampedOutput = -1; // -1: never clamped
  int commandOutput = -1;
  int injectedOutput = -1; // A/m^2 into the cell, for the charge balance
  bool allCurrentCarried = false; // every membrane current is carried by a dynamic ion (own membrane)
};

/// Two compartments joined by an axial conductance: the pieces of a cable, or a cable and the
/// compartment it grows from. A current conductance * (V_child - V_parent) flows into the parent.
struct Junction {
  int parent = -1, child = -1; // compartment indices; following parents from any compartment ends at a root
  double conductance = 0;      // S
};

/// A dynamic inside concentration: d[X]/dt = -I_X * (area/volume) / (z F).
struct Pool {
  std::string name; // "soma.Ca"
  int compartment = -1;
  int state = -1;           // mol/m^3
  int derivativeOutput = -1; // mol/m^3/s
  int valence = 0;
  double areaPerVolume = 0; // 1/m
};

/// A quantity that can be recorded: a state or a kernel output.
struct Probe {
  std::string name; // "soma.V", "soma.KLeak.current", "soma.NaSpike.m"
  std::string unit; // display unit, e.g. "mV", "uA/cm2"
  double scale = 1; // SI value * scale = value in the display unit
  int state = -1;   // one of state / output is set
  int output = -1;
  bool entryCurrent = false; // the current of one channel or pump (not a per-ion sum)
};

enum class Method { ExponentialEuler, RungeKutta4, DormandPrince, Rosenbrock, BackwardEuler, CrankNicolson };
const char *methodName(Method m);

/// A protocol after lowering: how long, with which method, what to record.
struct Protocol {
  std::string name;
  Method method = Method::ExponentialEuler;
  double step = 10e-6;     // s (the initial step for adaptive methods)
  double duration = 0.1;   // s
  double every = 1e-4;     // s between recorded samples
  double rtol = 1e-8, atol = 1e-10; // adaptive methods
  std::vector<int> record; // indices into Model::probes
};

struct Model {
  std::string name;
  double temperature = 0; // K
  std::vector<std::string> stateNames;
  std::vector<double> initialState;
  std::vector<std::string> paramNames;
  std::vector<double> params;
  std::vector<Dimension> paramDims; // what `--set` must give for each parameter
  std::vector<Compartment> compartments;
  std::vector<Junction> junctions; // empty: every compartment is its own isolated patch
  std::vector<Gate> gates;
  std::vector<Pool> pools;
  std::vector<Probe> probes;
  Protocol protocol; // the one this model was lowered for (stimuli live in the kernel)
  Kernel kernel;

  int findParam(const std::string &name) const;
  int findProbe(const std::string &name) const;
};

/// Text form of the IR (`saltpan check --emit ir`), stable enough to diff.
std::string dump(const Model &m);
/// A kernel's nodes and outputs alone, in the form dump() ends with.
std::string dumpKernel(const Kernel &kernel);

} // namespace saltpan::ir
