/* band-grid.c: reader for the band grid document, format "bandmass-grid-1".
 *
 * The document is a JSON object:
 *   "format": "bandmass-grid-1"                       (required)
 *   "reciprocal_vectors_inv_angstrom": [b1, b2, b3]    rows, 1/Angstrom, 2 pi included
 *   or "lattice_vectors_angstrom": [a1, a2, a3]        rows, Angstrom; then
 *                                                      b = 2 pi A^-T (b_i . a_j = 2 pi d_ij)
 *                                                      (exactly one of the two)
 *   "mesh": [n1, n2, n3]                               positive integers; n3 = 1 for 2D.
 *        Point (i, j, l) sits at k = (i/n1) b1 + (j/n2) b2 + (l/n3) b3: a uniform
 *        periodic mesh over the whole cell, Gamma at (0, 0, 0).
 *   "energies_ev": either an inline nested array [band][i][j][l] of finite
 *        numbers (eV), or a string: the name of a NumPy .npy file (relative to
 *        the document's folder, or absolute) holding a float64 array of shape
 *        (nbands, n1, n2, n3) in C order, little or big endian.
 *   "band_names": ["vb", "cb", ...]                    optional, one distinct
 *        string per band.
 *   "comment", "description": any value, ignored.
 * Any other key is rejected (it is most likely a misspelling). JSON has no
 * NaN or Infinity; numbers that overflow to infinity are rejected. The
 * values of a .npy file are not scanned here (that would cost a pass over
 * all bands): the core checks every band it is asked to use
 * (bm_grid_validate, and each grid operation for its band) and names the
 * band and mesh index of a non-finite value. */
#include "band-grid.h"
#include "npy.h"
#include "bm-error-private.h"
#include "bm-linalg.h"
#include "bm-crystal.h"
#include "bm-json.h"

#include <gsl/gsl_const_mksa.h>

#include <math.h>
#include <string.h>
#include <json-glib/json-glib.h>

#define GRID_FORMAT "bandmass-grid-1"

void bm_band_grid_free(BmBandGrid *grid)
{
    if (!grid)
        return;
    g_strfreev(grid->band_names);
    g_free(grid->source);
    g_free(grid->inline_energies);
    bm_npy_array_free(grid->array);
    bm_warnings_clear(&grid->warnings);
    g_free(grid);
}

gboolean bm_band_grid_unchanged(const BmBandGrid *grid, GError **error)
{
    return !grid || bm_npy_array_unchanged(grid->array, error);
}

gboolean bm_band_grid_detach(BmBandGrid *grid, GError **error)
{
    if (!grid || !grid->array)
        return TRUE;
    if (!bm_npy_array_detach(grid->array, error))
        return FALSE;
    grid->grid.energies = grid->array->data;
    return TRUE;
}

static const char *node_kind(JsonNode *node)
{
    switch (JSON_NODE_TYPE(node)) {
    case JSON_NODE_OBJECT: return "an object";
    case JSON_NODE_ARRAY:  return "an array";
    case JSON_NODE_NULL:   return "null";
    case JSON_NODE_VALUE:
    default: {
        GType t = json_node_get_value_type(node);
        if (t == G_TYPE_BOOLEAN) return "a boolean";
        if (t == G_TYPE_STRING)  return "a string";
        return "a number";
    }
    }
}

static gboolean node_is_number(JsonNode *node)
{
    if (JSON_NODE_TYPE(node) != JSON_NODE_VALUE)
        return FALSE;
    GType t = json_node_get_value_type(node);
    return t == G_TYPE_INT64 || t == G_TYPE_DOUBLE;
}

/* A finite number; what names the place (e.g. "mesh[1]"). */
static gboolean get_number(JsonNode *node, const char *name, const char *what,
                           double *out, GError **error)
{
    if (!node_is_number(node))
        return bm_error_invalid(error, name, "%s: expected a number, found %s", what, node_kind(node));
    double v = json_node_get_double(node);
    if (!isfinite(v))
        return bm_error_invalid(error, name, "%s: the number is not finite (out of range)", what);
    *out = v;
    return TRUE;
}

static gboolean get_matrix3(JsonNode *node, const char *name, const char *key,
                            double m[3][3], GError **error)
{
    if (JSON_NODE_TYPE(node) != JSON_NODE_ARRAY)
        return bm_error_invalid(error, name, "'%s': expected an array of 3 rows of 3 numbers, found %s",
                       key, node_kind(node));
    JsonArray *rows = json_node_get_array(node);
    if (json_array_get_length(rows) != 3)
        return bm_error_invalid(error, name, "'%s': expected 3 rows, found %u", key,
                       json_array_get_length(rows));
    for (guint i = 0; i < 3; i++) {
        JsonNode *row = json_array_get_element(rows, i);
        if (JSON_NODE_TYPE(row) != JSON_NODE_ARRAY ||
            json_array_get_length(json_node_get_array(row)) != 3)
            return bm_error_invalid(error, name, "'%s'[%u]: expected a row of 3 numbers", key, i);
        for (guint j = 0; j < 3; j++) {
            char what[128];
            g_snprintf(what, sizeof what, "'%s'[%u][%u]", key, i, j);
            if (!get_number(json_array_get_element(json_node_get_array(row), j),
                            name, what, &m[i][j], error))
                return FALSE;
        }
    }
    return TRUE;
}

