/* field-input.c: "field_direction" / "field_directions" of the cyclotron
 * operations into unit vectors (the sweep's geometry is the core's). */
#include <math.h>
#include <string.h>

#include "field-input.h"
#include "bm-json.h"
#include "bm-cyclotron.h"

void bm_field_directions_clear(BmFieldDirections *f)
{
    g_free(f->dirs);
    g_free(f->angle_deg);
    memset(f, 0, sizeof *f);
}

static gboolean unit(double v[3], const char *what, GError **error)
{
    double l = sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
    if (!(l > 1e-12) || !isfinite(l)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: the field direction [%g, %g, %g] has zero length", what, v[0], v[1],
                    v[2]);
        return FALSE;
    }
    for (int i = 0; i < 3; i++)
        v[i] /= l;
    return TRUE;
}

static gboolean read_sweep(JsonObject *s, BmFieldDirections *out, GError **error)
{
    static const char *const keys[] = { "from", "to", "steps", NULL };
    const char *where = "request: key \"field_directions\"";
    if (!bm_json_only_keys(s, keys, where, error))
        return FALSE;
    double from[3], to[3];
    JsonNode *sn = json_object_get_member(s, "steps");
    if (!bm_json_vec3(s, "from", where, from, error) || !bm_json_vec3(s, "to", where, to, error))
        return FALSE;
    if (!sn || !JSON_NODE_HOLDS_VALUE(sn) || json_node_get_value_type(sn) != G_TYPE_INT64
        || json_node_get_int(sn) < 2 || json_node_get_int(sn) > BM_FIELD_SWEEP_MAX_STEPS) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: \"steps\" must be an integer from 2 to %d", where,
                    BM_FIELD_SWEEP_MAX_STEPS);
        return FALSE;
    }
    if (!unit(from, "request: field_directions.from", error)
        || !unit(to, "request: field_directions.to", error))
        return FALSE;
    out->n = (gsize)json_node_get_int(sn);
    out->dirs = g_malloc_n(out->n, sizeof(double[3]));
    out->angle_deg = g_new(double, out->n);
    bm_errbuf err = {0};
    if (bm_direction_sweep(from, to, out->n, out->dirs, out->angle_deg, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    return TRUE;
}

static gboolean read_directions(JsonObject *request, BmFieldDirections *out, GError **error);

/* On failure nothing is left allocated: the callers return at once. */
gboolean bm_field_directions_read(JsonObject *request, BmFieldDirections *out, GError **error)
{
    memset(out, 0, sizeof *out);
    if (read_directions(request, out, error))
        return TRUE;
    bm_field_directions_clear(out);
    return FALSE;
}

static gboolean read_directions(JsonObject *request, BmFieldDirections *out, GError **error)
{
    gboolean one = json_object_has_member(request, "field_direction");
    gboolean many = json_object_has_member(request, "field_directions");
    if (one == many) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"field_direction\" [x, y, z] or "
                    "\"field_directions\" (a list, or {\"from\", \"to\", \"steps\"})");
        return FALSE;
    }
    if (one) {
        out->n = 1;
        out->single = TRUE;
        out->dirs = g_malloc_n(1, sizeof(double[3]));
        return bm_json_vec3(request, "field_direction", NULL, out->dirs[0], error)
            && unit(out->dirs[0], "request: key \"field_direction\"", error);
    }
    JsonNode *node = json_object_get_member(request, "field_directions");
    if (JSON_NODE_HOLDS_OBJECT(node))
        return read_sweep(json_node_get_object(node), out, error);
    JsonArray *a = json_node_get_array(node);
    out->n = json_array_get_length(a);
    if (out->n == 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"field_directions\" is empty");
        return FALSE;
    }
    out->dirs = g_malloc_n(out->n, sizeof(double[3]));
    for (gsize i = 0; i < out->n; i++) {
        g_autofree char *what = g_strdup_printf("request: field_directions[%zu]", (size_t)i);
        JsonNode *e = json_array_get_element(a, (guint)i);
        JsonArray *v = JSON_NODE_HOLDS_ARRAY(e) ? json_node_get_array(e) : NULL;
        gboolean ok = v && json_array_get_length(v) == 3;
        for (guint k = 0; ok && k < 3; k++) {
            JsonNode *c = json_array_get_element(v, k);
            GType t = JSON_NODE_HOLDS_VALUE(c) ? json_node_get_value_type(c) : G_TYPE_INVALID;
            ok = t == G_TYPE_DOUBLE || t == G_TYPE_INT64;
            if (ok)
                out->dirs[i][k] = json_node_get_double(c);
            ok = ok && isfinite(out->dirs[i][k]);
        }
        if (!ok) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s must be an array of 3 finite numbers", what);
            return FALSE;
        }
        if (!unit(out->dirs[i], what, error))
            return FALSE;
    }
    return TRUE;
}

JsonObject *bm_field_point_new(const BmFieldDirections *f, gsize i)
{
    JsonObject *p = json_object_new();
    bm_json_set_vec3(p, "field_direction", f->dirs[i]);
    if (f->angle_deg)
        bm_json_set_number(p, "angle_deg", f->angle_deg[i]);
    return p;
}
