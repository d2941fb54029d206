// AST.h - the syntax tree of a saltpan spec, built by parse/ and annotated by later stages.
//
// Plain structs with public fields; children are owned through unique_ptr. Fields that a
// later stage fills in say which stage sets them.
#pragma once
#include "Source.h"
#include "Units.h"

#include <memory>
#include <string>
#include <vector>

namespace saltpan::ast {

struct Decl;
struct IonDecl;
struct FnDecl;
struct SolutionDecl;

// ---- Expressions -------------------------------------------------------------------

enum class ExprKind {
#define EXPR(Name) Name,
#include "AST.def"
};

/// What CheckUnits learns about an expression.
struct ExprType {
  Dimension dim;
  bool known = false;        // false after an error: never triggers another diagnostic
  bool celsiusLiteral = false; // a bare "37 degC" literal: an absolute temperature
};

struct Expr {
  explicit Expr(ExprKind k, SourceRange r) : kind(k), range(r) {}
  virtual ~Expr() = default;
  ExprKind kind;
  SourceRange range;
  ExprType type; // set by CheckUnits
};
using ExprPtr = std::unique_ptr<Expr>;

/// A number with an optional unit, already converted to coherent SI.
struct NumberExpr : Expr {
  NumberExpr(SourceRange r) : Expr(ExprKind::Number, r) {}
  double written = 0;   // the number as written
  std::string spelling; // its digits as written, without a sign ("0.07", "2e-6"); empty if unknown
  double value = 0;     // in coherent SI (kelvin for degC)
  Unit unit;            // the written unit (scale 1, dimensionless when absent)
  bool celsius = false; // written in degC / °C
  bool unitValid = true;
  std::string unitText; // as written, for messages and dumps
  SourceRange unitRange;
  static bool classof(const Expr *e) { return e->kind == ExprKind::Number; }
};

/// Names the model provides in kinetics: the membrane potential and the temperature.
enum class Builtin { None, MembranePotential, Temperature };

struct NameExpr : Expr {
  NameExpr(SourceRange r) : Expr(ExprKind::Name, r) {}
  std::string name;
  const Decl *target = nullptr;    // set by Resolve (a const or ion)
  int paramIndex = -1;             // set by Resolve when it names a function parameter
  Builtin builtin = Builtin::None; // set by Resolve
  static bool classof(const Expr *e) { return e->kind == ExprKind::Name; }
};

enum class Side { Inside, Outside };

/// [X]in or [X]out.
struct ConcentrationExpr : Expr {
  ConcentrationExpr(SourceRange r) : Expr(ExprKind::Concentration, r) {}
  std::string ion;
  SourceRange ionRange;
  Side side = Side::Inside;
  const IonDecl *target = nullptr; // set by Resolve
  static bool classof(const Expr *e) { return e->kind == ExprKind::Concentration; }
};

/// Math functions the compiler provides; everything else lives in stdlib/ in saltpan.
enum class MathFn { None, Exp, Expm1, Log, Log10, Sqrt, Pow, Abs, Min, Max, Tanh, Reversal };

struct CallExpr : Expr {
  CallExpr(SourceRange r) : Expr(ExprKind::Call, r) {}
  std::string callee;
  SourceRange calleeRange;
  std::vector<ExprPtr> args;
  const FnDecl *target = nullptr; // set by Resolve for user and stdlib functions
  MathFn math = MathFn::None;     // set by Resolve for built-in math
  const IonDecl *reversalIon = nullptr; // set by Resolve for E(X)
  static bool classof(const Expr *e) { return e->kind == ExprKind::Call; }
};

enum class UnaryOp { Negate, Plus, Not };

struct UnaryExpr : Expr {
  UnaryExpr(SourceRange r) : Expr(ExprKind::Unary, r) {}
  UnaryOp op = UnaryOp::Negate;
  ExprPtr operand;
  static bool classof(const Expr *e) { return e->kind == ExprKind::Unary; }
};

enum class BinaryOp { Add, Sub, Mul, Div, Pow, Eq, Ne, Lt, Le, Gt, Ge, And, Or };
const char *spelling(BinaryOp op);

struct BinaryExpr : Expr {
  BinaryExpr(SourceRange r) : Expr(ExprKind::Binary, r) {}
  BinaryOp op = BinaryOp::Add;
  SourceRange opRange;
  ExprPtr lhs, rhs;
  static bool classof(const Expr *e) { return e->kind == ExprKind::Binary; }
};

struct IfExpr : Expr {
  IfExpr(SourceRange r) : Expr(ExprKind::If, r) {}
  ExprPtr cond, thenExpr, elseExpr;
  static bool classof(const Expr *e) { return e->kind == ExprKind::If; }
};

// ---- Declarations ------------------------------------------------------------------

enum class DeclKind {
#define DECL(Name) Name,
#include "AST.def"
};
const char *describe(DeclKind k); // "ion", "channel", ...

struct Decl {
  Decl(DeclKind k, SourceRange r) : kind(k), range(r) {}
  virtual ~Decl() = default;
  DeclKind kind;
  SourceRange range;
  std::string name;
  SourceRange nameRange;
  std::string doc; // from "##" lines just above the declaration
};
using DeclPtr = std::unique_ptr<Decl>;

/// A unit written as a type: "mV", "1/ms", "1".
struct UnitAnnotation {
  Unit unit;
  bool valid = false;
  std::string text;
  SourceRange range;
};

struct ModelDecl : Decl {
  ModelDecl(SourceRange r) : Decl(DeclKind::Model, r) {}
  std::string title;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Model; }
};

