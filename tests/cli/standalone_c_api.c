/* standalone_c_api.c - drives a model library built by `saltpan build --shared` through
 * saltpan_model.h (compiled and run by standalone_shared.sh).
 *
 * usage: standalone_c_api PROTOCOL|- PARAMETER SI_VALUE STATE STEPS...
 * Prints "set K VALUE" for an instance with PARAMETER set and "default K VALUE" for one
 * without, at each step count K, with STATE in SI units (%.17g); the script compares them
 * with `saltpan run`. Misuse of the interface must fail cleanly; any surprise exits 1. */
#include "saltpan_model.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static int failures = 0;

static void expect(int ok, const char *what) {
  if (!ok) {
    fprintf(stderr, "FAIL: %s\n", what);
    ++failures;
  }
}

/* Steps `model` to each count in `steps` and prints STATE there. */
static void trace(saltpan_model *model, const char *label, int state, int count, char **steps) {
  long done = 0;
  for (int i = 0; i < count; ++i) {
    long k = atol(steps[i]);
    if (saltpan_model_step(model, k - done) != 0) {
      fprintf(stderr, "FAIL: step: %s\n", saltpan_model_last_error(model));
      ++failures;
      return;
    }
    done = k;
    printf("%s %ld %.17g\n", label, k, saltpan_model_state(model, state));
  }
}

int main(int argc, char **argv) {
  if (argc < 6) {
    fprintf(stderr, "usage: %s PROTOCOL|- PARAMETER SI_VALUE STATE STEPS...\n", argv[0]);
    return 2;
  }
  const char *protocol = strcmp(argv[1], "-") == 0 ? NULL : argv[1];
  const char *parameter = argv[2], *stateName = argv[4];
  double value = atof(argv[3]);

  expect(saltpan_model_name() != NULL && saltpan_model_hash() != NULL, "the model has a name and a hash");
  expect(strncmp(saltpan_model_hash(), "sha256:", 7) == 0, "the hash is a sha256");
  expect(saltpan_model_protocol_count() >= 1, "at least one protocol");
  expect(saltpan_model_protocol_name(saltpan_model_protocol_count()) == NULL, "no protocol past the last");

  /* Failures that must be reported, not crash. */
  expect(saltpan_model_create("no_such_protocol") == NULL, "an unknown protocol is refused");
  expect(strstr(saltpan_model_last_error(NULL), "no_such_protocol") != NULL, "the refusal names the protocol");

  saltpan_model *a = saltpan_model_create(protocol);
  saltpan_model *b = saltpan_model_create(protocol);
  if (!a || !b) {
    fprintf(stderr, "FAIL: create: %s\n", saltpan_model_last_error(NULL));
    return 1;
  }
  int state = saltpan_model_state_index(a, stateName);
  expect(state >= 0, "the state exists");
  expect(strcmp(saltpan_model_state_name(a, state), stateName) == 0, "the state's name round-trips");
  expect(saltpan_model_parameter_index(a, parameter) >= 0, "the parameter exists");
  expect(saltpan_model_set_parameter(a, "no.such.parameter", 1.0) == -1, "an unknown parameter is refused");
  expect(strstr(saltpan_model_last_error(a), "no.such.parameter") != NULL, "the refusal names the parameter");
  expect(saltpan_model_set_parameter(a, parameter, NAN) == -1, "a NaN value is refused");
  expect(saltpan_model_step(a, -1) == -1, "a negative step count is refused");
  expect(saltpan_model_advance(a, saltpan_model_step_size(a) * 0.5) == -1, "half a step is refused");
  expect(saltpan_model_advance(a, 1e30) == -1, "an advance of more than 1e12 steps is refused");
  expect(isnan(saltpan_model_state(a, saltpan_model_state_count(a))), "no state past the last");
  expect(saltpan_model_time(a) == 0, "still at time 0 after refusals");

  double before = 0, after = 0;
  expect(saltpan_model_get_parameter(a, parameter, &before) == 0, "get the parameter");
  expect(saltpan_model_set_parameter(a, parameter, value) == 0, "set the parameter");
  expect(saltpan_model_get_parameter(a, parameter, &after) == 0 && after == value, "the parameter holds the value");
  expect(before != value, "the value differs from the default (else the test proves nothing)");

  trace(a, "set", state, argc - 5, argv + 5);
  trace(b, "default", state, argc - 5, argv + 5);
  long last = atol(argv[argc - 1]);
  expect(fabs(saltpan_model_time(a) - last * saltpan_model_step_size(a)) <= 1e-12 * saltpan_model_time(a),
         "time is steps times the step");

  /* After a reset the same steps give the same bits; advance is whole steps. */
  double first = saltpan_model_state(a, state);
  expect(saltpan_model_reset(a) == 0 && saltpan_model_time(a) == 0, "reset to time 0");
  expect(saltpan_model_advance(a, last * saltpan_model_step_size(a)) == 0, "advance by whole steps");
  expect(saltpan_model_state(a, state) == first, "a reset run repeats bit for bit");
  double viaName = 0;
  expect(saltpan_model_get_state(a, stateName, &viaName) == 0 && viaName == first, "read the state by name");

  saltpan_model_destroy(a);
  saltpan_model_destroy(b);
  saltpan_model_destroy(NULL);
  return failures ? 1 : 0;
}
