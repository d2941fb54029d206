// ModelFile.cpp - ir::Model <-> JSON (nlohmann), and kernel fingerprints.
#include "ModelFile.h"

#include <cmath>
#include <cstring>
#include <nlohmann/json.hpp>

namespace saltpan {

using nlohmann::json;

namespace {

constexpr const char *formatName = "saltpan-model-bundle 2";

// JSON has no infinities or NaN; a folded constant may be one, so those go as strings.
json number(double v) {
  if (std::isfinite(v))
    return v;
  return std::isnan(v) ? "nan" : v > 0 ? "inf" : "-inf";
}

double readNumber(const json &j) {
  if (j.is_string()) {
    const std::string &s = j.get_ref<const std::string &>();
    if (s == "nan")
      return NAN;
    if (s == "inf")
      return INFINITY;
    if (s == "-inf")
      return -INFINITY;
    throw std::runtime_error("'" + s + "' is not a number");
  }
  return j.get<double>();
}

json numbers(const std::vector<double> &values) {
  json out = json::array();
  for (double v : values)
    out.push_back(number(v));
  return out;
}

std::vector<double> readNumbers(const json &j) {
  std::vector<double> out;
  for (const json &v : j)
    out.push_back(readNumber(v));
  return out;
}

json dimension(const Dimension &d) {
  json out = json::array();
  for (int b = 0; b < Dimension::BaseCount; ++b)
    out.push_back(d[static_cast<Dimension::Base>(b)]);
  return out;
}

Dimension readDimension(const json &j) {
  if (!j.is_array() || j.size() != Dimension::BaseCount)
    throw std::runtime_error("a dimension needs " + std::to_string(Dimension::BaseCount) + " exponents");
  Dimension d;
  for (int b = 0; b < Dimension::BaseCount; ++b)
    d = d * Dimension::base(static_cast<Dimension::Base>(b), j[b].get<int>());
  return d;
}

ir::Op readOp(const std::string &name) {
#define IR_OP(Name, Arity)                                                                                             \
  if (name == #Name)                                                                                                   \
    return ir::Op::Name;
#include "IR.def"
  throw std::runtime_error("unknown kernel operation '" + name + "'");
}

ir::Method readMethod(const std::string &name) {
  for (ir::Method m : {ir::Method::ExponentialEuler, ir::Method::RungeKutta4, ir::Method::DormandPrince,
                       ir::Method::Rosenbrock, ir::Method::BackwardEuler, ir::Method::CrankNicolson})
    if (name == ir::methodName(m))
      return m;
  throw std::runtime_error("unknown method '" + name + "'");
}

json kernel(const ir::Kernel &k) {
  json nodes = json::array();
  for (const ir::Node &n : k.nodes())
    nodes.push_back({ir::opName(n.op), number(n.constant), n.index, n.a, n.b, n.c});
  return {{"nodes", nodes}, {"outputs", k.outputs}};
}

// Rebuilt through the Kernel's own builder, so its sharing table is whole again. A bundle
// holds kernels that builder made, which are already folded and shared: rebuilding them must
// give every node back at its own index, and anything else means the file is damaged.
ir::Kernel readKernel(const json &j) {
  ir::Kernel k;
  const json &nodes = j.at("nodes");
  for (size_t i = 0; i < nodes.size(); ++i) {
    const json &n = nodes[i];
    ir::Op op = readOp(n.at(0).get<std::string>());
    int index = n.at(2).get<int>();
    ir::NodeId operands[3] = {n.at(3).get<ir::NodeId>(), n.at(4).get<ir::NodeId>(), n.at(5).get<ir::NodeId>()};
    for (int o = 0; o < ir::arity(op); ++o)
      if (operands[o] < 0 || static_cast<size_t>(operands[o]) >= i)
        throw std::runtime_error("kernel node " + std::to_string(i) + " uses a later node");
    ir::NodeId got;
    switch (op) {
    case ir::Op::Const: got = k.constant(readNumber(n.at(1))); break;
    case ir::Op::State: got = k.state(index); break;
    case ir::Op::Param: got = k.param(index); break;
    case ir::Op::Time: got = k.time(); break;
    case ir::Op::Select: got = k.select(operands[0], operands[1], operands[2]); break;
    default: got = ir::arity(op) == 1 ? k.unary(op, operands[0]) : k.binary(op, operands[0], operands[1]);
    }
    if (got != static_cast<ir::NodeId>(i))
      throw std::runtime_error("kernel node " + std::to_string(i) + " does not rebuild in place");
  }
  for (ir::NodeId o : j.at("outputs")) {
    if (o < 0 || static_cast<size_t>(o) >= nodes.size())
      throw std::runtime_error("a kernel output names no node");
    k.addOutput(o);
  }
  return k;
}

json model(const ir::Model &m) {
  json compartments = json::array(), gates = json::array(), pools = json::array(), probes = json::array(),
       dims = json::array();
  for (const ir::Compartment &c : m.compartments)
    compartments.push_back({{"name", c.name},
                            {"voltage_state", c.voltageState},
                            {"capacitance_param", c.capacitanceParam},
                            {"area", number(c.area)},
                            {"g_output", c.gOutput},
                            {"ge_output", c.geOutput},
                            {"i_other_output", c.iOtherOutput},
                            {"clamped_output", c.clampedOutput},
                            {"command_output", c.commandOutput},
                            {"injected_output", c.injectedOutput},
                            {"all_current_carried", c.allCurrentCarried}});
  for (const ir::Gate &g : m.gates)
    gates.push_back({{"name", g.name}, {"state", g.state}, {"inf_output", g.infOutput}, {"tau_output", g.tauOutput}});
  for (const ir::Pool &p : m.pools)
    pools.push_back({{"name", p.name},
                     {"compartment", p.compartment},
                     {"state", p.state},
                     {"derivative_output", p.derivativeOutput},
                     {"valence", p.valence},
                     {"area_per_volume", number(p.areaPerVolume)}});
  for (const ir::Probe &r : m.probes)
    probes.push_back({{"name", r.name},
                           {"unit", r.unit},
                           {"scale", number(r.scale)},
                           {"state", r.state},
                           {"output", r.output},
                           {"entry_current", r.entryCurrent}});
  for (const Dimension &d : m.paramDims)
    dims.push_back(dimension(d));
  const ir::Protocol &p = m.protocol;
  json protocol = {{"name", p.name},           {"method", ir::methodName(p.method)},
                   {"step", number(p.step)},   {"duration", number(p.duration)},
                   {"every", number(p.every)}, {"rtol", number(p.rtol)},
                   {"atol", number(p.atol)},   {"record", p.record}};
  json out = {{"name", m.name},
              {"temperature", number(m.temperature)},
              {"state_names", m.stateNames},
              {"initial_state", numbers(m.initialState)},
              {"param_names", m.paramNames},
              {"params", numbers(m.params)},
              {"param_dims", dims},
              {"compartments", compartments},
              {"gates", gates},
              {"pools", pools},
              {"probes", probes},
              {"protocol", protocol},
              {"kernel", kernel(m.kernel)}};
  if (!m.junctions.empty()) { // absent for isolated compartments: their bundles read as before
    json junctions = json::array();
    for (const ir::Junction &jn : m.junctions)
      junctions.push_back({{"parent", jn.parent}, {"child", jn.child}, {"conductance", number(jn.conductance)}});
    out["junctions"] = junctions;
  }
  return out;
}

ir::Model readModel(const json &j) {
  ir::Model m;
  m.name = j.at("name").get<std::string>();
  m.temperature = readNumber(j.at("temperature"));
  m.stateNames = j.at("state_names").get<std::vector<std::string>>();
  m.initialState = readNumbers(j.at("initial_state"));
  m.paramNames = j.at("param_names").get<std::vector<std::string>>();
  m.params = readNumbers(j.at("params"));
  for (const json &d : j.at("param_dims"))
    m.paramDims.push_back(readDimension(d));
  for (const json &c : j.at("compartments"))
    m.compartments.push_back(
        {c.at("name").get<std::string>(), c.at("voltage_state").get<int>(), c.at("capacitance_param").get<int>(),
         readNumber(c.at("area")), c.at("g_output").get<int>(), c.at("ge_output").get<int>(),
         c.at("i_other_output").get<int>(), c.at("clamped_output").get<int>(), c.at("command_output").get<int>(),
         c.at("injected_output").get<int>(), c.at("all_current_carried").get<bool>()});
  if (j.contains("junctions"))
    for (const json &jn : j.at("junctions"))
      m.junctions.push_back({jn.at("parent").get<int>(), jn.at("child").get<int>(), readNumber(jn.at("conductance"))});
  for (const json &g : j.at("gates"))
    m.gates.push_back({g.at("name").get<std::string>(), g.at("state").get<int>(), g.at("inf_output").get<int>(),
                       g.at("tau_output").get<int>()});
  for (const json &p : j.at("pools"))
    m.pools.push_back({p.at("name").get<std::string>(), p.at("compartment").get<int>(), p.at("state").get<int>(),
                       p.at("derivative_output").get<int>(), p.at("valence").get<int>(),
                       readNumber(p.at("area_per_volume"))});
  for (const json &r : j.at("probes"))
    m.probes.push_back({r.at("name").get<std::string>(), r.at("unit").get<std::string>(),
                             readNumber(r.at("scale")), r.at("state").get<int>(), r.at("output").get<int>(),
                             r.at("entry_current").get<bool>()});
  const json &p = j.at("protocol");
  m.protocol.name = p.at("name").get<std::string>();
  m.protocol.method = readMethod(p.at("method").get<std::string>());
  m.protocol.step = readNumber(p.at("step"));
  m.protocol.duration = readNumber(p.at("duration"));
  m.protocol.every = readNumber(p.at("every"));
  m.protocol.rtol = readNumber(p.at("rtol"));
  m.protocol.atol = readNumber(p.at("atol"));
  m.protocol.record = p.at("record").get<std::vector<int>>();
  m.kernel = readKernel(j.at("kernel"));
  return m;
}

json column(const sweep::Column &c) { return {{"name", c.name}, {"unit", c.unit}, {"scale", number(c.scale)}}; }

sweep::Column readColumn(const json &j) {
  return {j.at("name").get<std::string>(), j.at("unit").get<std::string>(), readNumber(j.at("scale"))};
}

json sweepJson(const BundledSweep &s) {
  json parameters = json::array(), points = json::array(), measures = json::array(), protocols = json::array();
  for (const sweep::Column &c : s.parameters)
    parameters.push_back(column(c));
  for (const std::vector<double> &p : s.points)
    points.push_back(numbers(p));
  for (const BundledSweep::Measure &m : s.measures)
    measures.push_back({{"column", column(m.column)},
                        {"protocol", m.protocol},
                        {"measure", m.measure},
                        {"recorded", m.recorded},
                        {"argument", number(m.argument)}});
  for (const BundledSweep::Protocol &p : s.protocols)
    protocols.push_back({{"protocol", p.protocol}, {"parameters", p.parameters}});
  return {{"name", s.name},   {"design", s.design},   {"parameters", parameters},
          {"points", points}, {"measures", measures}, {"protocols", protocols}};
}

// Indices are checked against the bundle's protocols, as checkIndices does for a model.
BundledSweep readSweep(const json &j, const std::vector<ir::Model> &models) {
  BundledSweep s;
  s.name = j.at("name").get<std::string>();
  s.design = j.at("design").get<std::string>();
  for (const json &c : j.at("parameters"))
    s.parameters.push_back(readColumn(c));
  auto protocolIndex = [&](const json &p) {
    int i = p.get<int>();
    if (i < 0 || static_cast<size_t>(i) >= models.size())
      throw std::runtime_error("sweep '" + s.name + "' names protocol " + std::to_string(i) + ", out of range");
    return i;
  };
  for (const json &p : j.at("points")) {
    s.points.push_back(readNumbers(p));
    if (s.points.back().size() != s.parameters.size())
      throw std::runtime_error("a point of sweep '" + s.name + "' has the wrong number of values");
  }
  for (const json &m : j.at("measures")) {
    BundledSweep::Measure x{readColumn(m.at("column")), protocolIndex(m.at("protocol")),
                            m.at("measure").get<std::string>(), m.at("recorded").get<std::string>(),
                            readNumber(m.at("argument"))};
    if (models[static_cast<size_t>(x.protocol)].findProbe(x.recorded) < 0)
      throw std::runtime_error("sweep '" + s.name + "' reads '" + x.recorded + "', which is not a probe");
    s.measures.push_back(std::move(x));
  }
  for (const json &p : j.at("protocols")) {
    BundledSweep::Protocol x{protocolIndex(p.at("protocol")), p.at("parameters").get<std::vector<int>>()};
    size_t params = models[static_cast<size_t>(x.protocol)].params.size();
    if (x.parameters.size() != s.parameters.size())
      throw std::runtime_error("sweep '" + s.name + "' has the wrong number of parameter indices");
    for (int i : x.parameters)
      if (i < 0 || static_cast<size_t>(i) >= params)
        throw std::runtime_error("sweep '" + s.name + "' names parameter " + std::to_string(i) + ", out of range");
    s.protocols.push_back(std::move(x));
  }
  return s;
}

// Every index a stepper follows must land inside its vector; a damaged file must not make it
// read out of bounds.
void checkIndices(const ir::Model &m) {
  auto within = [](int i, size_t n, bool optional, const std::string &what) {
    if ((optional && i == -1) || (i >= 0 && static_cast<size_t>(i) < n))
      return;
    throw std::runtime_error(what + " index " + std::to_string(i) + " is out of range");
  };
  size_t states = m.stateNames.size(), params = m.paramNames.size(), outputs = m.kernel.outputs.size();
  if (m.initialState.size() != states || m.params.size() != params || m.paramDims.size() != params)
    throw std::runtime_error("the state or parameter lists differ in length");
  for (const ir::Node &n : m.kernel.nodes()) {
    if (n.op == ir::Op::State)
      within(n.index, states, false, "state");
    if (n.op == ir::Op::Param)
      within(n.index, params, false, "parameter");
  }
  for (const ir::Compartment &c : m.compartments) {
    within(c.voltageState, states, false, "state");
    within(c.capacitanceParam, params, false, "parameter");
    for (int o : {c.gOutput, c.geOutput, c.iOtherOutput, c.injectedOutput})
      within(o, outputs, false, "output");
    within(c.clampedOutput, outputs, true, "output");
    within(c.commandOutput, outputs, c.clampedOutput < 0, "output");
  }
  for (const ir::Junction &jn : m.junctions) {
    within(jn.parent, m.compartments.size(), false, "compartment");
    within(jn.child, m.compartments.size(), false, "compartment");
    if (!(jn.conductance > 0) || !std::isfinite(jn.conductance))
      throw std::runtime_error("a junction's conductance must be positive and finite");
  }
  for (const ir::Gate &g : m.gates) {
    within(g.state, states, false, "state");
    within(g.infOutput, outputs, false, "output");
    within(g.tauOutput, outputs, false, "output");
  }
  for (const ir::Pool &p : m.pools) {
    within(p.compartment, m.compartments.size(), false, "compartment");
    within(p.state, states, false, "state");
    within(p.derivativeOutput, outputs, false, "output");
  }
  for (const ir::Probe &r : m.probes) {
    within(r.state, states, true, "state");
    within(r.output, outputs, true, "output");
    if ((r.state < 0) == (r.output < 0))
      throw std::runtime_error("probe '" + r.name + "' needs exactly one of a state and an output");
  }
  for (int r : m.protocol.record)
    within(r, m.probes.size(), false, "probe");
}

} // namespace

std::string writeModelBundle(const ModelBundle &bundle) {
  json protocols = json::array();
  json sweeps = json::array();
  for (const ir::Model &m : bundle.protocols)
    protocols.push_back(model(m));
  for (const BundledSweep &s : bundle.sweeps)
    sweeps.push_back(sweepJson(s));
  json doc = {{"format", formatName},           {"tool_version", bundle.toolVersion},
              {"model_hash", bundle.modelHash}, {"source", bundle.source},
              {"protocols", protocols},         {"sweeps", sweeps}};
  return doc.dump();
}

bool readModelBundle(const std::string &text, ModelBundle &bundle, std::string &error) {
  try {
    json doc = json::parse(text);
    if (doc.at("format") != formatName) {
      error = "not a model bundle of this saltpan ('" + doc.at("format").dump() + "')";
      return false;
    }
    bundle.toolVersion = doc.at("tool_version").get<std::string>();
    bundle.modelHash = doc.at("model_hash").get<std::string>();
    bundle.source = doc.at("source").get<std::string>();
    bundle.protocols.clear();
    for (const json &m : doc.at("protocols")) {
      bundle.protocols.push_back(readModel(m));
      checkIndices(bundle.protocols.back());
    }
    bundle.sweeps.clear();
    for (const json &s : doc.at("sweeps"))
      bundle.sweeps.push_back(readSweep(s, bundle.protocols));
    return true;
  } catch (const std::exception &e) {
    error = std::string("malformed model bundle: ") + e.what();
    return false;
  }
}

uint64_t kernelFingerprint(const ir::Kernel &kernel, int lanes) {
  uint64_t h = 14695981039346656037ull;
  auto mix = [&h](const void *data, size_t size) {
    const auto *bytes = static_cast<const unsigned char *>(data);
    for (size_t i = 0; i < size; ++i)
      h = (h ^ bytes[i]) * 1099511628211ull;
  };
  for (const ir::Node &n : kernel.nodes()) {
    uint64_t bits;
    std::memcpy(&bits, &n.constant, sizeof bits);
    int32_t fields[5] = {static_cast<int32_t>(n.op), n.index, n.a, n.b, n.c};
    mix(&bits, sizeof bits);
    mix(fields, sizeof fields);
  }
  uint64_t count = kernel.outputs.size();
  mix(&count, sizeof count);
  mix(kernel.outputs.data(), kernel.outputs.size() * sizeof(ir::NodeId));
  if (lanes > 1) // scalar kernels keep the digest they have always had
    mix(&lanes, sizeof lanes);
  return h;
}

} // namespace saltpan