struct UseDecl : Decl {
  UseDecl(SourceRange r) : Decl(DeclKind::Use, r) {}
  std::string target; // "std.ions" or a relative path
  bool isPath = false;
  SourceRange targetRange;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Use; }
};

struct TemperatureDecl : Decl {
  TemperatureDecl(SourceRange r) : Decl(DeclKind::Temperature, r) {}
  ExprPtr value;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Temperature; }
};

struct SignedNumber {
  double value = 0;
  SourceRange range;
};

struct IonDecl : Decl {
  IonDecl(SourceRange r) : Decl(DeclKind::Ion, r) {}
  SignedNumber valence;
  int charge = 0; // set by CheckCharge once the valence is known to be a non-zero integer
  static bool classof(const Decl *d) { return d->kind == DeclKind::Ion; }
};

struct ConstDecl : Decl {
  ConstDecl(SourceRange r) : Decl(DeclKind::Const, r) {}
  bool annotated = false;
  UnitAnnotation declared;
  ExprPtr value;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Const; }
};

struct Param {
  std::string name;
  SourceRange range;
  UnitAnnotation unit;
};

struct FnDecl : Decl {
  FnDecl(SourceRange r) : Decl(DeclKind::Fn, r) {}
  std::vector<Param> params;
  UnitAnnotation result;
  ExprPtr body;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Fn; }
};

struct ConcentrationEntry {
  std::string ion;
  SourceRange ionRange;
  SourceRange range;
  ExprPtr value;
  bool dynamic = false;      // changed by the currents of the ion during a run
  SourceRange dynamicRange;
  ExprPtr shellDepth;        // the pool is a shell under the membrane of this depth
  const IonDecl *target = nullptr; // set by Resolve
};

struct ImpermeantEntry {
  SourceRange range;
  ExprPtr amount;
  SignedNumber valence;
};

struct SolutionBody {
  SourceRange range;
  std::vector<ConcentrationEntry> entries;
  std::vector<ImpermeantEntry> impermeants;
};

/// outside NAME { ... }: a bath that compartments face.
struct SolutionDecl : Decl {
  SolutionDecl(SourceRange r) : Decl(DeclKind::Solution, r) {}
  SolutionBody body;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Solution; }
};

enum class Shape { None, Sphere, Cylinder, Area };

struct Geometry {
  Shape shape = Shape::None;
  SourceRange range;
  ExprPtr diameter, length, area;
};

struct MembraneEntry {
  std::string name; // the channel or pump placed here
  SourceRange nameRange;
  SourceRange range;
  ExprPtr density;
  ExprPtr reversal;            // optional override of the channel's reversal
  const Decl *target = nullptr; // set by Resolve: a channel or pump
};

struct CompartmentDecl;

/// A place along a cable: `at 350 um` (a distance from its start) or `at 50 %` (of its length,
/// held as the fraction 0.5, unitText "%"). Unset: the whole of a compartment, or a cable's first piece.
struct Position {
  ExprPtr at;
  SourceRange range;
  explicit operator bool() const { return at != nullptr; }
};

/// What makes a compartment a cable: an unbranched cylinder (or cone) cut into pieces, joined
/// to what it grows from. Whatever the cable leaves out (capacitance, initial potential,
/// solutions, membrane) it takes from its parent.
struct CableShape {
  SourceRange range;  // the `cable` keyword
  std::string parent; // grows from
  SourceRange parentRange, growsRange;
  bool atEnd = false;                          // grows from the parent cable's end
  Position at;                                 // or from a place along it
  const CompartmentDecl *parentDecl = nullptr; // set by Resolve
  ExprPtr length, diameter, diameterEnd;       // diameterEnd: a taper's far end
  ExprPtr axialResistivity;                    // ohm m
  SourceRange lengthRange, diameterRange, axialRange;
  long pieces = 0; // `pieces N`; 0 when not given, -1 when refused
  SourceRange piecesRange;
  // `pieces N per length constant at F`: `pieces` holds N, and each piece is at most 1/N of
  // the length constant at frequency F (AC); pieces then counts per length constant.
  ExprPtr perLengthConstantAt;
  ExprPtr pieceLength; // or `piece length L`
};

