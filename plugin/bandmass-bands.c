/* bandmass-bands.c: BmBands, a band grid held in memory (for example from a
 * NumPy array) and handed to grid operations through BmCallInputs. */
#include "bandmass-private.h"
#include "bm-linalg.h"
#include "registry.h"
#include "band-grid.h"
#include <math.h>

/**
 * BmBands:
 *
 * Energies of one or more bands on a uniform periodic mesh over the whole
 * reciprocal cell, owned in memory. Point (i, j, l) of band b sits at
 * k = (i/n1) b1 + (j/n2) b2 + (l/n3) b3 and its energy (eV) is element
 * ((b n1 + i) n2 + j) n3 + l of the energies: a NumPy array of shape
 * (nbands, n1, n2, n3) flattened in C order. n3 = 1 for a 2D sheet.
 */
struct _BmBands {
    GObject parent_instance;
    double *energies;    /* a copy of the caller's array, or NULL */
    BmBandGrid *loaded;  /* a band grid document, or NULL */
    bm_grid grid;        /* view handed to operations: into energies or loaded */
    GStrv names;         /* nbands entries, or NULL */
    guint mesh[3];
};

G_DEFINE_FINAL_TYPE(BmBands, bm_bands, G_TYPE_OBJECT)

static void bm_bands_finalize(GObject *object)
{
    BmBands *self = BM_BANDS(object);
    g_free(self->energies);
    if (self->loaded)
        bm_band_grid_free(self->loaded);
    g_strfreev(self->names);
    G_OBJECT_CLASS(bm_bands_parent_class)->finalize(object);
}

static void bm_bands_class_init(BmBandsClass *klass)
{
    G_OBJECT_CLASS(klass)->finalize = bm_bands_finalize;
}

static void bm_bands_init(BmBands *self)
{
    (void)self;
}

static BmBands *bands_new(const double *energies, gsize n_values, guint nbands,
                          const guint mesh[3], const double recip[9], GError **error)
{
    if (nbands == 0) {
        g_set_error_literal(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "band grid: nbands must be at least 1");
        return NULL;
    }
    guint64 expected = nbands;
    for (int d = 0; d < 3; d++) {
        if (mesh[d] == 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "band grid: mesh[%d] must be at least 1", d);
            return NULL;
        }
        expected *= mesh[d];
    }
    if (n_values != expected || energies == NULL) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "band grid: %" G_GSIZE_FORMAT " energies given, nbands x n1 x n2 x n3"
                    " = %u x %u x %u x %u = %" G_GUINT64_FORMAT " expected",
                    n_values, nbands, mesh[0], mesh[1], mesh[2], expected);
        return NULL;
    }
    BmBands *self = g_object_new(BM_TYPE_BANDS, NULL);
    self->energies = g_memdup2(energies, n_values * sizeof(double));
    self->grid.energies = self->energies;
    self->grid.nbands = nbands;
    for (int d = 0; d < 3; d++) {
        self->grid.mesh[d] = self->mesh[d] = mesh[d];
        for (int e = 0; e < 3; e++)
            self->grid.recip[d][e] = recip[3 * d + e];
    }
    return self;
}

/**
 * bm_bands_new_from_array:
 * @energies: (array length=n_values): band energies, eV, in the order
 *   [band][i][j][l] (a C-ordered NumPy array of shape (nbands, n1, n2, n3), flattened)
 * @n_values: the number of energies: nbands x n1 x n2 x n3
 * @nbands: the number of bands
 * @mesh: (array fixed-size=3): the mesh n1, n2, n3 (n3 = 1 for a 2D sheet)
 * @reciprocal_vectors: (array fixed-size=9): b1, b2, b3 row after row,
 *   Cartesian, 1/Angstrom, with the factor 2 pi included
 * @error: return location for a #GError
 *
 * Copies a band grid into memory. Energies and vectors are checked by the
 * operation that uses them (finite values, a non-singular cell).
 *
 * Returns: (transfer full): the band grid, or %NULL with @error set
 *   (%BM_ERROR_INVALID_INPUT when the sizes do not agree)
 */
BmBands *bm_bands_new_from_array(const double *energies, gsize n_values, guint nbands,
                                 const guint mesh[3], const double reciprocal_vectors[9],
                                 GError **error)
{
    g_return_val_if_fail(mesh != NULL && reciprocal_vectors != NULL, NULL);
    return bands_new(energies, n_values, nbands, mesh, reciprocal_vectors, error);
}

