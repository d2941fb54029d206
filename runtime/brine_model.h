/* brine_model.h - the C interface of a model library built by `brine build FILE --shared`.
 *
 * A library holds one checked spec with every protocol lowered and compiled to native code for
 * the CPU it was built on. Values are coherent SI (V, s, S/m^2, mol/m^3, ...). Functions that
 * can fail return 0 on success and -1 on failure, with a message from brine_model_last_error.
 * Instances are independent; use one instance from one thread at a time.
 * See docs/embedding.md. brine is a research modelling tool, not for clinical or diagnostic
 * decisions. */
#ifndef BRINE_MODEL_H
#define BRINE_MODEL_H

#ifdef __cplusplus
extern "C" {
#endif

#if defined(__GNUC__)
#define BRINE_MODEL_API __attribute__((visibility("default")))
#else
#define BRINE_MODEL_API
#endif

/** The version of this interface; changes when a function changes meaning. */
#define BRINE_MODEL_API_VERSION 1

typedef struct brine_model brine_model;

/* ---- the model in the library (NULL if the library is damaged) ---- */
BRINE_MODEL_API const char *brine_model_name(void);
/** "sha256:..." (the same as `brine hash` and the JSON outputs of `brine run`). */
BRINE_MODEL_API const char *brine_model_hash(void);
/** The version of brine that built the library. */
BRINE_MODEL_API const char *brine_model_tool_version(void);
/** Protocols in declaration order; -1 if the library is damaged. */
BRINE_MODEL_API int brine_model_protocol_count(void);
BRINE_MODEL_API const char *brine_model_protocol_name(int index);

/* ---- instances ---- */
/** A model at time 0 in its initial state, with the protocol's stimuli, step and method.
 *  `protocol` may be NULL when the spec has exactly one. The method must be a fixed-step one
 *  (exponential_euler or rk4). Returns NULL on failure (see brine_model_last_error(NULL)). */
BRINE_MODEL_API brine_model *brine_model_create(const char *protocol);
BRINE_MODEL_API void brine_model_destroy(brine_model *model);
/** The last failure of `model`, or of the calling thread's last brine_model_create when
 *  `model` is NULL; "" when there was none. Valid until the next call on the same instance. */
BRINE_MODEL_API const char *brine_model_last_error(const brine_model *model);
/** Back to time 0 and the initial state; parameters keep their values. */
BRINE_MODEL_API int brine_model_reset(brine_model *model);

/* ---- parameters (what `brine run --set` sets), SI values ---- */
BRINE_MODEL_API int brine_model_parameter_count(const brine_model *model);
BRINE_MODEL_API const char *brine_model_parameter_name(const brine_model *model, int index);
/** The index of a named parameter, or -1. */
BRINE_MODEL_API int brine_model_parameter_index(const brine_model *model, const char *name);
BRINE_MODEL_API int brine_model_get_parameter(const brine_model *model, const char *name, double *si_value);
/** Takes effect from the next step. Fails for an unknown name or a value that is not finite. */
BRINE_MODEL_API int brine_model_set_parameter(brine_model *model, const char *name, double si_value);

/* ---- state ---- */
BRINE_MODEL_API int brine_model_state_count(const brine_model *model);
/** Names such as "axon.V" (volts) or "axon.SquidSodium1952.m" (a gate, 0 to 1). */
BRINE_MODEL_API const char *brine_model_state_name(const brine_model *model, int index);
BRINE_MODEL_API int brine_model_state_index(const brine_model *model, const char *name);
/** The value of state `index`, or NaN when there is no such state. */
BRINE_MODEL_API double brine_model_state(const brine_model *model, int index);
BRINE_MODEL_API int brine_model_get_state(const brine_model *model, const char *name, double *si_value);

/* ---- time and stepping ---- */
/** Seconds since time 0: the number of steps taken times the step. */
BRINE_MODEL_API double brine_model_time(const brine_model *model);
/** The protocol's fixed step, in seconds. */
BRINE_MODEL_API double brine_model_step_size(const brine_model *model);
/** Takes `count` steps (count >= 0). Fails, and refuses further steps until reset, when a state
 *  becomes NaN or infinite or a potential leaves +-2 V; the state is then the failing one. */
BRINE_MODEL_API int brine_model_step(brine_model *model, long count);
/** Advances by `seconds`, which must be a whole number of steps (within 1e-9 relative). */
BRINE_MODEL_API int brine_model_advance(brine_model *model, double seconds);

#ifdef __cplusplus
}
#endif
#endif /* BRINE_MODEL_H */