/* |det| small against the product of row lengths: singular or nearly so. */
static gboolean singular3(double m[3][3], double *det)
{
    *det = bm_det3(m);
    double scale = bm_norm3(m[0]) * bm_norm3(m[1]) * bm_norm3(m[2]);
    return !(scale > 0.0) || !isfinite(*det) || fabs(*det) <= 1e-10 * scale;
}

static gboolean get_mesh(JsonNode *node, const char *name, size_t mesh[3], GError **error)
{
    if (JSON_NODE_TYPE(node) != JSON_NODE_ARRAY ||
        json_array_get_length(json_node_get_array(node)) != 3)
        return bm_error_invalid(error, name, "'mesh': expected an array of 3 positive integers [n1, n2, n3]");
    JsonArray *a = json_node_get_array(node);
    for (guint i = 0; i < 3; i++) {
        JsonNode *e = json_array_get_element(a, i);
        if (JSON_NODE_TYPE(e) != JSON_NODE_VALUE || json_node_get_value_type(e) != G_TYPE_INT64)
            return bm_error_invalid(error, name, "'mesh'[%u]: expected a positive integer, found %s",
                           i, node_kind(e));
        gint64 v = json_node_get_int(e);
        if (v < 1 || v > (gint64)1 << 24)
            return bm_error_invalid(error, name, "'mesh'[%u]: expected a positive integer (at most 2^24), "
                           "found %" G_GINT64_FORMAT, i, v);
        mesh[i] = (size_t)v;
    }
    return TRUE;
}

static gboolean checked_count(const char *name, size_t nbands, const size_t mesh[3],
                              size_t *count, GError **error)
{
    size_t c = nbands;
    for (int i = 0; i < 3; i++) {
        if (c > G_MAXSIZE / sizeof(double) / mesh[i])
            return bm_error_invalid(error, name, "%zu bands on a %zu x %zu x %zu mesh is too large",
                           nbands, mesh[0], mesh[1], mesh[2]);
        c *= mesh[i];
    }
    *count = c;
    return TRUE;
}

/* Inline [band][i][j][l]; checks every level's length against the mesh. */
static gboolean read_inline(JsonArray *bands, const char *name, const char *key,
                            const size_t mesh[3], BmBandGrid *g, GError **error)
{
    size_t nb = json_array_get_length(bands);
    if (nb == 0)
        return bm_error_invalid(error, name, "'%s' is empty; expected [band][i][j][l]", key);
    size_t count = 0;
    if (!checked_count(name, nb, mesh, &count, error))
        return FALSE;
    g->inline_energies = g_try_new(double, count);
    if (!g->inline_energies)
        return bm_error_invalid(error, name, "cannot allocate %zu energies", count);
    static const char *level_name[4] = { "band", "n1", "n2", "n3" };
    size_t idx[4] = { 0 };
    size_t len[4] = { nb, mesh[0], mesh[1], mesh[2] };
    JsonArray *stack[4] = { bands, NULL, NULL, NULL };
    size_t out = 0;
    /* iterative walk over the 4 levels */
    int depth = 0;
    for (;;) {
        if (idx[depth] == len[depth]) {
            if (depth == 0)
                break;
            depth--;
            idx[depth]++;
            continue;
        }
        JsonNode *e = json_array_get_element(stack[depth], (guint)idx[depth]);
        GString *path = NULL;
        if (depth < 3) {
            if (JSON_NODE_TYPE(e) != JSON_NODE_ARRAY ||
                json_array_get_length(json_node_get_array(e)) != len[depth + 1]) {
                path = g_string_new(NULL);
                g_string_printf(path, "'%s'", key);
                for (int d = 0; d <= depth; d++)
                    g_string_append_printf(path, "[%zu]", idx[d]);
                gboolean arr = JSON_NODE_TYPE(e) == JSON_NODE_ARRAY;
                if (arr)
                    bm_error_invalid(error, name, "%s: expected %zu entries (%s = %zu), found %u; "
                            "nesting is [band][i][j][l] on the mesh", path->str,
                            len[depth + 1], level_name[depth + 1], len[depth + 1],
                            json_array_get_length(json_node_get_array(e)));
                else
                    bm_error_invalid(error, name, "%s: expected an array of %zu entries, found %s; "
                            "nesting is [band][i][j][l] (4 levels)", path->str,
                            len[depth + 1], node_kind(e));
                g_string_free(path, TRUE);
                return FALSE;
            }
            stack[depth + 1] = json_node_get_array(e);
            depth++;
            idx[depth] = 0;
            continue;
        }
        if (!node_is_number(e) || !isfinite(json_node_get_double(e))) {
            path = g_string_new(NULL);
            g_string_printf(path, "'%s'", key);
            for (int d = 0; d <= 3; d++)
                g_string_append_printf(path, "[%zu]", idx[d]);
            if (node_is_number(e))
                bm_error_invalid(error, name, "%s: the number is not finite (out of range)", path->str);
            else
                bm_error_invalid(error, name, "%s: expected a number (eV), found %s%s", path->str,
                        node_kind(e), JSON_NODE_TYPE(e) == JSON_NODE_ARRAY
                        ? "; nesting is [band][i][j][l] (4 levels)" : "");
            g_string_free(path, TRUE);
            return FALSE;
        }
        g->inline_energies[out++] = json_node_get_double(e);
        idx[depth]++;
    }
    g->grid.nbands = nb;
    return TRUE;
}

