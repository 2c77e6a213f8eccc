/* registry.h: the one table of named operations. Every host (CLI, GObject
 * API, C plugin entry point, Octave) calls operations through here. */
#ifndef BM_REGISTRY_H
#define BM_REGISTRY_H

#include <json-glib/json-glib.h>
#include "bm-error.h"
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

/* One request key, described as data so that hosts can generate options,
 * help text and validation from it. Keys carry their unit in the name. */
typedef struct {
    const char *name;          /* JSON key, e.g. "temperature_k" */
    guint kinds;               /* BmValueKind mask */
    gboolean required;
    const char *default_json;  /* JSON text of the default, or NULL */
    const char *summary;       /* one line: meaning and unit */
} BmParam;

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

/* Appends a readable rendering of a response (the CLI's default view). */
typedef void (*BmRenderFunc)(JsonObject *response, GString *out);

typedef struct {
    const char *name;          /* e.g. "mass-tensor" */
    const char *summary;       /* one line */
    const BmParam *params;     /* terminated by an entry with name NULL */
    BmOperationFunc run;
    BmRenderFunc render;       /* NULL: generic key/value rendering */
} BmOperation;

/* Initialises the core once (GSL error handler off); idempotent and thread-safe. */
void bm_registry_init(void);

const BmOperation *const *bm_registry_operations(guint *n_ops);
const BmOperation *bm_registry_lookup(const char *name);

/* Validates request against op->params (unknown keys, missing required keys,
 * wrong kinds are errors that name the key; so are in-memory inputs for keys
 * the operation does not take or that the request also gives) and returns a
 * new request with the defaults filled in, or NULL with error set. */
JsonObject *bm_registry_prepare(const BmOperation *op, JsonObject *request,
                                const BmCallInputs *inputs, GError **error);

/* bm_registry_prepare, then runs. The response always carries a "warnings"
 * array. */
JsonObject *bm_registry_invoke(const BmOperation *op, JsonObject *request,
                               const BmCallInputs *inputs, GError **error);

/* The string path used by every host: request JSON text in, response JSON
 * text out (pretty-printed when pretty). */
char *bm_registry_call_json(const char *op_name, const char *request_json,
                            const BmCallInputs *inputs, gboolean pretty,
                            GError **error);

/* Description of one operation / all operations as JSON (name, summary,
 * params with kinds, required flags, defaults and summaries). */
JsonNode *bm_operation_describe(const BmOperation *op);
JsonNode *bm_registry_describe(void);

/* Generic readable rendering, used when an operation has no renderer. */
void bm_render_generic(JsonObject *response, GString *out);

G_END_DECLS

#endif
