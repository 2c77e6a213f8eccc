/* bandmass-extremum.c: BmExtremum, one extremum of the mass-tensor search:
 * copied from the core's result (bm_bands_find_extrema) or read from one
 * element of a saved response's "extrema" array (no physics here). */
#include "bandmass-private.h"
#include "bm-json.h"
#include "mass-tensor.h"
#include <math.h>
#include <string.h>

/**
 * BmExtremum:
 *
 * A band extremum with its inertial mass tensor, as the `mass-tensor`
 * operation reports it. Energies in eV, wave vectors in 1/Angstrom
 * (Cartesian) and fractional coordinates, masses in m_e. Principal masses
 * are signed (negative at a maximum), +Inf where the response says
 * "divergent" (vanishing curvature, a conical point) and NaN where it has
 * null (a direction the data do not sample).
 */
struct _BmExtremum {
    GObject parent_instance;
    char *kind;
    double energy_ev;
    double k[3];
    double k_frac[3];
    double masses[3];
    double axes[9];
    double inv_mass[9];
    double fit_rms_ev;
    int dims;
    gboolean divergent;
    GStrv warnings;
    char *json;
};

G_DEFINE_FINAL_TYPE(BmExtremum, bm_extremum, G_TYPE_OBJECT)

static void bm_extremum_finalize(GObject *object)
{
    BmExtremum *self = BM_EXTREMUM(object);
    g_free(self->kind);
    g_strfreev(self->warnings);
    g_free(self->json);
    G_OBJECT_CLASS(bm_extremum_parent_class)->finalize(object);
}

static void bm_extremum_class_init(BmExtremumClass *klass)
{
    G_OBJECT_CLASS(klass)->finalize = bm_extremum_finalize;
}

static void bm_extremum_init(BmExtremum *self)
{
    (void)self;
}

static gboolean bad(GError **error, const char *key, const char *what)
{
    g_set_error(error, BM_ERROR, BM_ERROR_INTERNAL,
                "mass-tensor extremum: key \"%s\" must be %s", key, what);
    return FALSE;
}

/* A number; when nullable also null (NaN) and "divergent" (+Inf). */
static gboolean number(JsonNode *n, gboolean nullable, double *out)
{
    if (n && JSON_NODE_HOLDS_NULL(n) && nullable) {
        *out = NAN;
        return TRUE;
    }
    if (n && nullable && JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == G_TYPE_STRING
        && strcmp(json_node_get_string(n), "divergent") == 0) {
        *out = INFINITY;
        return TRUE;
    }
    if (!n || !JSON_NODE_HOLDS_VALUE(n))
        return FALSE;
    GType t = json_node_get_value_type(n);
    if (t != G_TYPE_DOUBLE && t != G_TYPE_INT64)
        return FALSE;
    *out = json_node_get_double(n);
    return TRUE;
}

/* n numbers from key (rows = 0), or rows x rows numbers from an array of
 * rows. When nullable, a null in place of the whole array reads as NaNs. */
static gboolean numbers(JsonObject *o, const char *key, guint n, guint rows,
                        gboolean nullable, double *out, GError **error)
{
    JsonNode *node = json_object_get_member(o, key);
    if (node && nullable && JSON_NODE_HOLDS_NULL(node)) {
        for (guint i = 0; i < (rows ? rows : 1) * n; i++)
            out[i] = NAN;
        return TRUE;
    }
    const char *what = rows ? "an array of 3 arrays of 3 numbers" : "an array of 3 numbers";
    if (!node || !JSON_NODE_HOLDS_ARRAY(node))
        return bad(error, key, what);
    JsonArray *a = json_node_get_array(node);
    if (json_array_get_length(a) != (rows ? rows : n))
        return bad(error, key, what);
    for (guint i = 0; i < (rows ? rows : 1); i++) {
        JsonArray *row = a;
        if (rows) {
            JsonNode *r = json_array_get_element(a, i);
            if (!JSON_NODE_HOLDS_ARRAY(r) || json_array_get_length(json_node_get_array(r)) != n)
                return bad(error, key, what);
            row = json_node_get_array(r);
        }
        for (guint j = 0; j < n; j++)
            if (!number(json_array_get_element(row, j), nullable, &out[i * n + j]))
                return bad(error, key, what);
    }
    return TRUE;
}