static gboolean read_npy(const char *file, const char *name, const char *key,
                         const char *base_dir, const size_t mesh[3], BmBandGrid *g,
                         GError **error)
{
    if (!*file)
        return bm_error_invalid(error, name, "'%s' is an empty file name", key);
    g_autofree char *path = g_path_is_absolute(file) || !base_dir
        ? g_strdup(file) : g_build_filename(base_dir, file, NULL);
    GError *local = NULL;
    g_autoptr(BmNpyArray) arr = bm_npy_read_f64(path, &local);
    if (!arr) {
        g_set_error(error, BM_ERROR, local->code, "%s: '%s': %s", name, key, local->message);
        g_error_free(local);
        return FALSE;
    }
    if (arr->ndim != 4 || arr->shape[1] != mesh[0] || arr->shape[2] != mesh[1] ||
        arr->shape[3] != mesh[2] || arr->shape[0] == 0) {
        g_autofree char *s = bm_npy_shape_string(arr->shape, arr->ndim);
        return bm_error_invalid(error, name, "'mesh' [%zu, %zu, %zu] disagrees with the shape %s of "
                       "'%s' file %s; expected (nbands, %zu, %zu, %zu) with nbands >= 1",
                       mesh[0], mesh[1], mesh[2], s, key, path, mesh[0], mesh[1], mesh[2]);
    }
    g->grid.nbands = arr->shape[0];
    g->grid.energies = arr->data;   /* take the array over: no copy */
    g->array = g_steal_pointer(&arr);
    return TRUE;
}

static gboolean read_names(JsonNode *node, const char *name, BmBandGrid *g, GError **error)
{
    if (JSON_NODE_TYPE(node) != JSON_NODE_ARRAY)
        return bm_error_invalid(error, name, "'band_names': expected an array of strings, found %s",
                       node_kind(node));
    JsonArray *a = json_node_get_array(node);
    if (json_array_get_length(a) != g->grid.nbands)
        return bm_error_invalid(error, name, "'band_names' has %u names but the energies have %zu bands",
                       json_array_get_length(a), g->grid.nbands);
    g->band_names = g_new0(char *, g->grid.nbands + 1);
    for (guint i = 0; i < g->grid.nbands; i++) {
        JsonNode *e = json_array_get_element(a, i);
        if (JSON_NODE_TYPE(e) != JSON_NODE_VALUE || json_node_get_value_type(e) != G_TYPE_STRING)
            return bm_error_invalid(error, name, "'band_names'[%u]: expected a string, found %s",
                           i, node_kind(e));
        const char *s = json_node_get_string(e);
        if (!*s)
            return bm_error_invalid(error, name, "'band_names'[%u] is empty", i);
        for (guint k = 0; k < i; k++)
            if (strcmp(g->band_names[k], s) == 0)
                return bm_error_invalid(error, name, "'band_names'[%u] repeats the name '%s' of band %u",
                               i, s, k);
        g->band_names[i] = g_strdup(s);
    }
    return TRUE;
}

/* "mesh_offset": [o1, o2, o3] in mesh steps, each in [0, 1). */
static gboolean get_offset(JsonNode *node, const char *name, double off[3], GError **error)
{
    if (JSON_NODE_TYPE(node) != JSON_NODE_ARRAY
        || json_array_get_length(json_node_get_array(node)) != 3)
        return bm_error_invalid(error, name, "'mesh_offset': expected [o1, o2, o3] in mesh "
                                "steps (0.5 on an axis of an even Monkhorst-Pack mesh)");
    for (guint i = 0; i < 3; i++) {
        g_autofree char *what = g_strdup_printf("'mesh_offset'[%u]", i);
        if (!get_number(json_array_get_element(json_node_get_array(node), i), name, what,
                        &off[i], error))
            return FALSE;
        if (off[i] < 0.0 || off[i] >= 1.0)
            return bm_error_invalid(error, name, "%s = %g: expected a shift of 0 <= o < 1 mesh "
                                    "steps", what, off[i]);
    }
    return TRUE;
}

/* "k_points_fractional" with energies [band][point] (inline, or a .npy of shape
 * (nbands, npoints)): every point is placed on the mesh by its index, whatever
 * the order or the (-1/2, 1/2] convention of the list; each mesh point must
 * come exactly once. */
/* "positions_fractional" and "species": the crystal's rotations (spglib), to
 * unfold an irreducible wedge of k-points; and the nearest-neighbour distance
 * as a check of the length unit. lattice: rows in Angstrom, or NULL to take
 * them from the reciprocal vectors. */
