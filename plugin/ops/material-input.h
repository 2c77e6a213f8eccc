/* material-input.h: the material codec.  One table of fields reads a material
 * object (a request value, an inline object or a JSON file) into the core's
 * bm_material and writes a bm_material back as the same object, so what the
 * "materials" operation prints is a valid material file that reads back to
 * the same numbers.  No physics: values are copied. */
#ifndef BM_MATERIAL_INPUT_H
#define BM_MATERIAL_INPUT_H

#include <json-glib/json-glib.h>
#include "bm-error-private.h"
#include "bm-materials.h"

G_BEGIN_DECLS

typedef struct {
    bm_material mat;            /* the built-in entry, or one filled from the object */
    gboolean builtin;
    char *origin;               /* "built-in table", "given in the request" or
                                   "material file PATH" */
    GPtrArray *strings;         /* owned strings and arrays the struct points into */
} BmMaterialInput;

/* Reads request[key] (a string: built-in name or path of a JSON file; or an
 * object).  Errors name the key, the file or the object key at fault; on
 * failure *out owns nothing (clearing it again is harmless). */
gboolean bm_material_input_read(JsonObject *request, const char *key,
                                BmMaterialInput *out, GError **error);
void bm_material_input_clear(BmMaterialInput *in);

/* m as a material object (every key of the codec that m has, values as
 * {value, source}); the caller owns the result. */
JsonObject *bm_material_to_json(const bm_material *m);

/* The parameters of a gap model as the codec writes them, without their
 * source: {eg0_ev, alpha_ev_per_k, beta_k}, {eg0_ev, a_b_ev, theta_k} or
 * {eg0_ev} for a fixed gap; the caller owns the result. */
JsonObject *bm_material_gap_parameters(const bm_gap_model *g);

/* Keys a material object may hold that the reader skips: "comment", and
 * "derived" and "warnings", which the materials operation writes beside the
 * material (recomputed, never read back). */
extern const char *const bm_material_ignored_keys[];

G_END_DECLS

#endif
