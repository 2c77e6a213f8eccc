/* bandmass-bands.c: BmBands, a band grid held in memory (for example from a
 * NumPy array) and handed to grid operations as an in-memory input for
 * their "grid" key (BmCallInputs). */
#include "bandmass-private.h"
#include "bm-json.h"
#include "bm-linalg.h"
#include "registry.h"
#include "band-grid.h"
#include "ops.h"
#include "mass-tensor.h"
#include <math.h>
#include <string.h>

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
    GBytes *energies;    /* the energies of an in-memory grid, or NULL */
    BmBandGrid *grid;    /* what operations are handed: a loaded document, or a
                            view of energies (source "in-memory grid") */
    guint mesh[3];
};

G_DEFINE_FINAL_TYPE(BmBands, bm_bands, G_TYPE_OBJECT)

static void bm_bands_finalize(GObject *object)
{
    BmBands *self = BM_BANDS(object);
    bm_band_grid_free(self->grid);
    if (self->energies)
        g_bytes_unref(self->energies);
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

/* Checks the sizes; the expected number of energies in *expected. */
static gboolean check_sizes(gsize n_values, guint nbands, const guint mesh[3],
                            guint64 *expected, GError **error)
{
    if (nbands == 0) {
        g_set_error_literal(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "band grid: nbands must be at least 1");
        return FALSE;
    }
    *expected = nbands;
    for (int d = 0; d < 3; d++) {
        if (mesh[d] == 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "band grid: mesh[%d] must be at least 1", d);
            return FALSE;
        }
        *expected *= mesh[d];
    }
    if (n_values != *expected) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "band grid: %" G_GSIZE_FORMAT " energies given, nbands x n1 x n2 x n3"
                    " = %u x %u x %u x %u = %" G_GUINT64_FORMAT " expected",
                    n_values, nbands, mesh[0], mesh[1], mesh[2], *expected);
        return FALSE;
    }
    return TRUE;
}

/* Takes energies over (nbands x mesh doubles, suitably aligned, sizes
 * already checked). */
static BmBands *bands_new(GBytes *energies, guint nbands, const guint mesh[3],
                          const double recip[9])
{
    BmBands *self = g_object_new(BM_TYPE_BANDS, NULL);
    self->energies = energies;
    self->grid = g_new0(BmBandGrid, 1);
    self->grid->source = g_strdup("in-memory grid");
    self->grid->grid.energies = g_bytes_get_data(energies, NULL);
    self->grid->grid.nbands = nbands;
    for (int d = 0; d < 3; d++) {
        self->grid->grid.mesh[d] = self->mesh[d] = mesh[d];
        for (int e = 0; e < 3; e++)
            self->grid->grid.recip[d][e] = recip[3 * d + e];
    }
    return self;
}

/* The reciprocal vectors of a direct cell, or FALSE with error set. */
static gboolean reciprocal_of(const double lattice_vectors[9], double recip[9], GError **error)
{
    double a[3][3], b[3][3];
    memcpy(a, lattice_vectors, sizeof a);
    if (bm_reciprocal3(a, b) != 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "band grid: the lattice vectors are singular or not finite "
                    "(cell volume %g A^3)", bm_det3(a));
        return FALSE;
    }
    memcpy(recip, b, 9 * sizeof(double));
    return TRUE;
}

static BmBands *from_values(const double *energies, gsize n_values, guint nbands,
                            const guint mesh[3], const double recip[9], GError **error)
{
    guint64 expected;
    if (!check_sizes(n_values, nbands, mesh, &expected, error))
        return NULL;
    if (!energies) {
        g_set_error_literal(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "band grid: no energies given");
        return NULL;
    }
    GBytes *copy = g_bytes_new(energies, n_values * sizeof(double));
    return bands_new(copy, nbands, mesh, recip);
}

static BmBands *from_bytes(GBytes *energies, guint nbands, const guint mesh[3],
                           const double recip[9], GError **error)
{
    gsize size = g_bytes_get_size(energies);
    if (size % sizeof(double) != 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "band grid: %" G_GSIZE_FORMAT " bytes of energies is not a whole number "
                    "of 8-byte doubles", size);
        return NULL;
    }
    guint64 expected;
    if (!check_sizes(size / sizeof(double), nbands, mesh, &expected, error))
        return NULL;
    gconstpointer data = g_bytes_get_data(energies, NULL);
    if ((guintptr)data % G_ALIGNOF(double) != 0)   /* unaligned: one copy */
        return bands_new(g_bytes_new(data, size), nbands, mesh, recip);
    return bands_new(g_bytes_ref(energies), nbands, mesh, recip);
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
    return from_values(energies, n_values, nbands, mesh, reciprocal_vectors, error);
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
    double recip[9];
    if (!reciprocal_of(lattice_vectors, recip, error))
        return NULL;
    return from_values(energies, n_values, nbands, mesh, recip, error);
}

/**
 * bm_bands_new_from_bytes:
 * @energies: band energies, eV, as native-endian IEEE 754 doubles in the
 *   order of bm_bands_new_from_array() (in Python:
 *   `GLib.Bytes(numpy_array.tobytes())`)
 * @nbands: the number of bands
 * @mesh: (array fixed-size=3): the mesh n1, n2, n3 (n3 = 1 for a 2D sheet)
 * @reciprocal_vectors: (array fixed-size=9): b1, b2, b3 row after row,
 *   Cartesian, 1/Angstrom, with the factor 2 pi included
 * @error: return location for a #GError
 *
 * As bm_bands_new_from_array(), with the energies in one block of bytes:
 * the grid keeps a reference to @energies and reads them in place (they
 * are copied only when not aligned for doubles), so nothing is converted
 * value by value.
 *
 * Returns: (transfer full): the band grid, or %NULL with @error set
 *   (%BM_ERROR_INVALID_INPUT when the sizes do not agree)
 */
