/* material-input.h: the "material" request value shared by the carrier, valley
 * and hole operations: a built-in name, an inline object, or a JSON file holding one. */
#ifndef BM_MATERIAL_INPUT_H
#define BM_MATERIAL_INPUT_H

#include <json-glib/json-glib.h>
#include "bm-error-private.h"
#include "bm-materials.h"

G_BEGIN_DECLS

typedef enum {
    BM_GAP_VARSHNI,
    BM_GAP_BOSE_EINSTEIN,
    BM_GAP_FIXED
} BmGapModel;

/* A material from an object has NAN for the hole masses, split-off energy and
 * Luttinger parameters it does not give, and point_group NULL if not given. */
typedef struct {
    bm_material mat;            /* the built-in entry, or one filled from the object */
    gboolean builtin;
    gboolean has_varshni, has_bose_einstein, has_fixed_gap;
    gboolean has_electron_mass, has_hole_mass;
    gboolean has_valley;        /* mat.electron filled (point_group may still be NULL) */
    bm_bose_einstein_gap bose_einstein;
    double fixed_gap_ev;
    char *origin;               /* "built-in table", "request" or the file path */
    GPtrArray *strings;         /* owned strings the struct points into */
} BmMaterialInput;

/* Reads request[key] (a string: built-in name or path of a JSON file; or an
 * object).  Errors name the key, the file or the object key at fault; on
 * failure *out owns nothing (clearing it again is harmless). */
gboolean bm_material_input_read(JsonObject *request, const char *key,
                                BmMaterialInput *out, GError **error);
void bm_material_input_clear(BmMaterialInput *in);

/* The gap model used when none is asked for: Varshni, else Bose-Einstein,
 * else the fixed gap. */
BmGapModel bm_material_input_default_gap(const BmMaterialInput *in);
const char *bm_gap_model_name(BmGapModel model);  /* "varshni", "bose-einstein", "fixed" */

/* The gap at t_k with the given model (error naming the material if it has no
 * parameters for it); where names the temperature in messages. */
gboolean bm_material_input_gap(const BmMaterialInput *in, BmGapModel model, double t_k,
                               const char *where, double *eg_ev, bm_warnings *w,
                               GError **error);

/* A one-line statement of where the gap parameters come from. */
const char *bm_material_input_gap_source(const BmMaterialInput *in, BmGapModel model);

G_END_DECLS

#endif