/* The one place that reads an extremum object of a saved mass-tensor response. */
static gboolean extremum_from_json(BmExtremum *self, JsonObject *o, GError **error)
{
    JsonNode *kind = json_object_get_member(o, "kind");
    if (!kind || !JSON_NODE_HOLDS_VALUE(kind) || json_node_get_value_type(kind) != G_TYPE_STRING)
        return bad(error, "kind", "a string");
    self->kind = g_strdup(json_node_get_string(kind));
    if (!number(json_object_get_member(o, "energy_ev"), FALSE, &self->energy_ev))
        return bad(error, "energy_ev", "a number");
    if (!numbers(o, "k_inv_angstrom", 3, 0, FALSE, self->k, error)
        || !numbers(o, "k_fractional", 3, 0, TRUE, self->k_frac, error)
        || !numbers(o, "principal_masses_me", 3, 0, TRUE, self->masses, error)
        || !numbers(o, "principal_axes", 3, 3, TRUE, self->axes, error)
        || !numbers(o, "inverse_mass_tensor_per_me", 3, 3, TRUE, self->inv_mass, error))
        return FALSE;
    JsonNode *dims = json_object_get_member(o, "dims");
    self->dims = 3;
    if (dims && (!JSON_NODE_HOLDS_VALUE(dims) || json_node_get_value_type(dims) != G_TYPE_INT64
                 || json_node_get_int(dims) < 1 || json_node_get_int(dims) > 3))
        return bad(error, "dims", "1, 2 or 3");
    if (dims)
        self->dims = (int)json_node_get_int(dims);
    JsonNode *divergent = json_object_get_member(o, "divergent");
    if (divergent && (!JSON_NODE_HOLDS_VALUE(divergent)
                      || json_node_get_value_type(divergent) != G_TYPE_BOOLEAN))
        return bad(error, "divergent", "true or false");
    self->divergent = divergent ? json_node_get_boolean(divergent) : FALSE;
    self->fit_rms_ev = NAN;
    JsonNode *rms = json_object_get_member(o, "fit_rms_ev");
    if (rms && !number(rms, TRUE, &self->fit_rms_ev))
        return bad(error, "fit_rms_ev", "a number");
    g_autoptr(GStrvBuilder) w = g_strv_builder_new();
    JsonNode *warnings = json_object_get_member(o, "warnings");
    if (warnings && !JSON_NODE_HOLDS_ARRAY(warnings))
        return bad(error, "warnings", "an array of strings");
    for (guint i = 0; warnings && i < json_array_get_length(json_node_get_array(warnings)); i++) {
        JsonNode *s = json_array_get_element(json_node_get_array(warnings), i);
        if (!JSON_NODE_HOLDS_VALUE(s) || json_node_get_value_type(s) != G_TYPE_STRING)
            return bad(error, "warnings", "an array of strings");
        g_strv_builder_add(w, json_node_get_string(s));
    }
    self->warnings = g_strv_builder_end(w);
    self->json = bm_json_object_to_string(o, FALSE);
    return TRUE;
}

static double finite_or_nan(double v)
{
    return isfinite(v) ? v : NAN;
}

/* The values the response would carry, without going through its text:
 * what the operation writes as null reads as NaN, "divergent" as +Inf. */
BmExtremum *bm_extremum_new_from_core(const bm_mass_tensor *t, gboolean fractional,
                                      const bm_warnings *shared_warnings)
{
    BmExtremum *self = g_object_new(BM_TYPE_EXTREMUM, NULL);
    self->kind = g_strdup(bm_mass_tensor_kind_text(t->kind));
    self->energy_ev = t->energy_ev;
    for (int i = 0; i < 3; i++) {
        self->k[i] = finite_or_nan(t->k[i]);
        self->k_frac[i] = fractional ? finite_or_nan(t->k_frac[i]) : NAN;
        switch (bm_mass_tensor_mass_state(t, i)) {
        case BM_MASS_FINITE:    self->masses[i] = t->masses[i]; break;
        case BM_MASS_DIVERGENT: self->masses[i] = INFINITY; break;
        case BM_MASS_UNSAMPLED: self->masses[i] = NAN; break;
        case BM_MASS_DEGENERATE: self->masses[i] = NAN; break;
        }
        for (int j = 0; j < 3; j++) {
            self->axes[3 * i + j] = finite_or_nan(t->axes[i][j]);
            self->inv_mass[3 * i + j] = finite_or_nan(t->inv_mass[i][j]);
        }
    }
    self->fit_rms_ev = finite_or_nan(t->fit_rms_ev);
    self->dims = t->dims;
    self->divergent = t->divergent != 0;
    g_autoptr(GStrvBuilder) w = g_strv_builder_new();
    for (size_t i = 0; shared_warnings && i < shared_warnings->count; i++)
        g_strv_builder_add(w, shared_warnings->items[i].text);
    for (size_t i = 0; i < t->warnings.count; i++)
        g_strv_builder_add(w, t->warnings.items[i].text);
    self->warnings = g_strv_builder_end(w);
    g_autoptr(JsonObject) o = bm_mass_tensor_object(t, fractional);
    self->json = bm_json_object_to_string(o, FALSE);
    return self;
}