static gboolean crystal_symmetry(JsonObject *o, const char *name, double lattice[3][3],
                                 BmBandGrid *g, int rot[BM_CRYSTAL_MAX_ROTATIONS][3][3],
                                 size_t *nrot, GError **error)
{
    JsonNode *pn = json_object_get_member(o, "positions_fractional");
    JsonNode *sn = json_object_get_member(o, "species");
    if (JSON_NODE_TYPE(pn) != JSON_NODE_ARRAY || !sn || JSON_NODE_TYPE(sn) != JSON_NODE_ARRAY
        || json_array_get_length(json_node_get_array(pn))
           != json_array_get_length(json_node_get_array(sn))
        || json_array_get_length(json_node_get_array(pn)) == 0)
        return bm_error_invalid(error, name, "'positions_fractional' (a list of [x, y, z]) and "
                                "'species' (one name or number per atom) go together, with one "
                                "entry per atom");
    JsonArray *pa = json_node_get_array(pn), *sa = json_node_get_array(sn);
    size_t na = json_array_get_length(pa);
    g_autofree double (*pos)[3] = g_malloc(na * sizeof *pos);
    g_autofree int *types = g_new(int, na);
    for (size_t i = 0; i < na; i++) {
        JsonNode *e = json_array_get_element(pa, (guint)i);
        if (JSON_NODE_TYPE(e) != JSON_NODE_ARRAY || json_array_get_length(json_node_get_array(e)) != 3)
            return bm_error_invalid(error, name, "'positions_fractional'[%zu]: expected [x, y, z]", i);
        for (int a = 0; a < 3; a++) {
            g_autofree char *what = g_strdup_printf("'positions_fractional'[%zu][%d]", i, a);
            if (!get_number(json_array_get_element(json_node_get_array(e), (guint)a), name, what,
                            &pos[i][a], error))
                return FALSE;
        }
        JsonNode *s = json_array_get_element(sa, (guint)i);
        if (JSON_NODE_TYPE(s) != JSON_NODE_VALUE)
            return bm_error_invalid(error, name, "'species'[%zu]: expected a name or a number", i);
        g_autofree char *label = json_node_get_value_type(s) == G_TYPE_STRING
            ? g_strdup(json_node_get_string(s)) : g_strdup_printf("%g", json_node_get_double(s));
        types[i] = (int)i;
        for (size_t j = 0; j < i; j++) {
            JsonNode *t = json_array_get_element(sa, (guint)j);
            g_autofree char *other = json_node_get_value_type(t) == G_TYPE_STRING
                ? g_strdup(json_node_get_string(t)) : g_strdup_printf("%g", json_node_get_double(t));
            if (!strcmp(label, other)) {
                types[i] = types[j];
                break;
            }
        }
    }
    double a[3][3];
    if (lattice)
        memcpy(a, lattice, sizeof a);
    else
        bm_reciprocal3(g->grid.recip, a);   /* A = 2 pi B^-T, the same map both ways */
    bm_errbuf err = { 0 };
    if (bm_crystal_rotations(a, (const double (*)[3])pos, types, na, 1e-4, rot, nrot, &err)
        != BM_OK) {
        bm_error_from_core(error, &err, name);
        return FALSE;
    }
    double nn = bm_crystal_nearest_neighbour(a, (const double (*)[3])pos, na);
    if (nn < 0.7 || nn > 4.5)
        bm_warn(&g->warnings, BM_WARN_UNIT_SUSPECT, "the nearest atoms are %.3g Angstrom apart "
                "(bonds are 0.7 to 4.5 Angstrom): %s", nn, nn > 4.5
                ? "if the lattice is in bohr, name it 'lattice_vectors_bohr'"
                : "are the positions fractional, and the lattice in Angstrom?");
    return TRUE;
}

/* The mesh index of fractional f, or FALSE when f is not a mesh point. */
static gboolean mesh_index(const BmBandGrid *g, const double f[3], size_t idx[3], int *bad_axis,
                           double *off_by)
{
    const size_t *n = g->grid.mesh;
    for (int a = 0; a < 3; a++) {
        double x = f[a] * (double)n[a] - g->grid.offset[a];
        double r = nearbyint(x);
        /* a point more than a thousand zones out is no mesh point of this
         * grid (and would overflow an integer index) */
        if (fabs(x - r) > 1e-6 || !(fabs(f[a]) <= 1e3)) {
            *bad_axis = a;
            *off_by = fabs(f[a]) <= 1e3 ? x - r : NAN;   /* NAN: beyond the domain */
            return FALSE;
        }
        double m = fmod(r, (double)n[a]);   /* exact for any finite r */
        idx[a] = (size_t)(m < 0.0 ? m + (double)n[a] : m);
    }
    return TRUE;
}