/**
 * bm_bands_new_from_lattice:
 * @energies: (array length=n_values): band energies, eV, as for
 *   bm_bands_new_from_array()
 * @n_values: the number of energies: nbands x n1 x n2 x n3
 * @nbands: the number of bands
 * @mesh: (array fixed-size=3): the mesh n1, n2, n3
 * @lattice_vectors: (array fixed-size=9): the direct lattice vectors a1, a2,
 *   a3 row after row, Cartesian, Angstrom
 * @error: return location for a #GError
 *
 * As bm_bands_new_from_array(), with the cell given by its direct lattice
 * vectors; the reciprocal vectors are b_i = 2 pi (a_j x a_k) / (a1 . a2 x a3).
 *
 * Returns: (transfer full): the band grid, or %NULL with @error set
 *   (%BM_ERROR_INVALID_INPUT when the sizes disagree or the cell is singular)
 */
BmBands *bm_bands_new_from_lattice(const double *energies, gsize n_values, guint nbands,
                                   const guint mesh[3], const double lattice_vectors[9],
                                   GError **error)
{
    g_return_val_if_fail(mesh != NULL && lattice_vectors != NULL, NULL);
    double a[3][3], b[3][3], recip[9];
    memcpy(a, lattice_vectors, sizeof a);
    if (bm_reciprocal3(a, b) != 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "band grid: the lattice vectors are singular or not finite "
                    "(cell volume %g A^3)", bm_det3(a));
        return NULL;
    }
    memcpy(recip, b, sizeof recip);
    return bands_new(energies, n_values, nbands, mesh, recip, error);
}

/**
 * bm_bands_new_from_file:
 * @path: (type filename): a band grid document (JSON, format bandmass-grid-1,
 *   energies inline or in a .npy file beside it)
 * @error: return location for a #GError
 *
 * Loads a band grid document, as the `grid` key of a `mass-tensor` request
 * does; band names come from the document. A .npy energies file is mapped,
 * not copied.
 *
 * Returns: (transfer full): the band grid, or %NULL with @error set
 *   (%BM_ERROR_IO or %BM_ERROR_INVALID_INPUT, naming the file and key)
 */
BmBands *bm_bands_new_from_file(const char *path, GError **error)
{
    g_return_val_if_fail(path != NULL, NULL);
    BmBandGrid *loaded = bm_band_grid_load(path, error);
    if (!loaded)
        return NULL;
    BmBands *self = g_object_new(BM_TYPE_BANDS, NULL);
    self->loaded = loaded;
    self->grid = loaded->grid;
    for (int d = 0; d < 3; d++)
        self->mesh[d] = (guint)loaded->grid.mesh[d];
    self->names = g_strdupv(loaded->band_names);
    return self;
}

/**
 * bm_bands_get_nbands:
 * @self: a #BmBands
 *
 * Returns: the number of bands
 */
guint bm_bands_get_nbands(BmBands *self)
{
    g_return_val_if_fail(BM_IS_BANDS(self), 0);
    return (guint)self->grid.nbands;
}

/**
 * bm_bands_get_mesh:
 * @self: a #BmBands
 *
 * Returns: (transfer none) (array fixed-size=3): n1, n2, n3
 */
const guint *bm_bands_get_mesh(BmBands *self)
{
    g_return_val_if_fail(BM_IS_BANDS(self), NULL);
    return self->mesh;
}

/**
 * bm_bands_get_reciprocal_vectors:
 * @self: a #BmBands
 *
 * Returns: (transfer none) (array fixed-size=9): b1, b2, b3 row after row,
 *   Cartesian, 1/Angstrom
 */
const double *bm_bands_get_reciprocal_vectors(BmBands *self)
{
    g_return_val_if_fail(BM_IS_BANDS(self), NULL);
    return &self->grid.recip[0][0];
}

/**
 * bm_bands_set_band_names:
 * @self: a #BmBands
 * @names: (array zero-terminated=1) (nullable): one name a band, or %NULL to clear
 * @error: return location for a #GError
 *
 * Names the bands; operations then accept a name where they take a band.
 *
 * Returns: %TRUE, or %FALSE with @error set when the count is not nbands
 */