BmBands *bm_bands_new_from_bytes(GBytes *energies, guint nbands, const guint mesh[3],
                                 const double reciprocal_vectors[9], GError **error)
{
    g_return_val_if_fail(energies != NULL, NULL);
    g_return_val_if_fail(mesh != NULL && reciprocal_vectors != NULL, NULL);
    return from_bytes(energies, nbands, mesh, reciprocal_vectors, error);
}

/**
 * bm_bands_new_from_bytes_lattice:
 * @energies: band energies, eV, as for bm_bands_new_from_bytes()
 * @nbands: the number of bands
 * @mesh: (array fixed-size=3): the mesh n1, n2, n3
 * @lattice_vectors: (array fixed-size=9): the direct lattice vectors a1, a2,
 *   a3 row after row, Cartesian, Angstrom
 * @error: return location for a #GError
 *
 * As bm_bands_new_from_bytes(), with the cell given by its direct lattice
 * vectors (as for bm_bands_new_from_lattice()).
 *
 * Returns: (transfer full): the band grid, or %NULL with @error set
 *   (%BM_ERROR_INVALID_INPUT when the sizes disagree or the cell is singular)
 */
BmBands *bm_bands_new_from_bytes_lattice(GBytes *energies, guint nbands, const guint mesh[3],
                                         const double lattice_vectors[9], GError **error)
{
    g_return_val_if_fail(energies != NULL, NULL);
    g_return_val_if_fail(mesh != NULL && lattice_vectors != NULL, NULL);
    double recip[9];
    if (!reciprocal_of(lattice_vectors, recip, error))
        return NULL;
    return from_bytes(energies, nbands, mesh, recip, error);
}

/**
 * bm_bands_new_from_file:
 * @path: (type filename): a band grid document (JSON, format bandmass-grid-1,
 *   energies inline or in a .npy file beside it)
 * @error: return location for a #GError
 *
 * Loads a band grid document, as the `grid` key of a `mass-tensor` request
 * does; band names come from the document. The energies of a .npy file are
 * read into memory the object owns (one read), so rewriting or shortening
 * the file afterwards changes nothing here.
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
    /* the object may live as long as the host: its energies must not be a
     * mapping of a file that can be rewritten or cut under it */
    if (!bm_band_grid_detach(loaded, error)) {
        bm_band_grid_free(loaded);
        return NULL;
    }
    BmBands *self = g_object_new(BM_TYPE_BANDS, NULL);
    self->grid = loaded;
    for (int d = 0; d < 3; d++)
        self->mesh[d] = (guint)loaded->grid.mesh[d];
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
    return (guint)self->grid->grid.nbands;
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
    return &self->grid->grid.recip[0][0];
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
    if (names && g_strv_length((GStrv)names) != self->grid->grid.nbands) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "band grid: %u band names given for %u bands",
                    g_strv_length((GStrv)names), (guint)self->grid->grid.nbands);
        return FALSE;
    }
    g_strfreev(self->grid->band_names);
    self->grid->band_names = g_strdupv((GStrv)names);
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
    return (const char *const *)self->grid->band_names;
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
    BmInput grid = { "grid", BM_INPUT_BAND_GRID, self->grid };
    BmCallInputs inputs = { 1, &grid };
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
 * Runs the search of the registry's `mass-tensor` operation on this grid
 * (the same request checks and the same code) and returns its extrema.
 * Warnings of the whole search are repeated at the head of each
 * extremum's warnings.
 *
 * Returns: (transfer container) (element-type BmExtremum): the extrema
 *   (the array holds a reference to each), or %NULL with @error set
 */
GPtrArray *bm_bands_find_extrema(BmBands *self, const char *request_json, GError **error)
{
    g_return_val_if_fail(BM_IS_BANDS(self), NULL);
    if (!request_json)
        request_json = self->grid->grid.nbands == 1 ? "{\"band\": 0}" : "{}";
    const BmOperation *op = &bm_op_mass_tensor;
    g_autoptr(GError) parse_error = NULL;
    if (!bm_json_check_depth(request_json, -1, "request for mass-tensor", error))
        return NULL;
    g_autoptr(JsonNode) root = json_from_string(request_json, &parse_error);
    if (parse_error || !root || !JSON_NODE_HOLDS_OBJECT(root)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request for %s must be a JSON object ({...})%s%s", op->name,
                    parse_error ? ": " : "", parse_error ? parse_error->message : "");
        return NULL;
    }
    BmInput grid = { "grid", BM_INPUT_BAND_GRID, self->grid };
    BmCallInputs inputs = { 1, &grid };
    g_autoptr(JsonObject) request = bm_registry_prepare(op, json_node_get_object(root),
                                                        &inputs, error);
    if (!request)
        return NULL;
    g_autoptr(BmMassTensorSearch) found = bm_mass_tensor_search(request, &inputs, error);
    if (!found)
        return NULL;
    GPtrArray *out = g_ptr_array_new_full((guint)found->n_tensors, g_object_unref);
    for (size_t i = 0; i < found->n_tensors; i++)
        g_ptr_array_add(out, bm_extremum_new_from_core(&found->tensors[i], found->fractional,
                                                       &found->warnings));
    return out;
}