/**
 * bm_extremum_new_from_json:
 * @json: one element of a `mass-tensor` response's "extrema" array, as JSON text
 * @error: return location for a #GError
 *
 * Reads an extremum from JSON text (for example one saved from an earlier
 * response). bm_bands_find_extrema() builds its results the same way.
 *
 * Returns: (transfer full): the extremum, or %NULL with @error set
 *   (%BM_ERROR_INVALID_INPUT for text that is not a JSON object,
 *   %BM_ERROR_INTERNAL naming the key for an object of the wrong shape)
 */
BmExtremum *bm_extremum_new_from_json(const char *json, GError **error)
{
    g_return_val_if_fail(json != NULL, NULL);
    g_autoptr(GError) parse_error = NULL;
    if (!bm_json_check_depth(json, -1, "extremum", error))
        return NULL;
    g_autoptr(JsonNode) root = json_from_string(json, &parse_error);
    if (!root || !JSON_NODE_HOLDS_OBJECT(root)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "extremum: not a JSON object%s%s", parse_error ? ": " : "",
                    parse_error ? parse_error->message : "");
        return NULL;
    }
    g_autoptr(BmExtremum) self = g_object_new(BM_TYPE_EXTREMUM, NULL);
    if (!extremum_from_json(self, json_node_get_object(root), error))
        return NULL;
    return g_steal_pointer(&self);
}

/**
 * bm_extremum_get_kind:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none): "minimum", "maximum" or "saddle"
 */
const char *bm_extremum_get_kind(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return self->kind;
}

/**
 * bm_extremum_get_energy:
 * @self: a #BmExtremum
 *
 * Returns: the band energy at the extremum, eV
 */
double bm_extremum_get_energy(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NAN);
    return self->energy_ev;
}

/**
 * bm_extremum_get_k:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none) (array fixed-size=3): the wave vector, Cartesian, 1/Angstrom
 */
const double *bm_extremum_get_k(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return self->k;
}

/**
 * bm_extremum_get_k_fractional:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none) (array fixed-size=3): the wave vector in
 *   fractional (reduced) coordinates; NaN where the response has none
 */
const double *bm_extremum_get_k_fractional(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return self->k_frac;
}

/**
 * bm_extremum_get_principal_masses:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none) (array fixed-size=3): signed principal
 *   masses, m_e, in the order of the axes; +Inf where divergent, NaN where
 *   the data do not sample the direction
 */
const double *bm_extremum_get_principal_masses(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return self->masses;
}

/**
 * bm_extremum_get_principal_axes:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none) (array fixed-size=9): three unit vectors,
 *   Cartesian, row after row (axes[3*i + j] is component j of axis i)
 */
const double *bm_extremum_get_principal_axes(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return self->axes;
}

/**
 * bm_extremum_get_inverse_mass_tensor:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none) (array fixed-size=9): the inverse mass
 *   tensor, 1/m_e, Cartesian, row-major
 */
const double *bm_extremum_get_inverse_mass_tensor(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return self->inv_mass;
}

/**
 * bm_extremum_get_fit_rms:
 * @self: a #BmExtremum
 *
 * Returns: the residual of the local fit, eV (NaN if not reported)
 */
double bm_extremum_get_fit_rms(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NAN);
    return self->fit_rms_ev;
}

/**
 * bm_extremum_get_dims:
 * @self: a #BmExtremum
 *
 * Returns: the dimensions sampled: 3, 2 for a sheet, 1 for a line cut
 */
int bm_extremum_get_dims(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), 0);
    return self->dims;
}

/**
 * bm_extremum_get_divergent:
 * @self: a #BmExtremum
 *
 * Returns: %TRUE when a direction has no finite inertial mass (vanishing
 *   curvature or a conical point)
 */
gboolean bm_extremum_get_divergent(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), FALSE);
    return self->divergent;
}

/**
 * bm_extremum_get_warnings:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none) (array zero-terminated=1): the warnings attached
 *   to this extremum (saddle, degeneracy, masses out of range, ...); from
 *   bm_bands_find_extrema() the response's own warnings come first
 */
const char *const *bm_extremum_get_warnings(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return (const char *const *)self->warnings;
}

/**
 * bm_extremum_get_json:
 * @self: a #BmExtremum
 *
 * Returns: (transfer none): the extremum's object from the response, as JSON text
 */
const char *bm_extremum_get_json(BmExtremum *self)
{
    g_return_val_if_fail(BM_IS_EXTREMUM(self), NULL);
    return self->json;
}
