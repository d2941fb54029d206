// CApi.cpp - saltpan_model.h: a built model stepped from C, one fixed step at a time.
//
// Each step is the one `saltpan run` takes, so the states agree with its output bit for bit:
// the kernels KernelPlan chooses for a built model, stepped by the shared FixedRun.
#include "saltpan_model.h"

#include "FixedStep.h"
#include "KernelPlan.h"
#include "RunSettings.h"
#include "Simulate.h"
#include "StandaloneModel.h"

#include <cmath>
#include <cstring>
#include <exception>
#include <optional>

namespace {

using namespace saltpan;

thread_local std::string createError;

const ModelBundle *bundle() {
  static std::string loadError;
  static std::optional<ModelBundle> loaded = [] {
    ModelBundle b;
    return loadEmbeddedBundle(b, loadError) ? std::optional<ModelBundle>(std::move(b)) : std::nullopt;
  }();
  if (!loaded)
    createError = loadError;
  return loaded ? &*loaded : nullptr;
}

} // namespace

struct saltpan_model {
  ir::Model model;
  std::vector<double> params, y;
  std::optional<PlannedKernels> kernels;
  std::optional<FixedRun> run; // begun at the current step, with the current parameters
  long steps = 0;
  bool failed = false;
  std::string failure; // why the simulation stopped, kept until reset
  std::string error;

  double time() const { return run->grid().time(steps); }

  // Starts the next step: clamps hold the state as `saltpan run` records it at this time, and
  // a fused step is taken with the parameters as they are now (set_parameter begins again).
  void begin() { run->begin(steps, y.data(), false); }

  bool step() {
    run->finish(y.data(), nullptr);
    ++steps;
    SimulationFailure why;
    if (!healthyState(model, y.data(), 1, time(), why)) {
      failed = true;
      char when[64];
      std::snprintf(when, sizeof when, "at t = %.6g ms: ", time() * 1e3);
      failure = std::string("the simulation failed ") + when + "'" + why.variable + "' " + why.reason;
      error = failure;
      return false;
    }
    begin();
    return true;
  }
};

namespace {

// Every entry point catches: no C++ exception may cross into C.
template <class F> auto guarded(saltpan_model *m, F body, decltype(body()) onFailure) {
  try {
    return body();
  } catch (const std::exception &e) {
    (m ? m->error : createError) = std::string("internal error: ") + e.what();
  } catch (...) {
    (m ? m->error : createError) = "internal error";
  }
  return onFailure;
}

int parameterIndex(const saltpan_model *m, const char *name) { return name ? m->model.findParam(name) : -1; }

int stateIndex(const saltpan_model *m, const char *name) {
  if (!name)
    return -1;
  for (size_t i = 0; i < m->model.stateNames.size(); ++i)
    if (m->model.stateNames[i] == name)
      return static_cast<int>(i);
  return -1;
}

int refuse(const saltpan_model *m, std::string message) {
  const_cast<saltpan_model *>(m)->error = std::move(message); // the message is not model state
  return -1;
}

} // namespace

