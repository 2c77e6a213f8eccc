/* registry.h: the one table of named operations. Every host (CLI, GObject
 * API, C plugin entry point, Octave) calls operations through here. */
#ifndef BM_REGISTRY_H
#define BM_REGISTRY_H

#include <json-glib/json-glib.h>
#include "bm-error-private.h"
#include "bm-bands.h"

G_BEGIN_DECLS

/* JSON value kinds a parameter accepts (a mask). */
typedef enum {
    BM_VALUE_STRING  = 1 << 0,
    BM_VALUE_NUMBER  = 1 << 1,   /* integer or real */
    BM_VALUE_INTEGER = 1 << 2,   /* integer only */
    BM_VALUE_BOOLEAN = 1 << 3,
    BM_VALUE_ARRAY   = 1 << 4,
    BM_VALUE_OBJECT  = 1 << 5
} BmValueKind;

/* A bound of a numeric range: absent, closed (value allowed) or open. */
typedef enum {
    BM_BOUND_NONE = 0,
    BM_BOUND_CLOSED,
    BM_BOUND_OPEN
} BmBoundKind;

typedef struct {
    BmBoundKind kind;
    double value;
} BmBound;

/* Bounds for BmParam.lower / .upper: BM_GT(0) is "> 0", BM_GE(0) ">= 0",
 * BM_LT(x) "< x", BM_LE(x) "<= x". */
#define BM_GT(x) { BM_BOUND_OPEN, (x) }
#define BM_GE(x) { BM_BOUND_CLOSED, (x) }
#define BM_LT(x) { BM_BOUND_OPEN, (x) }
#define BM_LE(x) { BM_BOUND_CLOSED, (x) }

/* One value of an enumerated type: the enum constant, its name in requests
 * and responses, and a short description. */
typedef struct {
    int value;
    const char *name;
    const char *description;
} BmChoice;

/* An enumerated type, registered once (plugin/bm-enums.h): the registry
 * checks request strings against it and the operations map text <-> enum
 * with bm_enum_value / bm_enum_name. */
typedef struct {
    const char *name;          /* e.g. "statistics" */
    const BmChoice *choices;   /* terminated by an entry with name NULL */
} BmEnum;

/* One request key, described as data so that hosts can generate options,
 * help text and validation from it. Keys carry their unit in the name; the
 * unit, range and choices are also here, and the registry checks them. */
typedef struct {
    const char *name;          /* JSON key, e.g. "temperature_k" */
    guint kinds;               /* BmValueKind mask */
    gboolean required;
    const char *default_json;  /* JSON text of the default, or NULL */
    const char *summary;       /* one line: the meaning */
    const char *unit;          /* "K", "eV", "cm^-3", "1/Angstrom", "m_e", ...;
                                  NULL: none (dimensionless, text, structured) */
    BmBound lower, upper;      /* on a number, or on every number of an array */
    const BmEnum *choices;     /* a string must be one of these names, or NULL */
    guint choice_subset;       /* bit v set: the choice of value v (< 32) is
                                  accepted; 0: every choice */
} BmParam;

#define BM_PARAM_END { .name = NULL }

/* One top-level key of an operation's response. "warnings" and
 * "warning_codes" (always present) are common to every operation and not
 * listed in the tables (bm_common_fields). */
typedef struct {
    const char *name;          /* e.g. "fermi_level_ev" */
    const char *unit;          /* NULL: none */
    gboolean optional;         /* present only for some requests */
    const char *meaning;       /* one line */
} BmField;

#define BM_FIELD_END { .name = NULL }

/* In-memory inputs a host hands over beside the JSON request, each standing
 * in for one request key: for example a band grid built from a NumPy array
 * in place of the "grid" file path, so no file is written. The registry
 * only checks that each key is a parameter of the operation and is not
 * also in the request; the operation that reads the key asks for the input
 * by key and type tag (bm_call_inputs_lookup). Type tags are strings named
 * by the reader that defines the pointed-to type (BM_INPUT_BAND_GRID in
 * io/band-grid.h), so a new kind of input needs no change here. A key that
 * an input may stand in for is declared optional in the operation's
 * parameters (the operation says what it needs when neither is given). */