static gboolean place_points(JsonArray *kl, JsonNode *en, const char *name, const char *key,
                             const char *base_dir, const int (*rot)[3][3], size_t nrot,
                             BmBandGrid *g, GError **error)
{
    const size_t *n = g->grid.mesh;
    size_t npt = 0, nk = json_array_get_length(kl);
    if (!checked_count(name, 1, n, &npt, error))
        return FALSE;
    if (nrot == 0 && nk != npt)
        return bm_error_invalid(error, name, "'k_points_fractional' lists %zu points; the "
                                "%zu x %zu x %zu mesh has %zu (give 'positions_fractional' and "
                                "'species' to unfold an irreducible wedge)", nk, n[0], n[1], n[2],
                                npt);
    if (nk > npt)
        return bm_error_invalid(error, name, "'k_points_fractional' lists %zu points; the "
                                "%zu x %zu x %zu mesh has only %zu", nk, n[0], n[1], n[2], npt);
    /* energies [band][point] */
    g_autoptr(BmNpyArray) arr = NULL;
    g_autofree double *inl = NULL;
    const double *src;
    size_t nb;
    if (JSON_NODE_TYPE(en) == JSON_NODE_VALUE && json_node_get_value_type(en) == G_TYPE_STRING) {
        g_autofree char *path = g_path_is_absolute(json_node_get_string(en)) || !base_dir
            ? g_strdup(json_node_get_string(en))
            : g_build_filename(base_dir, json_node_get_string(en), NULL);
        GError *local = NULL;
        arr = bm_npy_read_f64(path, &local);
        if (!arr) {
            g_set_error(error, BM_ERROR, local->code, "%s: '%s': %s", name, key, local->message);
            g_error_free(local);
            return FALSE;
        }
        if (arr->ndim != 2 || arr->shape[1] != nk || arr->shape[0] == 0) {
            g_autofree char *sh = bm_npy_shape_string(arr->shape, arr->ndim);
            return bm_error_invalid(error, name, "'%s' file %s has shape %s; with "
                                    "'k_points_fractional' expected (nbands, %zu)", key, path,
                                    sh, nk);
        }
        nb = arr->shape[0];
        src = arr->data;
    } else if (JSON_NODE_TYPE(en) == JSON_NODE_ARRAY) {
        JsonArray *ba = json_node_get_array(en);
        nb = json_array_get_length(ba);
        if (nb == 0)
            return bm_error_invalid(error, name, "'%s' is empty; expected [band][point]", key);
        inl = nb <= G_MAXSIZE / sizeof(double) / (nk ? nk : 1)
            ? g_try_new(double, nb * nk) : NULL;
        if (!inl)
            return bm_error_invalid(error, name, "cannot allocate %zu x %zu energies", nb, nk);
        for (size_t b = 0; b < nb; b++) {
            JsonNode *row = json_array_get_element(ba, (guint)b);
            if (JSON_NODE_TYPE(row) != JSON_NODE_ARRAY
                || json_array_get_length(json_node_get_array(row)) != nk)
                return bm_error_invalid(error, name, "'%s'[%zu]: expected %zu energies, one "
                                        "per listed k-point", key, b, nk);
            for (size_t q = 0; q < nk; q++) {
                g_autofree char *what = g_strdup_printf("'%s'[%zu][%zu]", key, b, q);
                if (!get_number(json_array_get_element(json_node_get_array(row), (guint)q),
                                name, what, &inl[b * nk + q], error))
                    return FALSE;
            }
        }
        src = inl;
    } else {
        return bm_error_invalid(error, name, "'%s': expected [band][point] or a .npy file name, "
                                "found %s", key, node_kind(en));
    }
    size_t count = 0;
    if (!checked_count(name, nb, n, &count, error))
        return FALSE;
    /* sizes from the mesh, not from the data given: tried, never assumed */
    g->inline_energies = g_try_new(double, count);
    g_autofree gint64 *from = g_try_new(gint64, npt);
    g_autofree char *listed = g_try_new0(char, npt);
    if (!g->inline_energies || !from || !listed)
        return bm_error_invalid(error, name, "cannot allocate the %zu x %zu x %zu mesh of %zu "
                                "bands (%zu bytes of energies)", n[0], n[1], n[2], nb,
                                count * sizeof(double));
    for (size_t p = 0; p < npt; p++)
        from[p] = -1;
    for (size_t q = 0; q < nk; q++) {
        JsonNode *kn = json_array_get_element(kl, (guint)q);
        if (JSON_NODE_TYPE(kn) != JSON_NODE_ARRAY || json_array_get_length(json_node_get_array(kn)) != 3)
            return bm_error_invalid(error, name, "'k_points_fractional'[%zu]: expected [f1, f2, f3]", q);
        size_t idx[3];
        double f[3], off_by = 0.0;
        int bad = 0;
        for (int a = 0; a < 3; a++) {
            g_autofree char *what = g_strdup_printf("'k_points_fractional'[%zu][%d]", q, a);
            if (!get_number(json_array_get_element(json_node_get_array(kn), (guint)a), name, what,
                            &f[a], error))
                return FALSE;
        }
        if (!mesh_index(g, f, idx, &bad, &off_by) && isnan(off_by))
            return bm_error_invalid(error, name, "'k_points_fractional'[%zu] = (%g, %g, %g): "
                                    "component %d lies beyond 1000 reciprocal-lattice vectors "
                                    "(fractional coordinates of a mesh point are within a few "
                                    "zones)", q, f[0], f[1], f[2], bad + 1);
        if (!mesh_index(g, f, idx, &bad, &off_by))
            return bm_error_invalid(error, name, "'k_points_fractional'[%zu] = (%g, %g, %g) "
                                    "is not a point of the %zu x %zu x %zu mesh (offset "
                                    "%g, %g, %g steps): component %d sits %.3g steps off",
                                    q, f[0], f[1], f[2], n[0], n[1], n[2],
                                    g->grid.offset[0], g->grid.offset[1], g->grid.offset[2],
                                    bad + 1, off_by);
        size_t p = (idx[0] * n[1] + idx[1]) * n[2] + idx[2];
        if (from[p] >= 0 && listed[p])
            return bm_error_invalid(error, name, "'k_points_fractional'[%" G_GINT64_FORMAT "] and "
                                    "[%zu] are the same mesh point (%zu, %zu, %zu)", from[p], q,
                                    idx[0], idx[1], idx[2]);
        listed[p] = 1;
        /* the point and its images under the crystal's rotations and time
         * reversal: f' = f W (reciprocal fractional coordinates) and -f W */
        for (size_t o = 0; o < (nrot ? nrot : 1); o++)
            for (int tr = 1; tr >= (nrot ? -1 : 1); tr -= 2) {
                double fi[3];
                size_t ii[3];
                for (int j = 0; j < 3; j++)
                    fi[j] = nrot ? tr * (f[0] * rot[o][0][j] + f[1] * rot[o][1][j]
                                         + f[2] * rot[o][2][j]) : f[j];
                if (!mesh_index(g, fi, ii, &bad, &off_by))
                    continue;   /* a shifted mesh need not hold every image */
                size_t pi = (ii[0] * n[1] + ii[1]) * n[2] + ii[2];
                if (from[pi] >= 0) {
                    for (size_t b = 0; b < nb; b++)
                        if (fabs(g->inline_energies[b * npt + pi] - src[b * nk + q]) > 1e-4)
                            return bm_error_invalid(error, name, "band %zu disagrees by %.3g eV "
                                "between 'k_points_fractional'[%" G_GINT64_FORMAT "] and an image "
                                "of [%zu] at mesh point (%zu, %zu, %zu): the positions and "
                                "species give a symmetry the calculation does not have", b,
                                fabs(g->inline_energies[b * npt + pi] - src[b * nk + q]),
                                from[pi], q, ii[0], ii[1], ii[2]);
                    continue;
                }
                from[pi] = (gint64)q;
                for (size_t b = 0; b < nb; b++)
                    g->inline_energies[b * npt + pi] = src[b * nk + q];
            }
    }
    for (size_t p = 0; p < npt; p++)
        if (from[p] < 0) {
            size_t filled = 0;
            for (size_t r = 0; r < npt; r++)
                filled += from[r] >= 0;
            return bm_error_invalid(error, name, "the k-points%s cover %zu of the %zu mesh points "
                                    "(first missing: (%zu, %zu, %zu)): not a complete mesh%s",
                                    nrot ? " and their images" : "", filled, npt,
                                    p / (n[1] * n[2]), (p / n[2]) % n[1], p % n[2],
                                    nrot ? ", or not an irreducible wedge of it" : "");
        }
    g->grid.nbands = nb;
    g->grid.energies = g->inline_energies;
    return TRUE;
}