struct CompartmentDecl : Decl {
  CompartmentDecl(SourceRange r) : Decl(DeclKind::Compartment, r) {}
  std::unique_ptr<CableShape> cable; // set for `cable NAME { ... }`
  Geometry geometry;
  ExprPtr capacitance;
  ExprPtr initialV;
  bool hasInside = false;
  SolutionBody inside;
  std::string bathName;
  SourceRange bathRange;
  const SolutionDecl *bath = nullptr; // set by Resolve
  std::vector<MembraneEntry> membrane;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Compartment; }
};

struct CarriedIon {
  std::string ion;
  SourceRange range;
  bool hasRatio = false;
  SignedNumber ratio; // relative permeability
  const IonDecl *target = nullptr; // set by Resolve
};

enum class GateRate { Opening, Closing, Steady, Tau };
const char *spelling(GateRate r);

struct Gate {
  std::string name;
  SourceRange nameRange;
  SourceRange range;
  bool hasPower = false;
  SignedNumber power; // defaults to 1
  ExprPtr opening, closing, steady, tau;
};

struct ChannelDecl : Decl {
  ChannelDecl(SourceRange r) : Decl(DeclKind::Channel, r) {}
  std::vector<CarriedIon> carries;
  SourceRange carriesRange;
  ExprPtr reversal;
  std::vector<Gate> gates;
  ExprPtr q10, q10Reference;
  SourceRange q10Range;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Channel; }
};

enum class Direction { In, Out };

struct StoichTerm {
  SignedNumber count;
  std::string ion;
  SourceRange ionRange;
  SourceRange range;
  Direction direction = Direction::Out;
  const IonDecl *target = nullptr; // set by Resolve
};

/// pump or exchanger: moves ions by a fixed cycle at a rate set by its activity law.
struct PumpDecl : Decl {
  PumpDecl(SourceRange r) : Decl(DeclKind::Pump, r) {}
  bool exchanger = false;
  std::vector<StoichTerm> cycle;
  SourceRange cycleRange;
  ExprPtr activity;
  int netOutwardCharge = 0; // set by CheckCharge: elementary charges moved out per cycle
  static bool classof(const Decl *d) { return d->kind == DeclKind::Pump; }
};

enum class InjectionShape { Step, Ramp, Pulses };

/// inject COMPARTMENT ...: a current clamp (current density or absolute current).
struct Injection {
  InjectionShape shape = InjectionShape::Step;
  std::string compartment;
  SourceRange compartmentRange;
  Position position;
  SourceRange range;
  ExprPtr amplitude, amplitudeEnd; // amplitudeEnd: a ramp's final value
  ExprPtr width, period;           // pulses
  ExprPtr from, to;
  const CompartmentDecl *target = nullptr; // set by Resolve
};

/// record a.b.c: a quantity to record, checked when the protocol is lowered.
struct RecordTarget {
  std::string path;
  SourceRange range;
  Position position;                            // along a cable
  const CompartmentDecl *compartment = nullptr; // set by Resolve: what the path starts with, if declared
};

/// clamp COMPARTMENT at LEVEL [from T1 to T2] (or clamp CABLE at PLACE to LEVEL ...): a voltage
/// clamp; without a window it holds for the whole run, with one it sets the level inside the window.
struct Clamp {
  std::string compartment;
  SourceRange compartmentRange;
  Position position; // along a cable; its first piece without one
  SourceRange range;
  ExprPtr level, from, to;
  const CompartmentDecl *target = nullptr; // set by Resolve
};

enum class SynapseShape { SingleExponential, DoubleExponential, Alpha };

/// synapse COMPARTMENT GMAX reversal E <shape> <times>: a conductance input whose time
/// course (peak 1) starts at each event time.
struct Synapse {
  std::string compartment;
  SourceRange compartmentRange;
  Position position;
  SourceRange range;
  ExprPtr conductance, reversal;
  SynapseShape shape = SynapseShape::SingleExponential;
  ExprPtr rise, decay, peak;
  std::vector<ExprPtr> times;  // listed event times
  ExprPtr every, from, to;     // or a regular train
  const CompartmentDecl *target = nullptr; // set by Resolve
};

