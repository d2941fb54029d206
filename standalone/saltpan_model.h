/* saltpan_model.h - the C interface of a model library built by `saltpan build FILE --shared`.
 *
 * A library holds one checked spec with every protocol lowered and compiled to native code for
 * the CPU it was built on. Values are coherent SI (V, s, S/m^2, mol/m^3, ...). Functions that
 * can fail return 0 on success and -1 on failure, with a message from saltpan_model_last_error.
 * Instances are independent; use one instance from one thread at a time.
 * See docs/embedding.md. saltpan is a research modelling tool, not for clinical or diagnostic
 * decisions. */
#ifndef SALTPAN_MODEL_H
#define SALTPAN_MODEL_H

#ifdef __cplusplus
extern "C" {
#endif

#if defined(__GNUC__)
#define SALTPAN_MODEL_API __attribute__((visibility("default")))
#else
#define SALTPAN_MODEL_API
#endif

/** The version of this interface; changes when a function changes meaning. */
#define SALTPAN_MODEL_API_VERSION 1

typedef struct saltpan_model saltpan_model;

/* ---- the model in the library (NULL if the library is damaged) ---- */
SALTPAN_MODEL_API const char *saltpan_model_name(void);
/** "sha256:..." (the same as `saltpan hash` and the JSON outputs of `saltpan run`). */
SALTPAN_MODEL_API const char *saltpan_model_hash(void);
/** The version of saltpan that built the library. */
SALTPAN_MODEL_API const char *saltpan_model_tool_version(void);
/** Protocols in declaration order; -1 if the library is damaged. */
SALTPAN_MODEL_API int saltpan_model_protocol_count(void);
SALTPAN_MODEL_API const char *saltpan_model_protocol_name(int index);

/* ---- instances ---- */
/** A model at time 0 in its initial state, with the protocol's stimuli, step and method.
 *  `protocol` may be NULL when the spec has exactly one. The method must be a fixed-step one
 *  (exponential_euler or rk4). Returns NULL on failure (see saltpan_model_last_error(NULL)). */
SALTPAN_MODEL_API saltpan_model *saltpan_model_create(const char *protocol);
SALTPAN_MODEL_API void saltpan_model_destroy(saltpan_model *model);
/** The last failure of `model`, or of the calling thread's last saltpan_model_create when
 *  `model` is NULL; "" when there was none. Valid until the next call on the same instance. */
SALTPAN_MODEL_API const char *saltpan_model_last_error(const saltpan_model *model);
/** Back to time 0 and the initial state; parameters keep their values. */
SALTPAN_MODEL_API int saltpan_model_reset(saltpan_model *model);

/* ---- parameters (what `saltpan run --set` sets), SI values ---- */
SALTPAN_MODEL_API int saltpan_model_parameter_count(const saltpan_model *model);
SALTPAN_MODEL_API const char *saltpan_model_parameter_name(const saltpan_model *model, int index);
/** The index of a named parameter, or -1. */
SALTPAN_MODEL_API int saltpan_model_parameter_index(const saltpan_model *model, const char *name);
SALTPAN_MODEL_API int saltpan_model_get_parameter(const saltpan_model *model, const char *name, double *si_value);
/** Takes effect from the next step. Fails for an unknown name or a value that is not finite. */
SALTPAN_MODEL_API int saltpan_model_set_parameter(saltpan_model *model, const char *name, double si_value);

/* ---- state ---- */
SALTPAN_MODEL_API int saltpan_model_state_count(const saltpan_model *model);
/** Names such as "axon.V" (volts) or "axon.SquidSodium1952.m" (a gate, 0 to 1). */
SALTPAN_MODEL_API const char *saltpan_model_state_name(const saltpan_model *model, int index);
SALTPAN_MODEL_API int saltpan_model_state_index(const saltpan_model *model, const char *name);
/** The value of state `index`, or NaN when there is no such state. */
SALTPAN_MODEL_API double saltpan_model_state(const saltpan_model *model, int index);
SALTPAN_MODEL_API int saltpan_model_get_state(const saltpan_model *model, const char *name, double *si_value);

/* ---- time and stepping ---- */
/** Seconds since time 0: the number of steps taken times the step. */
SALTPAN_MODEL_API double saltpan_model_time(const saltpan_model *model);
/** The protocol's fixed step, in seconds. */
SALTPAN_MODEL_API double saltpan_model_step_size(const saltpan_model *model);
/** Takes `count` steps (count >= 0). Fails, and refuses further steps until reset, when a state
 *  becomes NaN or infinite or a potential leaves +-2 V; the state is then the failing one. */
SALTPAN_MODEL_API int saltpan_model_step(saltpan_model *model, long count);
/** Advances by `seconds`, which must be a whole number of steps (within 1e-9 relative), at most 1e12. */
SALTPAN_MODEL_API int saltpan_model_advance(saltpan_model *model, double seconds);

#ifdef __cplusplus
}
#endif
#endif /* SALTPAN_MODEL_H */