/* A key that carries its unit, and the factor to the interface unit. */
typedef struct {
    const char *key;
    double factor;
} unit_key;

/* Bohr radius in Angstrom and the hartree in eV, from GSL's CODATA values. */
#define BOHR_A (GSL_CONST_MKSA_BOHR_RADIUS * 1e10)
#define HARTREE_EV (2.0 * GSL_CONST_MKSA_RYDBERG / GSL_CONST_MKSA_ELECTRON_VOLT)

/* The one key of a family present in o (NULL for none); two is an error. */
static gboolean pick_unit(JsonObject *o, const char *name, const unit_key *keys, size_t n,
                          const unit_key **out, GError **error)
{
    *out = NULL;
    for (size_t i = 0; i < n; i++) {
        if (!json_object_has_member(o, keys[i].key))
            continue;
        if (*out)
            return bm_error_invalid(error, name, "give either '%s' or '%s', not both (one "
                           "quantity, one unit)", (*out)->key, keys[i].key);
        *out = &keys[i];
    }
    return TRUE;
}

static void scale3(double m[3][3], double f)
{
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            m[i][j] *= f;
}

/* Lattice and reciprocal vectors given together must satisfy a_i . b_j =
 * 2 pi delta_ij; the common slip, reciprocal vectors without the 2 pi, is
 * named as such. */
static gboolean lattice_matches(double a[3][3], double b[3][3], const char *name,
                                const char *lkey, const char *rkey, GError **error)
{
    double dev = 0.0, dev_no2pi = 0.0;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double d = a[i][0] * b[j][0] + a[i][1] * b[j][1] + a[i][2] * b[j][2];
            dev = fmax(dev, fabs(d - (i == j ? 2.0 * G_PI : 0.0)));
            dev_no2pi = fmax(dev_no2pi, fabs(d - (i == j ? 1.0 : 0.0)));
        }
    if (dev <= 1e-4 * 2.0 * G_PI)
        return TRUE;
    if (dev_no2pi <= 1e-4)
        return bm_error_invalid(error, name, "'%s' lack the factor 2 pi: a_i . b_j = delta_ij "
                       "with '%s', where the format expects 2 pi delta_ij (multiply them by 2 pi)",
                       rkey, lkey);
    return bm_error_invalid(error, name, "'%s' and '%s' do not belong together: a_i . b_j "
                   "differs from 2 pi delta_ij by up to %.3g (check both, and their units)",
                   lkey, rkey, dev);
}

/* Energies in another unit are scaled to eV into storage of the grid's own. */
static gboolean to_ev(BmBandGrid *g, double factor, const char *name, GError **error)
{
    size_t count = 0;
    if (!checked_count(name, g->grid.nbands, g->grid.mesh, &count, error))
        return FALSE;
    double *e = g->inline_energies ? g->inline_energies : g_try_new(double, count);
    if (!e)
        return bm_error_invalid(error, name, "out of memory converting %zu energies to eV", count);
    for (size_t i = 0; i < count; i++)
        e[i] = g->grid.energies[i] * factor;
    g->inline_energies = e;
    g->grid.energies = e;
    g_clear_pointer(&g->array, bm_npy_array_free);
    return TRUE;
}

/* Energies given in eV that span less than 1.5 eV over four or more bands
 * look like hartree (a sampled check: every value is not read). */