extern "C" {

const char *saltpan_model_name(void) {
  const ModelBundle *b = bundle();
  return b && !b->protocols.empty() ? b->protocols.front().name.c_str() : nullptr;
}

const char *saltpan_model_hash(void) {
  const ModelBundle *b = bundle();
  return b ? b->modelHash.c_str() : nullptr;
}

const char *saltpan_model_tool_version(void) {
  const ModelBundle *b = bundle();
  return b ? b->toolVersion.c_str() : nullptr;
}

int saltpan_model_protocol_count(void) {
  const ModelBundle *b = bundle();
  return b ? static_cast<int>(b->protocols.size()) : -1;
}

const char *saltpan_model_protocol_name(int index) {
  const ModelBundle *b = bundle();
  if (!b || index < 0 || static_cast<size_t>(index) >= b->protocols.size())
    return nullptr;
  return b->protocols[index].protocol.name.c_str();
}

saltpan_model *saltpan_model_create(const char *protocol) {
  createError.clear();
  return guarded(
      nullptr,
      [&]() -> saltpan_model * {
        const ModelBundle *b = bundle();
        if (!b)
          return nullptr;
        const ir::Model *chosen = nullptr;
        if (protocol) {
          for (const ir::Model &m : b->protocols)
            if (m.protocol.name == protocol)
              chosen = &m;
          if (!chosen) {
            createError = std::string("there is no protocol '") + protocol + "' in this model";
            return nullptr;
          }
        } else if (b->protocols.size() == 1) {
          chosen = &b->protocols.front();
        } else {
          createError = "the model has " + std::to_string(b->protocols.size()) + " protocols; name one";
          return nullptr;
        }
        ir::Method method = chosen->protocol.method;
        if (method == ir::Method::DormandPrince || method == ir::Method::Rosenbrock) {
          createError = "protocol '" + chosen->protocol.name + "' uses " + ir::methodName(method) +
                        "; the C interface steps fixed-step methods only (exponential_euler, rk4, backward_euler, "
                        "crank_nicolson)";
          return nullptr;
        }
        auto m = std::make_unique<saltpan_model>();
        m->model = *chosen;
        m->kernels.emplace(planKernels(m->model, KernelUse::Built), embeddedKernel);
        if (!m->kernels->native()) {
          createError = "internal error: " + m->kernels->compileError();
          return nullptr;
        }
        m->params = m->model.params;
        m->y = m->model.initialState;
        m->run.emplace(m->model, m->params.data(), m->kernels->plain(), m->kernels->fusedStep());
        m->begin();
        return m.release();
      },
      nullptr);
}

void saltpan_model_destroy(saltpan_model *model) { delete model; }

const char *saltpan_model_last_error(const saltpan_model *model) {
  return model ? model->error.c_str() : createError.c_str();
}

int saltpan_model_reset(saltpan_model *model) {
  if (!model)
    return -1;
  return guarded(
      model,
      [&] {
        model->y = model->model.initialState;
        model->steps = 0;
        model->failed = false;
        model->failure.clear();
        model->error.clear();
        model->begin();
        return 0;
      },
      -1);
}

int saltpan_model_parameter_count(const saltpan_model *model) {
  return model ? static_cast<int>(model->params.size()) : -1;
}

const char *saltpan_model_parameter_name(const saltpan_model *model, int index) {
  if (!model || index < 0 || static_cast<size_t>(index) >= model->params.size())
    return nullptr;
  return model->model.paramNames[index].c_str();
}

int saltpan_model_parameter_index(const saltpan_model *model, const char *name) {
  return model ? parameterIndex(model, name) : -1;
}

int saltpan_model_get_parameter(const saltpan_model *model, const char *name, double *si_value) {
  if (!model || !si_value)
    return -1;
  int i = parameterIndex(model, name);
  if (i < 0)
    return refuse(model, std::string("there is no parameter '") + (name ? name : "") + "'");
  *si_value = model->params[i];
  return 0;
}

int saltpan_model_set_parameter(saltpan_model *model, const char *name, double si_value) {
  if (!model)
    return -1;
  int i = parameterIndex(model, name);
  if (i < 0)
    return refuse(model, std::string("there is no parameter '") + (name ? name : "") + "'");
  if (!std::isfinite(si_value))
    return refuse(model, std::string("the value of '") + name + "' must be finite");
  model->params[i] = si_value;
  return guarded(
      model,
      [&] {
        model->begin(); // a clamp command, and the fused step, may depend on it
        return 0;
      },
      -1);
}

int saltpan_model_state_count(const saltpan_model *model) { return model ? static_cast<int>(model->y.size()) : -1; }

const char *saltpan_model_state_name(const saltpan_model *model, int index) {
  if (!model || index < 0 || static_cast<size_t>(index) >= model->y.size())
    return nullptr;
  return model->model.stateNames[index].c_str();
}

int saltpan_model_state_index(const saltpan_model *model, const char *name) {
  return model ? stateIndex(model, name) : -1;
}

double saltpan_model_state(const saltpan_model *model, int index) {
  if (!model || index < 0 || static_cast<size_t>(index) >= model->y.size())
    return NAN;
  return model->y[index];
}

int saltpan_model_get_state(const saltpan_model *model, const char *name, double *si_value) {
  if (!model || !si_value)
    return -1;
  int i = stateIndex(model, name);
  if (i < 0)
    return refuse(model, std::string("there is no state '") + (name ? name : "") + "'");
  *si_value = model->y[i];
  return 0;
}

double saltpan_model_time(const saltpan_model *model) { return model ? model->time() : NAN; }

double saltpan_model_step_size(const saltpan_model *model) { return model ? model->model.protocol.step : NAN; }

int saltpan_model_step(saltpan_model *model, long count) {
  if (!model)
    return -1;
  if (count < 0)
    return refuse(model, "the number of steps must not be negative");
  if (model->failed)
    return refuse(model, model->failure + "; reset the model to start again");
  return guarded(
      model,
      [&] {
        for (long i = 0; i < count; ++i)
          if (!model->step())
            return -1;
        return 0;
      },
      -1);
}

int saltpan_model_advance(saltpan_model *model, double seconds) {
  if (!model)
    return -1;
  double ratio = seconds / model->model.protocol.step;
  if (!std::isfinite(ratio) || ratio < 0 || std::fabs(ratio - std::round(ratio)) > 1e-9 * std::max(ratio, 1.0))
    return refuse(model, "advance needs a time that is a whole, non-negative number of steps");
  if (ratio > maxTimingCount) // beyond a long's exact range for lround, and days of stepping
    return refuse(model, "advance needs at most 1e12 steps at once");
  return saltpan_model_step(model, std::lround(ratio));
}

} // extern "C"