typedef struct {
    const char *key;     /* the request key it stands in for, e.g. "grid" */
    const char *type;    /* type tag of value, e.g. BM_INPUT_BAND_GRID */
    const void *value;   /* borrowed for the duration of the call */
} BmInput;

typedef struct _BmCallInputs BmCallInputs;
struct _BmCallInputs {
    gsize n_inputs;
    const BmInput *inputs;   /* n_inputs entries, keys distinct */
};

/* The value standing in for key, or NULL when inputs (may be NULL) has none.
 * An input for key with another type tag is an error (NULL, error set). */
const void *bm_call_inputs_lookup(const BmCallInputs *inputs, const char *key,
                                  const char *type, GError **error);

/* Runs an operation on a validated request (defaults filled in). Returns a
 * new response object, or NULL with error set. */
typedef JsonObject *(*BmOperationFunc)(JsonObject *request,
                                       const BmCallInputs *inputs,
                                       GError **error);

typedef struct {
    const char *name;          /* e.g. "mass-tensor" */
    const char *summary;       /* one line */
    const BmParam *params;     /* terminated by BM_PARAM_END */
    BmOperationFunc run;
    const BmField *response;   /* terminated by BM_FIELD_END */
} BmOperation;

/* Initialises the core once (GSL error handler off); idempotent and thread-safe. */
void bm_registry_init(void);

const BmOperation *const *bm_registry_operations(guint *n_ops);
const BmOperation *bm_registry_lookup(const char *name);

/* Validates request against op->params (unknown keys, missing required keys,
 * wrong kinds, values out of range and strings not among the choices are
 * errors that name the key, the value and what is allowed; so are in-memory
 * inputs for keys the operation does not take or that the request also gives)
 * and returns a new request with the defaults filled in, or NULL with error set. */
JsonObject *bm_registry_prepare(const BmOperation *op, JsonObject *request,
                                const BmCallInputs *inputs, GError **error);

/* bm_registry_prepare, then runs. The response always carries "warnings" and
 * "warning_codes" (parallel arrays). */
JsonObject *bm_registry_invoke(const BmOperation *op, JsonObject *request,
                               const BmCallInputs *inputs, GError **error);

/* The string path used by every host: request JSON text in, response JSON
 * text out (pretty-printed when pretty). */
char *bm_registry_call_json(const char *op_name, const char *request_json,
                            const BmCallInputs *inputs, gboolean pretty,
                            GError **error);

/* Checks one value against p (kind, range, choices); op_name goes into the
 * message. The check bm_registry_invoke applies to every request key. */
/* The longest list a request key may hold (temperatures, eta values,
 * densities, subbands, ...): a bound on the time and memory of one request
 * (100,000 temperatures of carrier-statistics: 5.7 s and 0.56 GB peak). */
#define BM_MAX_LIST_LENGTH 100000

gboolean bm_param_check(const BmParam *p, const char *op_name, JsonNode *value,
                        GError **error);

/* The names of the kinds in a BmValueKind mask, in a fixed order
 * ("string", "number", "integer", "boolean", "array", "object"); a new
 * NULL-terminated array of static strings (free with g_free). */
const char **bm_value_kind_names(guint kinds);

/* A readable range, e.g. "> 0", ">= 0 and < 1", or NULL when p has none
 * (free the result). */
char *bm_param_range_text(const BmParam *p);

/* The accepted choices of p (NULL-terminated, static strings; free the
 * array with g_free), or NULL when p has none. Descriptions are in
 * p->choices. */
const BmChoice **bm_param_choices(const BmParam *p);

/* Description of one operation / all operations as JSON: name, summary,
 * params (name, kinds ("number or array"), kind_names (["number", "array"]),
 * required, default, summary, unit, minimum/maximum {value, inclusive} or
 * null, choices [{name, description}] or null) and response
 * ([{name, unit, optional, meaning}], "warnings" last). */
JsonNode *bm_operation_describe(const BmOperation *op);
JsonNode *bm_registry_describe(void);

/* The fields every response carries beside an operation's own table
 * ("warnings", "warning_codes"), terminated by BM_FIELD_END. */
extern const BmField bm_common_fields[];

G_END_DECLS

#endif