static void energy_scale_check(BmBandGrid *g, const unit_key *ek)
{
    size_t npt = g->grid.mesh[0] * g->grid.mesh[1] * g->grid.mesh[2];
    size_t count = npt * g->grid.nbands, stride = count > 100000 ? count / 100000 : 1;
    if (ek->factor != 1.0 || g->grid.nbands < 4)
        return;
    double lo = INFINITY, hi = -INFINITY;
    for (size_t i = 0; i < count; i += stride) {
        lo = fmin(lo, g->grid.energies[i]);
        hi = fmax(hi, g->grid.energies[i]);
    }
    if (hi - lo < 1.5)
        bm_warn(&g->warnings, BM_WARN_UNIT_SUSPECT, "the energies of %zu bands span only %.3g eV: "
                "if they are in hartree or rydberg, name them 'energies_hartree' or "
                "'energies_rydberg' (masses would otherwise be 27 or 14 times too large)",
                g->grid.nbands, hi - lo);
}

static gboolean parse_document(JsonNode *root, const char *name, const char *base_dir,
                               BmBandGrid *g, GError **error)
{
    static const char *known[] = {
        "format", "reciprocal_vectors_inv_angstrom", "reciprocal_vectors_inv_bohr",
        "lattice_vectors_angstrom", "lattice_vectors_bohr", "mesh", "energies_ev",
        "energies_hartree", "energies_rydberg", "band_names", "comment", "description",
        "mesh_offset", "k_points_fractional", "spin_channels", "positions_fractional",
        "species", NULL
    };
    /* each quantity in one unit, the unit in the key: the factor to eV / Angstrom */
    static const unit_key recip_keys[] = {
        { "reciprocal_vectors_inv_angstrom", 1.0 }, { "reciprocal_vectors_inv_bohr", 1.0 / BOHR_A },
    };
    static const unit_key latt_keys[] = {
        { "lattice_vectors_angstrom", 1.0 }, { "lattice_vectors_bohr", BOHR_A },
    };
    static const unit_key energy_keys[] = {
        { "energies_ev", 1.0 }, { "energies_hartree", HARTREE_EV },
        { "energies_rydberg", 0.5 * HARTREE_EV },
    };
    if (JSON_NODE_TYPE(root) != JSON_NODE_OBJECT)
        return bm_error_invalid(error, name, "expected a JSON object (a band grid document), found %s",
                       node_kind(root));
    JsonObject *o = json_node_get_object(root);

    JsonNode *fmt = json_object_get_member(o, "format");
    if (!fmt)
        return bm_error_invalid(error, name, "missing key 'format' (expected \"" GRID_FORMAT "\")");
    if (JSON_NODE_TYPE(fmt) != JSON_NODE_VALUE || json_node_get_value_type(fmt) != G_TYPE_STRING)
        return bm_error_invalid(error, name, "'format': expected the string \"" GRID_FORMAT "\", found %s",
                       node_kind(fmt));
    if (strcmp(json_node_get_string(fmt), GRID_FORMAT) != 0)
        return bm_error_invalid(error, name, "unknown 'format' \"%s\" (expected \"" GRID_FORMAT "\")",
                       json_node_get_string(fmt));

    g_autoptr(GList) members = json_object_get_members(o);
    for (GList *m = members; m; m = m->next)
        if (!g_strv_contains(known, m->data))
            return bm_error_invalid(error, name, "unknown key '%s' (a band grid document takes 'format', "
                           "'reciprocal_vectors_inv_angstrom' / '_inv_bohr' and/or "
                           "'lattice_vectors_angstrom' / '_bohr', 'mesh', 'energies_ev' / "
                           "'_hartree' / '_rydberg', 'mesh_offset', 'k_points_fractional', "
                           "'spin_channels', 'positions_fractional', 'species', 'band_names')",
                           (const char *)m->data);

    const unit_key *rk, *lk, *ek;
    if (!pick_unit(o, name, recip_keys, G_N_ELEMENTS(recip_keys), &rk, error)
        || !pick_unit(o, name, latt_keys, G_N_ELEMENTS(latt_keys), &lk, error)
        || !pick_unit(o, name, energy_keys, G_N_ELEMENTS(energy_keys), &ek, error))
        return FALSE;
    if (!rk && !lk)
        return bm_error_invalid(error, name, "missing key 'reciprocal_vectors_inv_angstrom' "
                       "(or 'lattice_vectors_angstrom', or their _bohr forms)");
    double det, a[3][3];
    if (lk) {
        if (!get_matrix3(json_object_get_member(o, lk->key), name, lk->key, a, error))
            return FALSE;
        scale3(a, lk->factor);
        if (singular3(a, &det) || bm_reciprocal3(a, g->grid.recip) != 0)
            return bm_error_invalid(error, name, "'%s' is singular (determinant %g Angstrom^3): "
                           "a1, a2, a3 must be linearly independent", lk->key, det);
    }
    if (rk) {
        if (!get_matrix3(json_object_get_member(o, rk->key), name, rk->key, g->grid.recip, error))
            return FALSE;
        scale3(g->grid.recip, rk->factor);
        if (singular3(g->grid.recip, &det))
            return bm_error_invalid(error, name, "'%s' is singular (determinant %g): b1, b2, b3 "
                           "must be linearly independent", rk->key, det);
        if (lk && !lattice_matches(a, g->grid.recip, name, lk->key, rk->key, error))
            return FALSE;
    }

    JsonNode *mesh = json_object_get_member(o, "mesh");
    if (!mesh)
        return bm_error_invalid(error, name, "missing key 'mesh' (expected [n1, n2, n3])");
    if (!get_mesh(mesh, name, g->grid.mesh, error))
        return FALSE;

    if (!ek)
        return bm_error_invalid(error, name, "missing key 'energies_ev' (or 'energies_hartree', "
                       "'energies_rydberg'; expected a nested array [band][i][j][l] or the name "
                       "of a .npy file)");
    JsonNode *offn = json_object_get_member(o, "mesh_offset");
    if (offn && !get_offset(offn, name, g->grid.offset, error))
        return FALSE;
    if (g->grid.mesh[2] == 1 && g->grid.offset[2] != 0.0)
        return bm_error_invalid(error, name, "'mesh_offset'[2] must be 0 for a sheet (n3 = 1)");
    JsonNode *en = json_object_get_member(o, ek->key);
    JsonNode *kl = json_object_get_member(o, "k_points_fractional");
    if (kl) {
        if (JSON_NODE_TYPE(kl) != JSON_NODE_ARRAY)
            return bm_error_invalid(error, name, "'k_points_fractional': expected a list of "
                                    "[f1, f2, f3]");
        int rot[BM_CRYSTAL_MAX_ROTATIONS][3][3];
        size_t nrot = 0;
        if (json_object_has_member(o, "positions_fractional")
            && !crystal_symmetry(o, name, lk ? a : NULL, g, rot, &nrot, error))
            return FALSE;
        if (!place_points(json_node_get_array(kl), en, name, ek->key, base_dir,
                          (const int (*)[3][3])rot, nrot, g, error))
            return FALSE;
    } else if (JSON_NODE_TYPE(en) == JSON_NODE_ARRAY) {
        if (!read_inline(json_node_get_array(en), name, ek->key, g->grid.mesh, g, error))
            return FALSE;
    } else if (JSON_NODE_TYPE(en) == JSON_NODE_VALUE &&
               json_node_get_value_type(en) == G_TYPE_STRING) {
        if (!read_npy(json_node_get_string(en), name, ek->key, base_dir, g->grid.mesh, g, error))
            return FALSE;
    } else {
        return bm_error_invalid(error, name, "'%s': expected a nested array [band][i][j][l] "
                       "or a .npy file name, found %s", ek->key, node_kind(en));
    }
    if (g->inline_energies)
        g->grid.energies = g->inline_energies;
    if (ek->factor != 1.0 && !to_ev(g, ek->factor, name, error))
        return FALSE;
    JsonNode *spin = json_object_get_member(o, "spin_channels");
    if (spin) {
        if (JSON_NODE_TYPE(spin) != JSON_NODE_VALUE || json_node_get_value_type(spin) != G_TYPE_INT64
            || (json_node_get_int(spin) != 1 && json_node_get_int(spin) != 2))
            return bm_error_invalid(error, name, "'spin_channels': expected 1 or 2");
        if (json_node_get_int(spin) == 2) {
            if (g->grid.nbands % 2)
                return bm_error_invalid(error, name, "'spin_channels' is 2 but the energies hold %zu "
                                        "bands (expected the up bands, then as many down bands)",
                                        g->grid.nbands);
            g->grid.channel_bands = g->grid.nbands / 2;
        }
    }
    energy_scale_check(g, ek);

    JsonNode *names = json_object_get_member(o, "band_names");
    if (names && !read_names(names, name, g, error))
        return FALSE;
    return TRUE;
}