/// The integration method a protocol names; Default when it names none, Unknown for a name
/// that is no method (CheckProtocol reports it).
enum class IntegrationMethod {
  Default,
  ExponentialEuler,
  RungeKutta4,
  DormandPrince,
  Rosenbrock,
  BackwardEuler,
  CrankNicolson,
  Unknown
};
/// The method a name in a protocol means (Unknown for any other name); defined with the builder.
IntegrationMethod integrationMethodNamed(const std::string &name);
/// "exponential_euler, rk4, ... and crank_nicolson": every name integrationMethodNamed knows.
std::string integrationMethodNames();

/// protocol NAME { ... }: how to simulate the model and what to record.
struct ProtocolDecl : Decl {
  ProtocolDecl(SourceRange r) : Decl(DeclKind::Protocol, r) {}
  IntegrationMethod method = IntegrationMethod::Default; // set by the AST builder
  std::string methodText;                                // as written, for messages and dumps
  SourceRange methodRange;
  ExprPtr step, tolerance, duration, every;
  std::vector<Injection> injections;
  std::vector<Clamp> clamps;
  std::vector<Synapse> synapses;
  std::vector<RecordTarget> records;
  static bool classof(const Decl *d) { return d->kind == DeclKind::Protocol; }
};

// Measured: a sweep's measure, recorded but not judged.
enum class CheckKind { Equal, Range, Less, LessEqual, Greater, GreaterEqual, Measured };

/// An argument of a measure: a dotted name (soma.V, K, soma) or a value (0 mV).
struct ExpectArg {
  std::string path; // empty when the argument is a value or a string
  Position position; // a recorded quantity along a cable: `dend.V at 450 um`
  ExprPtr value;
  std::string text; // a string argument (a snapshot file)
  bool isString = false;
  SourceRange range;
  const Decl *target = nullptr; // set by Resolve when `path` is one name that is declared
};

/// expect [PROTOCOL:] MEASURE(ARGS) CHECK [source "..."]: a value the model must reproduce.
struct ExpectDecl : Decl {
  ExpectDecl(SourceRange r) : Decl(DeclKind::Expect, r) {}
  std::string protocol; // empty for measures of the model itself
  SourceRange protocolRange;
  std::string measure;
  SourceRange measureRange;
  std::vector<ExpectArg> args;
  CheckKind check = CheckKind::Equal;
  ExprPtr value, tolerance, high; // Equal: value within tolerance; Range: value to high
  bool relative = false;
  std::string source;
  std::string text; // the expectation as written, for reports
  const ProtocolDecl *target = nullptr; // set by Resolve
  static bool classof(const Decl *d) { return d->kind == DeclKind::Expect; }
};

/// One swept parameter: a range (with a point count for grids) or a list of values.
struct SweepAxis {
  std::string parameter; // a lowered parameter name: axon.SquidSodium1952.density
  SourceRange range;      // the whole `vary` item
  SourceRange parameterRange;
  ExprPtr from, to;        // a range
  double points = 0;       // grid points along the range; 0 when not given
  SourceRange pointsRange;
  bool logarithmic = false;
  std::vector<ExprPtr> values; // a list
};

enum class SampleDesign { Grid, LatinHypercube, Uniform };

/// sweep NAME { vary ...; sample ...; measure ... }: many runs of the model, one per point.
struct SweepDecl : Decl {
  SweepDecl(SourceRange r) : Decl(DeclKind::Sweep, r) {}
  std::vector<SweepAxis> axes;
  SampleDesign design = SampleDesign::Grid;
  double samples = 0, seed = 0; // latin_hypercube / uniform
  SourceRange sampleRange;
  std::vector<std::unique_ptr<ExpectDecl>> measures; // check == CheckKind::Measured
  static bool classof(const Decl *d) { return d->kind == DeclKind::Sweep; }
};

/// One parsed file.
struct Module {
  const SourceFile *file = nullptr;
  std::string name; // "std.ions" or the path as given
  std::vector<DeclPtr> decls;
};

/// The root spec and everything it uses, each file once, dependencies first.
struct Program {
  std::vector<std::unique_ptr<Module>> modules;
  Module *root = nullptr;
};

template <typename T, typename U> bool isa(const U *p) { return p && T::classof(p); }
template <typename T, typename U> T *dyn_cast(U *p) {
  return isa<T>(p) ? static_cast<T *>(p) : nullptr;
}
template <typename T, typename U> const T *dyn_cast(const U *p) {
  return isa<T>(p) ? static_cast<const T *>(p) : nullptr;
}

/// Stable, diff-friendly dump of a module (saltpan check --emit ast).
std::string dump(const Module &m, bool resolved = false);
/// Every module with what Resolve bound each name to and each expression's dimension.
std::string dumpResolved(const Program &program);

} // namespace saltpan::ast