gboolean bm_bands_set_band_names(BmBands *self, const char *const *names, GError **error)
{
    g_return_val_if_fail(BM_IS_BANDS(self), FALSE);
    if (names && g_strv_length((GStrv)names) != self->grid.nbands) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "band grid: %u band names given for %u bands",
                    g_strv_length((GStrv)names), (guint)self->grid.nbands);
        return FALSE;
    }
    g_strfreev(self->names);
    self->names = g_strdupv((GStrv)names);
    return TRUE;
}

/**
 * bm_bands_get_band_names:
 * @self: a #BmBands
 *
 * Returns: (transfer none) (array zero-terminated=1) (nullable): the band
 *   names, or %NULL when none were set
 */
const char *const *bm_bands_get_band_names(BmBands *self)
{
    g_return_val_if_fail(BM_IS_BANDS(self), NULL);
    return (const char *const *)self->names;
}

/**
 * bm_bands_call:
 * @self: a #BmBands
 * @op: an operation that reads band data, e.g. `mass-tensor`
 * @request_json: (nullable): the request as JSON text, without a file
 *   name; %NULL means `{}`
 * @error: return location for a #GError
 *
 * Runs an operation of the registry on this grid in place of a band file.
 *
 * Returns: (transfer full): the response as JSON text, or %NULL with @error set
 */
char *bm_bands_call(BmBands *self, const char *op, const char *request_json, GError **error)
{
    g_return_val_if_fail(BM_IS_BANDS(self), NULL);
    g_return_val_if_fail(op != NULL, NULL);
    BmCallInputs inputs = {
        .grid = &self->grid,
        .band_names = (const char *const *)self->names,
    };
    return bm_registry_call_json(op, request_json ? request_json : "{}", &inputs, FALSE, error);
}

/**
 * bm_bands_find_extrema:
 * @self: a #BmBands
 * @request_json: (nullable): a `mass-tensor` request as JSON text without
 *   a file: `band` (index or name), `extremum`, fit options; %NULL means
 *   the defaults for a grid of one band (`{"band": 0}`)
 * @error: return location for a #GError
 *
 * Runs the registry's `mass-tensor` operation on this grid and returns its
 * extrema. Warnings of the whole response are repeated at the head of each
 * extremum's warnings.
 *
 * Returns: (transfer container) (element-type BmExtremum): the extrema
 *   (the array holds a reference to each), or %NULL with @error set
 */
GPtrArray *bm_bands_find_extrema(BmBands *self, const char *request_json, GError **error)
{
    g_return_val_if_fail(BM_IS_BANDS(self), NULL);
    if (!request_json && self->grid.nbands == 1)
        request_json = "{\"band\": 0}";
    g_autofree char *text = bm_bands_call(self, "mass-tensor", request_json, error);
    if (!text)
        return NULL;
    g_autoptr(JsonNode) root = json_from_string(text, NULL);
    JsonObject *response = root && JSON_NODE_HOLDS_OBJECT(root) ? json_node_get_object(root) : NULL;
    JsonNode *extrema = response ? json_object_get_member(response, "extrema") : NULL;
    if (!extrema || !JSON_NODE_HOLDS_ARRAY(extrema)) {
        g_set_error_literal(error, BM_ERROR, BM_ERROR_INTERNAL,
                            "mass-tensor response lacks an \"extrema\" array");
        return NULL;
    }
    JsonNode *shared = json_object_get_member(response, "warnings");
    JsonArray *shared_array = shared && JSON_NODE_HOLDS_ARRAY(shared) ? json_node_get_array(shared) : NULL;
    JsonArray *a = json_node_get_array(extrema);
    g_autoptr(GPtrArray) out = g_ptr_array_new_full(json_array_get_length(a), g_object_unref);
    for (guint i = 0; i < json_array_get_length(a); i++) {
        JsonNode *e = json_array_get_element(a, i);
        if (!JSON_NODE_HOLDS_OBJECT(e)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INTERNAL,
                        "mass-tensor response: extremum %u is not an object", i);
            return NULL;
        }
        BmExtremum *x = bm_extremum_new_from_object(json_node_get_object(e), shared_array, error);
        if (!x)
            return NULL;
        g_ptr_array_add(out, x);
    }
    return g_steal_pointer(&out);
}