BmBandGrid *bm_band_grid_load_from_data(const char *data, gssize length,
                                        const char *name, const char *base_dir,
                                        GError **error)
{
    g_return_val_if_fail(data != NULL, NULL);
    g_return_val_if_fail(error == NULL || *error == NULL, NULL);
    if (!name)
        name = "<band grid>";
    if (!bm_json_check_depth(data, length, name, error))
        return NULL;
    g_autoptr(JsonParser) parser = json_parser_new_immutable();
    GError *local = NULL;
    if (!json_parser_load_from_data(parser, data, length, &local)) {
        /* json-glib rejects NaN and Infinity; say so when the text holds them */
        g_autofree char *text = g_strndup(data, length < 0 ? strlen(data) : (size_t)length);
        gboolean nonfinite = g_regex_match_simple("\\b(nan|inf|infinity)\\b", text,
                                                  G_REGEX_CASELESS, 0);
        const char *msg = local->message;
        if (g_str_has_prefix(msg, "<data>:"))
            msg += strlen("<data>:");
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: not valid JSON: line %s%s",
                    name, msg, nonfinite ? " (JSON has no NaN or Infinity; energies must be "
                    "finite numbers)" : "");
        g_error_free(local);
        return NULL;
    }
    JsonNode *root = json_parser_get_root(parser);
    if (!root) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: the document is empty", name);
        return NULL;
    }
    BmBandGrid *g = g_new0(BmBandGrid, 1);
    g->source = g_strdup(name);
    if (!parse_document(root, name, base_dir, g, error)) {
        bm_band_grid_free(g);
        return NULL;
    }
    return g;
}

BmBandGrid *bm_band_grid_load(const char *path, GError **error)
{
    g_return_val_if_fail(path != NULL, NULL);
    g_autofree char *text = NULL;
    gsize len = 0;
    if (!bm_error_read_file(path, "band grid document", &text, &len, error))
        return NULL;
    if (len > G_MAXSSIZE) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: file too large", path);
        return NULL;
    }
    g_autofree char *dir = g_path_get_dirname(path);
    return bm_band_grid_load_from_data(text, (gssize)len, path, dir, error);
}
